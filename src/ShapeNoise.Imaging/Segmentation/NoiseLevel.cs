namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Noise level of an image (docs/segmentation.md#noise-level).</summary>
public static class NoiseLevel
{
    /// <summary>
    /// Robust white-noise sd: σ = 1.4826 median |N * I| / 6, with N the 3 x 3 mask [1 −2 1; −2 4 −2; 1 −2 1] (the
    /// difference of two Laplacians, blind to planes and nearly blind to smooth structure; its coefficients' root sum of
    /// squares is 6) applied at every interior pixel.
    /// </summary>
    /// <remarks>Immerkær J. (1996), "Fast noise variance estimation", Computer Vision and Image Understanding
    /// 64(2):300-302; the median absolute value (scaled by 1.4826 for a Gaussian) replaces the mean so that junction
    /// pixels, a minority, do not inflate the estimate (Hampel F.R. (1974), JASA 69:383-393).</remarks>
    public static double Estimate(ReadOnlySpan<float> img, int w, int h)
    {
        if (w < 3 || h < 3) return 0;
        var r = new float[(w - 2) * (h - 2)];
        int k = 0;
        for (int y = 1; y < h - 1; y++)
            for (int x = 1; x < w - 1; x++)
            {
                int i = y * w + x;
                double v = img[i - w - 1] - 2 * img[i - w] + img[i - w + 1]
                         - 2 * img[i - 1] + 4 * img[i] - 2 * img[i + 1]
                         + img[i + w - 1] - 2 * img[i + w] + img[i + w + 1];
                r[k++] = (float)Math.Abs(v);
            }
        Array.Sort(r);
        return 1.4826 * r[r.Length / 2] / 6;
    }

    /// <summary>Sd of white noise of sd <paramref name="sd"/> after a 2-D Gaussian blur of <paramref name="sigmaPx"/>:
    /// sd / (2 sqrt(π) σ) (the blur kernel's L2 norm), for σ ≥ 0.5 px.</summary>
    public static double AfterBlur(double sd, double sigmaPx) => sd / (2 * Math.Sqrt(Math.PI) * Math.Max(0.5, sigmaPx));
}
