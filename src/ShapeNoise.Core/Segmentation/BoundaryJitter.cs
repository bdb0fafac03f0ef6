using ShapeNoise.Shape;

namespace ShapeNoise.Segmentation;

/// <summary>Frame-to-frame jitter of segmented boundaries on a static tissue (docs/segmentation.md#boundary-jitter).</summary>
/// <param name="RmsPx">rms over cells, rays and frames of r_k(t) − mean over t of r_k(t).</param>
/// <param name="FrameToFrameRmsPx">rms over cells, rays and consecutive frames of r_k(t+1) − r_k(t).</param>
/// <param name="Cells">Reference cells measured (inside the image and matched in every frame).</param>
/// <param name="Frames">Frames.</param>
public readonly record struct BoundaryJitter(double RmsPx, double FrameToFrameRmsPx, int Cells, int Frames)
{
    /// <summary>
    /// r_k(t): distance from the reference cell's centroid along ray k (angle 2πk/M) to where the ray first leaves the
    /// pixels of the segmented object matched to that cell in frame t (the object covering more than half of it, the
    /// SEG matching rule of Ulman et al. 2017); pixels are unit squares centred on integer coordinates.
    /// RmsPx = sqrt(mean (r_k(t) − r̄_k)²), FrameToFrameRmsPx = sqrt(mean (r_k(t+1) − r_k(t))²) over reference cells
    /// at least 2 px from the image border that are matched in every frame.
    /// </summary>
    /// <remarks>Matching rule: Ulman V. et al. (2017), Nature Methods 14:1141-1152. The radial description of a
    /// boundary is the one the shape analysis uses (docs/measures.md#definitions).</remarks>
    public static BoundaryJitter Measure(int[] reference, IReadOnlyList<int[]> segmented, int w, int h, int rays = 32)
        => Measure(reference, segmented, w, h, rays, (t, s, cx, cy, a, maxR) => Exit(segmented[t], s, w, h, cx, cy, a, maxR));

    /// <summary>
    /// As <see cref="Measure(int[], IReadOnlyList{int[]}, int, int, int)"/>, but r_k(t) is where ray k crosses the outline
    /// polygon <paramref name="outlines"/>[t][s] of the matched object s (outline coordinates, pixel centres at half
    /// integers: the nearest crossing of the ray with a polygon edge), so sub-pixel outlines are measured without the
    /// pixel quantisation of the mask. A cell whose centroid lies outside the outline in some frame (an even number of
    /// crossings) is left out.
    /// </summary>
    public static BoundaryJitter MeasureOutlines(int[] reference, IReadOnlyList<int[]> segmented, IReadOnlyList<IReadOnlyDictionary<int, Point2[]>> outlines,
        int w, int h, int rays = 32)
        => Measure(reference, segmented, w, h, rays, (t, s, cx, cy, a, maxR) =>
            outlines[t].TryGetValue(s, out var poly) && poly.Length >= 3 ? PolygonExit(poly, cx + 0.5, cy + 0.5, a, maxR) : double.NaN);

    private delegate double ExitFn(int frame, int label, double cx, double cy, double angle, double maxR);

    private static BoundaryJitter Measure(int[] reference, IReadOnlyList<int[]> segmented, int w, int h, int rays, ExitFn exit)
    {
        int n = segmented.Count;
        var cells = new Dictionary<int, (double Sx, double Sy, int N, int X0, int Y0, int X1, int Y1)>();
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int l = reference[y * w + x];
                if (l == 0) continue;
                var c = cells.TryGetValue(l, out var v) ? v : (0, 0, 0, x, y, x, y);
                cells[l] = (c.Sx + x, c.Sy + y, c.N + 1, Math.Min(c.X0, x), Math.Min(c.Y0, y), Math.Max(c.X1, x), Math.Max(c.Y1, y));
            }
        double sumDev = 0, sumStep = 0; long nDev = 0, nStep = 0; int used = 0;
        var r = new double[n * rays];
        foreach (var (label, c) in cells)
        {
            if (c.X0 < 2 || c.Y0 < 2 || c.X1 > w - 3 || c.Y1 > h - 3) continue;
            double cx = c.Sx / c.N, cy = c.Sy / c.N, maxR = 2.0 * (c.X1 - c.X0 + c.Y1 - c.Y0 + 2);
            bool ok = true;
            for (int t = 0; t < n && ok; t++)
            {
                int s = Match(reference, segmented[t], label, c.N, c.X0, c.Y0, c.X1, c.Y1, w);
                if (s == 0) { ok = false; break; }
                for (int k = 0; k < rays && ok; k++)
                {
                    r[t * rays + k] = exit(t, s, cx, cy, 2 * Math.PI * k / rays, maxR);
                    ok = !double.IsNaN(r[t * rays + k]);
                }
            }
            if (!ok) continue;
            used++;
            for (int k = 0; k < rays; k++)
            {
                double mean = 0;
                for (int t = 0; t < n; t++) mean += r[t * rays + k];
                mean /= n;
                for (int t = 0; t < n; t++) { double d = r[t * rays + k] - mean; sumDev += d * d; nDev++; }
                for (int t = 0; t + 1 < n; t++) { double d = r[(t + 1) * rays + k] - r[t * rays + k]; sumStep += d * d; nStep++; }
            }
        }
        return new BoundaryJitter(nDev > 0 ? Math.Sqrt(sumDev / nDev) : double.NaN, nStep > 0 ? Math.Sqrt(sumStep / nStep) : double.NaN, used, n);
    }

    /// <summary>The segmented label covering more than half of reference cell <paramref name="label"/>, or 0.</summary>
    private static int Match(int[] reference, int[] seg, int label, int area, int x0, int y0, int x1, int y1, int w)
    {
        var count = new Dictionary<int, int>();
        for (int y = y0; y <= y1; y++)
            for (int x = x0; x <= x1; x++)
            {
                int i = y * w + x;
                if (reference[i] == label && seg[i] != 0) count[seg[i]] = count.GetValueOrDefault(seg[i]) + 1;
            }
        foreach (var (s, k) in count) if (2 * k > area) return s;
        return 0;
    }

    /// <summary>Distance along the ray from (cx, cy) at angle <paramref name="a"/> to its nearest crossing with an edge of the
    /// closed polygon <paramref name="poly"/>; NaN when it crosses an even number of edges (the start is outside).</summary>
    private static double PolygonExit(Point2[] poly, double cx, double cy, double a, double maxR)
    {
        double dx = Math.Cos(a), dy = Math.Sin(a), best = maxR;
        int crossings = 0;
        for (int i = 0; i < poly.Length; i++)
        {
            var p = poly[i]; var q = poly[(i + 1) % poly.Length];
            double ex = q.X - p.X, ey = q.Y - p.Y, den = dx * ey - dy * ex;
            if (den == 0) continue;
            double px = p.X - cx, py = p.Y - cy;
            double t = (px * ey - py * ex) / den, u = (px * dy - py * dx) / den;
            if (t > 0 && u >= 0 && u < 1) { crossings++; if (t < best) best = t; }
        }
        return crossings % 2 == 1 ? best : double.NaN;
    }

    /// <summary>Distance along the ray from (cx, cy) at angle <paramref name="a"/> to the first point outside object <paramref name="s"/> (steps of 1/64 px).</summary>
    private static double Exit(int[] seg, int s, int w, int h, double cx, double cy, double a, double maxR)
    {
        double dx = Math.Cos(a), dy = Math.Sin(a);
        const double step = 1.0 / 64;
        for (double d = 0; d < maxR; d += step)
        {
            int x = (int)Math.Floor(cx + d * dx + 0.5), y = (int)Math.Floor(cy + d * dy + 0.5);
            if (x < 0 || y < 0 || x >= w || y >= h || seg[y * w + x] != s) return d;
        }
        return maxR;
    }
}
