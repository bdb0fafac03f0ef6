using OpenCvSharp;
using ShapeNoise.Imaging.Segmentation;

namespace ShapeNoise.Tests.Segmentation;

/// <summary>Richardson-Lucy deconvolution and its noise transfer (docs/segmentation.md#deconvolution).</summary>
public class DeconvolutionTests
{
    [Theory]
    [InlineData(0.6)]
    [InlineData(1.0)]
    [InlineData(2.0)]
    public void NoiseGain_NoIterations_KernelL2NormByParseval(double sigma)
    {
        // Parseval: the mean of |B(w)|^2 over the frequency square equals the sum of the squared kernel weights, computed
        // here in the spatial domain from the sampled, normalised 2-D Gaussian (|k|, |l| <= 4 sigma).
        int r = (int)Math.Ceiling(4 * sigma);
        double norm = 0, sq = 0;
        for (int k = -r; k <= r; k++) norm += Math.Exp(-0.5 * k * k / (sigma * sigma));
        for (int k = -r; k <= r; k++)
            for (int l = -r; l <= r; l++) { double w = Math.Exp(-0.5 * (k * k + l * l) / (sigma * sigma)) / (norm * norm); sq += w * w; }
        Assert.Equal(Math.Sqrt(sq), Deconvolution.NoiseGain(1.2, 0, sigma), 1e-6);
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(2.0)]
    public void NoiseGain_NoIterations_ContinuousGaussianL2Norm(double sigma)
    {
        // Handbook: a continuous 2-D Gaussian of sd s has L2 norm 1 / (2 sqrt(pi) s); the sampled kernel agrees within 1 %
        // for s >= 1 px (at 0.6 px it is 5 % larger, which is why the transfer uses the sampled kernel).
        double expected = 1 / (2 * Math.Sqrt(Math.PI) * sigma);
        Assert.Equal(expected, Deconvolution.NoiseGain(1.2, 0, sigma), expected * 0.01);
    }

    [Theory]
    [InlineData(1.2, 8, 0.8)]
    [InlineData(1.5, 8, 1.2)]
    [InlineData(0.8, 3, 0.6)]
    public void NoiseGain_WhiteNoiseThroughRichardsonLucy_MatchesMeasuredSd(double psf, int iterations, double blur)
    {
        // The linearised transfer against the nonlinear iteration itself: a uniform image of 1 with white Gaussian noise of
        // sd 0.01 (small, so the linearisation holds), deconvolved and blurred; the measured sd of the result over the
        // interior must match sd x NoiseGain within 5 % (the sampling error of the sd of 65 000 correlated pixels is ~1 %).
        const int n = 320; const double sd = 0.01;
        var rng = new Random(5);
        var f = new float[n * n];
        for (int i = 0; i < f.Length; i++) f[i] = (float)(1 + sd * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1));
        using var img = new Mat(n, n, MatType.CV_32FC1);
        System.Runtime.InteropServices.Marshal.Copy(f, 0, img.Data, f.Length);
        Deconvolution.RichardsonLucy(img, psf, iterations);
        using var b = new Mat();
        Cv2.GaussianBlur(img, b, new Size(0, 0), blur);
        var g = new float[n * n];
        System.Runtime.InteropServices.Marshal.Copy(b.Data, g, 0, g.Length);
        double s = 0, s2 = 0; int m = 0;
        for (int y = 30; y < n - 30; y++)
            for (int x = 30; x < n - 30; x++) { double v = g[y * n + x]; s += v; s2 += v * v; m++; }
        double measured = Math.Sqrt(s2 / m - (s / m) * (s / m));
        double predicted = sd * Deconvolution.NoiseGain(psf, iterations, blur);
        Assert.InRange(measured / predicted, 0.95, 1.05);
    }

    [Fact]
    public void RichardsonLucy_BlurredLine_KeepsFluxAndNarrows()
    {
        // Lucy (1974): each iteration keeps the total flux (sum of u equals sum of d for a normalised kernel), and on an image
        // that really is K * (sharp image) the iteration moves towards the sharp image: a one-pixel line blurred by
        // sigma 1.5 px gets a higher peak and a smaller second moment across the line.
        const int n = 64;
        var f = new float[n * n];
        for (int y = 0; y < n; y++) f[y * n + 32] = 1;
        using var img = new Mat(n, n, MatType.CV_32FC1);
        System.Runtime.InteropServices.Marshal.Copy(f, 0, img.Data, f.Length);
        Cv2.GaussianBlur(img, img, new Size(0, 0), 1.5, 1.5, BorderTypes.Reflect101);
        Cv2.Add(img, 0.01, img);   // RL needs positive data
        double before = Cv2.Sum(img).Val0;
        var (peak0, var0) = Profile(img, n);
        Deconvolution.RichardsonLucy(img, 1.5, 8);
        var (peak1, var1) = Profile(img, n);
        Assert.Equal(before, Cv2.Sum(img).Val0, before * 1e-3);
        Assert.True(peak1 > 1.3 * peak0, $"peak {peak0:F3} -> {peak1:F3}");
        Assert.True(var1 < 0.8 * var0, $"second moment {var0:F3} -> {var1:F3} px^2");
    }

    private static (double Peak, double SecondMoment) Profile(Mat img, int n)
    {
        var row = new float[n];
        System.Runtime.InteropServices.Marshal.Copy(img.Data + 32 * n * sizeof(float), row, 0, n);
        double peak = row.Max(), w = 0, m2 = 0;
        for (int x = 0; x < n; x++) { double v = row[x] - 0.01; w += v; m2 += v * (x - 32) * (x - 32); }
        return (peak, m2 / w);
    }
}
