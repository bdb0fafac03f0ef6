using OpenCvSharp;

namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Richardson-Lucy deconvolution of the flattened junction image with a Gaussian point-spread function, and the
/// noise it passes on (docs/segmentation.md#deconvolution).</summary>
/// <remarks>Richardson W.H. (1972), "Bayesian-based iterative method of image restoration", J. Opt. Soc. Am. 62:55-59;
/// Lucy L.B. (1974), "An iterative technique for the rectification of observed distributions", Astron. J. 79:745-754.
/// Linearised about a uniform image the iteration is Landweber's (Landweber L. (1951), Am. J. Math. 73:615-624), which
/// gives the noise transfer of <see cref="NoiseGain"/>.</remarks>
public static class Deconvolution
{
    /// <summary>Replaces <paramref name="image"/> (positive, float) by <paramref name="iterations"/> Richardson-Lucy steps
    /// u ← u · K ∗ (d / K ∗ u) from u = d, with K a Gaussian of <paramref name="psfSigmaPx"/> (symmetric, so K^T = K).</summary>
    public static void RichardsonLucy(Mat image, double psfSigmaPx, int iterations)
    {
        using var d = image.Clone();
        using var blur = new Mat();
        using var ratio = new Mat();
        using var corr = new Mat();
        for (int it = 0; it < iterations; it++)
        {
            Cv2.GaussianBlur(image, blur, new Size(0, 0), psfSigmaPx);
            Cv2.Max(blur, 1e-6, blur);
            Cv2.Divide(d, blur, ratio);
            Cv2.GaussianBlur(ratio, corr, new Size(0, 0), psfSigmaPx);
            Cv2.Multiply(image, corr, image);
        }
    }

    /// <summary>
    /// Sd of the output per unit sd of white input noise, for <paramref name="iterations"/> Richardson-Lucy steps with a
    /// Gaussian PSF of <paramref name="psfSigmaPx"/> followed by a Gaussian blur of <paramref name="blurSigmaPx"/>:
    /// sqrt(mean over ω ∈ [−π, π)² of |H(ω)|²) with H = [(1 − G²)^N + (1 − (1 − G²)^N) / G] B (the iteration linearised
    /// about a uniform image: e ← (1 − K²) e + K n from e = n), G and B the transfer functions of the sampled, normalised
    /// Gaussian kernels the blurs use (separable: G(ωx, ωy) = g(ωx) g(ωy), g(ω) = Σ_k w_k cos kω / Σ_k w_k,
    /// w_k = exp(−k²/2σ²), |k| ≤ 4σ). Without deconvolution (N = 0) it is the blur's L2 norm, close to 1 / (2 √π σ).
    /// </summary>
    public static double NoiseGain(double psfSigmaPx, int iterations, double blurSigmaPx)
    {
        const int n = 128;
        var gp = Transfer(psfSigmaPx, n);
        var gb = Transfer(blurSigmaPx, n);
        double sum = 0;
        for (int a = 0; a < n; a++)
            for (int b = 0; b < n; b++)
            {
                double g = gp[a] * gp[b];
                double hr = 1;
                if (iterations > 0)
                {
                    double q = Math.Pow(1 - g * g, iterations);
                    hr = Math.Abs(g) < 1e-9 ? q + iterations * g : q + (1 - q) / g;   // (1 - q) / g -> N g as g -> 0
                }
                double h = hr * gb[a] * gb[b];
                sum += h * h;
            }
        return Math.Sqrt(sum / (n * n));
    }

    /// <summary>DTFT of the sampled, normalised 1-D Gaussian kernel of <paramref name="sigmaPx"/> at ω = −π + 2π (a + ½) / n.</summary>
    private static double[] Transfer(double sigmaPx, int n)
    {
        int r = Math.Max(1, (int)Math.Ceiling(4 * sigmaPx));
        var w = new double[r + 1];
        double norm = 0;
        for (int k = 0; k <= r; k++) { w[k] = Math.Exp(-0.5 * k * k / (sigmaPx * sigmaPx)); norm += k == 0 ? w[k] : 2 * w[k]; }
        var g = new double[n];
        for (int a = 0; a < n; a++)
        {
            double om = -Math.PI + 2 * Math.PI * (a + 0.5) / n, v = w[0];
            for (int k = 1; k <= r; k++) v += 2 * w[k] * Math.Cos(k * om);
            g[a] = v / norm;
        }
        return g;
    }
}
