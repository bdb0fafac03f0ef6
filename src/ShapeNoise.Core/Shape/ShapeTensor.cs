namespace ShapeNoise.Shape;

/// <summary>
/// Shape tensor S = (1/A) integral over the cell of (r - c)(r - c)^T dA, with its eigen-decomposition.
/// For a uniform ellipse with semi-axes a &gt;= b: L1 = a^2/4, L2 = b^2/4, Theta = angle of the a-axis.
/// </summary>
/// <param name="AreaPx2">|A|.</param>
/// <param name="Centroid">Area centroid c.</param>
/// <param name="Sxx">S_xx.</param><param name="Sxy">S_xy.</param><param name="Syy">S_yy.</param>
internal readonly record struct ShapeTensor(double AreaPx2, Point2 Centroid, double Sxx, double Sxy, double Syy)
{
    /// <summary>Larger eigenvalue l1 = (Sxx+Syy)/2 + sqrt(((Sxx-Syy)/2)^2 + Sxy^2).</summary>
    public double L1 => 0.5 * (Sxx + Syy) + Half;
    /// <summary>Smaller eigenvalue l2 = (Sxx+Syy)/2 - sqrt(((Sxx-Syy)/2)^2 + Sxy^2), clamped at 0.</summary>
    public double L2 => Math.Max(0, 0.5 * (Sxx + Syy) - Half);
    private double Half => Math.Sqrt(0.25 * (Sxx - Syy) * (Sxx - Syy) + Sxy * Sxy);
    /// <summary>Long-axis angle theta = 0.5 atan2(2 Sxy, Sxx - Syy), in (-pi/2, pi/2], measured from +x toward +y.</summary>
    public double ThetaRad => 0.5 * Math.Atan2(2 * Sxy, Sxx - Syy);

    /// <summary>
    /// Closed-form shape tensor of a simple polygon from its vertices by Green's theorem:
    /// integral x^2 dA = 1/12 sum (x_i^2 + x_i x_{i+1} + x_{i+1}^2) k_i,
    /// integral xy dA = 1/24 sum (x_i y_{i+1} + 2 x_i y_i + 2 x_{i+1} y_{i+1} + x_{i+1} y_i) k_i,
    /// with k_i = x_i y_{i+1} - x_{i+1} y_i; then S = M2/A - c c^T.
    /// </summary>
    /// <remarks>Second moments of area of a polygon: Steger C. (1996), "On the calculation of arbitrary moments of polygons",
    /// Technical Report FGBV-96-05, TU Muenchen. The uniform-ellipse check uses the handbook second moment pi a^3 b / 4.</remarks>
    public static ShapeTensor Of(ReadOnlySpan<Point2> v)
    {
        if (v.Length < 3) return new ShapeTensor(0, new Point2(double.NaN, double.NaN), double.NaN, double.NaN, double.NaN);
        // Shift to a local origin (the vertex mean) so the moments do not lose digits far from the image origin.
        double ox = 0, oy = 0;
        for (int i = 0; i < v.Length; i++) { ox += v[i].X; oy += v[i].Y; }
        ox /= v.Length; oy /= v.Length;
        double a = 0, mx = 0, my = 0, mxx = 0, myy = 0, mxy = 0;
        for (int i = 0; i < v.Length; i++)
        {
            var p = v[i]; var q = v[i + 1 == v.Length ? 0 : i + 1];
            double x0 = p.X - ox, y0 = p.Y - oy, x1 = q.X - ox, y1 = q.Y - oy;
            double k = x0 * y1 - x1 * y0;
            a += k;
            mx += (x0 + x1) * k;
            my += (y0 + y1) * k;
            mxx += (x0 * x0 + x0 * x1 + x1 * x1) * k;
            myy += (y0 * y0 + y0 * y1 + y1 * y1) * k;
            mxy += (x0 * y1 + 2 * x0 * y0 + 2 * x1 * y1 + x1 * y0) * k;
        }
        a *= 0.5;                       // signed area; the signs cancel in every ratio below
        if (a == 0) return new ShapeTensor(0, new Point2(double.NaN, double.NaN), double.NaN, double.NaN, double.NaN);
        double cx = mx / (6 * a), cy = my / (6 * a);
        double sxx = mxx / (12 * a) - cx * cx;
        double syy = myy / (12 * a) - cy * cy;
        double sxy = mxy / (24 * a) - cx * cy;
        return new ShapeTensor(Math.Abs(a), new Point2(cx + ox, cy + oy), sxx, sxy, syy);
    }
}
