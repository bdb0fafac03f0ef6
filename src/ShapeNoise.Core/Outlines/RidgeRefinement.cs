using ShapeNoise.Shape;

namespace ShapeNoise.Outlines;

/// <summary>
/// Sub-pixel placement of outline vertices on the crest of a junction signal (docs/segmentation.md#sub-pixel-boundaries):
/// each vertex p moves along its outline normal n to p + (s_j + δ h) n, where f_k = f(p + s_k n), s_k = −S + k h
/// (k = 0..2S/h) are bilinear samples of the signal, j is the largest sample, and
/// δ = (f_{j−1} − f_{j+1}) / (2 (f_{j−1} − 2 f_j + f_{j+1})) is the vertex of the parabola through the three samples
/// around it. A vertex stays where it is when the largest sample is at either end of the search (no crest within
/// ±S) or the three samples do not curve down.
/// </summary>
/// <remarks>
/// The vertex of the parabola through three equally spaced samples is the usual sub-sample peak estimate (e.g. Press W.H.
/// et al. (2007), Numerical Recipes, 3rd ed., §10.3, parabolic interpolation); placing a boundary on the maximum of the
/// junction signal follows the ridge definition of a line (Steger C. (1998), "An unbiased detector of curvilinear
/// structures", IEEE Trans. PAMI 20:113-125). Both neighbours of a junction share its crack vertices, so both get the same
/// position. Coordinates as in docs/measures.md#coordinates: pixel (r, c) spans [c, c+1] × [r, r+1], its value sits at
/// (c + 0.5, r + 0.5).
/// </remarks>
public static class RidgeRefinement
{
    /// <summary>Default half-width (px) of the search along the normal.</summary>
    public const double DefaultSearchPx = 2.0;
    /// <summary>Default sample spacing (px) along the normal.</summary>
    public const double DefaultStepPx = 1.0;

    /// <summary>Moves every vertex of the closed polygon <paramref name="vertices"/> onto the crest of the row-major
    /// <paramref name="signal"/> (<paramref name="width"/> × <paramref name="height"/>) along its normal (see
    /// <see cref="RidgeRefinement"/>); the normal at vertex i is perpendicular to v[i+2] − v[i−2].</summary>
    /// <returns>The refined polygon and how many vertices moved.</returns>
    public static (Point2[] Vertices, int Moved) Refine(ReadOnlySpan<Point2> vertices, ReadOnlySpan<float> signal, int width, int height,
        double searchPx = DefaultSearchPx, double stepPx = DefaultStepPx)
    {
        if (signal.Length != width * height) throw new ArgumentException($"signal has {signal.Length} values, not {width} x {height}");
        if (!(searchPx > 0) || !(stepPx > 0) || stepPx > searchPx) throw new ArgumentException("search and step must be > 0 and step <= search");
        int n = vertices.Length;
        var result = vertices.ToArray();
        if (n < 5) return (result, 0);
        int half = (int)Math.Round(searchPx / stepPx);
        Span<double> f = stackalloc double[2 * half + 1];
        int moved = 0;
        for (int i = 0; i < n; i++)
        {
            var a = vertices[(i + n - 2) % n]; var b = vertices[(i + 2) % n];
            double tx = b.X - a.X, ty = b.Y - a.Y, len = Math.Sqrt(tx * tx + ty * ty);
            if (len == 0) continue;
            double nx = -ty / len, ny = tx / len;
            var p = vertices[i];
            for (int k = -half; k <= half; k++) f[k + half] = Bilinear(signal, width, height, p.X + k * stepPx * nx, p.Y + k * stepPx * ny);
            double? offset = CrestOffset(f, stepPx);
            if (offset is not { } s) continue;
            s -= half * stepPx;
            result[i] = new Point2(p.X + s * nx, p.Y + s * ny);
            moved++;
        }
        return (result, moved);
    }

    /// <summary>Position of the crest of equally spaced samples <paramref name="f"/> (spacing <paramref name="stepPx"/>),
    /// measured from the first sample: (j + δ) h with δ the parabola vertex of <see cref="RidgeRefinement"/>; null when the
    /// largest sample is at an end or the three samples around it do not curve down.</summary>
    public static double? CrestOffset(ReadOnlySpan<double> f, double stepPx)
    {
        int j = 0;
        for (int k = 1; k < f.Length; k++) if (f[k] > f[j]) j = k;
        if (j == 0 || j == f.Length - 1 || double.IsNaN(f[j])) return null;
        double l = f[j - 1], c = f[j], r = f[j + 1], curv = l - 2 * c + r;
        if (!(curv < 0)) return null;
        return (j + 0.5 * (l - r) / curv) * stepPx;
    }

    /// <summary>Bilinear interpolation of the pixel values at (x, y) in outline coordinates (pixel centres at half
    /// integers); NaN outside the pixel centres' hull.</summary>
    public static double Bilinear(ReadOnlySpan<float> s, int w, int h, double x, double y)
    {
        double u = x - 0.5, v = y - 0.5;
        if (!(u >= 0 && v >= 0 && u <= w - 1 && v <= h - 1)) return double.NaN;
        int x0 = Math.Min((int)u, w - 2 < 0 ? 0 : w - 2), y0 = Math.Min((int)v, h - 2 < 0 ? 0 : h - 2);
        double fx = u - x0, fy = v - y0;
        int i = y0 * w + x0;
        double top = s[i] + fx * (s[i + 1] - s[i]), bottom = s[i + w] + fx * (s[i + w + 1] - s[i + w]);
        return top + fy * (bottom - top);
    }
}
