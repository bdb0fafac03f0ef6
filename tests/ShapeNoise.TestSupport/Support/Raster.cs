using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Support;

/// <summary>Rasterises analytic shapes at pixel centres, for tests.</summary>
public static class Raster
{
    /// <summary>Sets pixels whose centre (x+0.5, y+0.5) lies inside the ellipse to <paramref name="label"/>.</summary>
    public static void Ellipse(int[] img, int w, int h, double cx, double cy, double a, double b, double theta, int label)
    {
        double c = Math.Cos(theta), s = Math.Sin(theta);
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                double dx = x + 0.5 - cx, dy = y + 0.5 - cy;
                double u = (dx * c + dy * s) / a, v = (-dx * s + dy * c) / b;
                if (u * u + v * v <= 1) img[y * w + x] = label;
            }
    }

    /// <summary>An N-vertex polygon on the ellipse at equally spaced parametric angles (inscribed).</summary>
    public static Point2[] EllipsePolygon(int n, double cx, double cy, double a, double b, double theta)
    {
        var p = new Point2[n];
        double c = Math.Cos(theta), s = Math.Sin(theta);
        for (int i = 0; i < n; i++)
        {
            double t = 2 * Math.PI * i / n, u = a * Math.Cos(t), v = b * Math.Sin(t);
            p[i] = new Point2(cx + u * c - v * s, cy + u * s + v * c);
        }
        return p;
    }
}
