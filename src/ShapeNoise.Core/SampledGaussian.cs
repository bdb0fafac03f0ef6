namespace ShapeNoise;

/// <summary>
/// Blur by a sampled, normalised Gaussian (taps w_k = exp(−k²/2σ²) / Σ w, |k| ≤ ⌈3σ⌉), separable, edges replicated: the
/// blur of the junction renderer's point-spread function (docs/segmentation.md#render-family) and of the segmentation's
/// junction model (docs/segmentation.md#junction-model-fit), which must agree.
/// </summary>
/// <remarks>Each output adds its taps in the order k = −r..r starting from 0, the horizontal pass per pixel and the vertical
/// pass a whole row per tap (<see cref="SpanMath.AddScaled"/>, not fused): the same rounding as a per-pixel double loop.</remarks>
public static class SampledGaussian
{
    /// <summary>The normalised taps w_−r..w_r, r = ⌈3σ⌉ (at least 1 tap each side).</summary>
    public static double[] Kernel(double sigmaPx)
    {
        int r = Math.Max(1, (int)Math.Ceiling(3 * sigmaPx));
        var g = new double[2 * r + 1];
        double sum = 0;
        for (int i = -r; i <= r; i++) { g[i + r] = Math.Exp(-0.5 * i * i / (sigmaPx * sigmaPx)); sum += g[i + r]; }
        for (int i = 0; i < g.Length; i++) g[i] /= sum;
        return g;
    }

    /// <summary>The row-major <paramref name="f"/> (<paramref name="w"/> x <paramref name="h"/>) blurred by <paramref name="kernel"/>
    /// (from <see cref="Kernel"/>), as a new array.</summary>
    public static double[] Blur(ReadOnlySpan<double> f, int w, int h, double[] kernel)
    {
        int r = kernel.Length / 2;
        var tmp = new double[f.Length]; var o = new double[f.Length];
        for (int y = 0; y < h; y++)
        {
            var src = f.Slice(y * w, w);
            var dst = tmp.AsSpan(y * w, w);
            for (int x = 0; x < w; x++)
            {
                double s = 0;
                if (x >= r && x < w - r)
                    for (int k = -r; k <= r; k++) s += kernel[k + r] * src[x + k];
                else
                    for (int k = -r; k <= r; k++) s += kernel[k + r] * src[Math.Clamp(x + k, 0, w - 1)];
                dst[x] = s;
            }
        }
        for (int y = 0; y < h; y++)
        {
            var dst = o.AsSpan(y * w, w);
            for (int k = -r; k <= r; k++) SpanMath.AddScaled(dst, tmp.AsSpan(Math.Clamp(y + k, 0, h - 1) * w, w), kernel[k + r]);
        }
        return o;
    }
}
