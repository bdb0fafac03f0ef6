namespace ShapeNoise.Shape;

/// <summary>Area, centroid and perimeter of a closed simple polygon (vertices in order, first vertex not repeated).</summary>
/// <remarks>Shoelace formula and the centroid of a polygon by Green's theorem; see e.g. Bourke P. (1988),
/// "Calculating the area and centroid of a polygon", and any surveying handbook.</remarks>
public static class Polygon
{
    /// <summary>Signed area A = 1/2 sum (x_i y_{i+1} - x_{i+1} y_i). Positive for vertices ordered counter-clockwise in a y-up frame.</summary>
    public static double SignedArea(ReadOnlySpan<Point2> v)
    {
        if (v.Length < 3) return 0;
        // Translate by the first vertex for numerical accuracy far from the origin.
        double x0 = v[0].X, y0 = v[0].Y, s = 0;
        for (int i = 0; i < v.Length; i++)
        {
            var p = v[i]; var q = v[i + 1 == v.Length ? 0 : i + 1];
            s += (p.X - x0) * (q.Y - y0) - (q.X - x0) * (p.Y - y0);
        }
        return 0.5 * s;
    }

    /// <summary>Unsigned area |A|.</summary>
    public static double Area(ReadOnlySpan<Point2> v) => Math.Abs(SignedArea(v));

    /// <summary>Centroid c = 1/(6A) sum (p_i + p_{i+1}) (x_i y_{i+1} - x_{i+1} y_i).</summary>
    public static Point2 Centroid(ReadOnlySpan<Point2> v)
    {
        if (v.Length == 0) return new Point2(double.NaN, double.NaN);
        double x0 = v[0].X, y0 = v[0].Y, a = 0, cx = 0, cy = 0;
        for (int i = 0; i < v.Length; i++)
        {
            var p = v[i]; var q = v[i + 1 == v.Length ? 0 : i + 1];
            double px = p.X - x0, py = p.Y - y0, qx = q.X - x0, qy = q.Y - y0;
            double cr = px * qy - qx * py;
            a += cr; cx += (px + qx) * cr; cy += (py + qy) * cr;
        }
        if (a == 0) return new Point2(double.NaN, double.NaN);
        return new Point2(x0 + cx / (3 * a), y0 + cy / (3 * a));
    }

    /// <summary>Perimeter P = sum |p_{i+1} - p_i| (closed).</summary>
    public static double Perimeter(ReadOnlySpan<Point2> v)
    {
        double s = 0;
        for (int i = 0; i < v.Length; i++)
        {
            var p = v[i]; var q = v[i + 1 == v.Length ? 0 : i + 1];
            s += Math.Sqrt((q.X - p.X) * (q.X - p.X) + (q.Y - p.Y) * (q.Y - p.Y));
        }
        return s;
    }
}
