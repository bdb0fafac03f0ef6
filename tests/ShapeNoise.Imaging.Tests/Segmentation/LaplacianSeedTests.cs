using OpenCvSharp;
using ShapeNoise.Imaging.Segmentation;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Segmentation;

public class LaplacianSeedTests(ITestOutputHelper log)
{
    [Theory]
    [InlineData(1.5)]
    [InlineData(2.2)]
    [InlineData(3.0)]
    public void LaplacianOfGaussian_WhiteNoise_SdIsTheNoiseGainAndNearTheContinuousNorm(double sigma)
    {
        // The seed depth of docs/segmentation.md#laplacian-seeds is in noise sd of L = -s^2 lap(G_s * F). Handbook Gaussian
        // integrals: for the continuous filter, int (lap G_s)^2 d2x = 1 / (2 pi s^6), so white noise of unit sd leaves it
        // with sd s^2 / (s^3 sqrt(2 pi)) = 1 / (s sqrt(2 pi)). The sampled filter (OpenCV's Gaussian, then its 3 x 3
        // Laplacian) is checked against that within 0.2 / s^2 (the stencil's truncation error falls as 1/s^2; measured
        // -7.8, -3.8 and -2.0 % at s = 1.5, 2.2 and 3 px), and against the sd of filtered white noise (Parseval;
        // 512 x 512 px, about 5000 independent patches at s = 3 px: 3 %).
        var rng = new Random(17);
        const int n = 512;
        var noise = new float[n * n];
        for (int i = 0; i < noise.Length; i++) noise[i] = (float)MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
        using var img = new Mat(n, n, MatType.CV_32FC1);
        img.SetArray(noise);
        var (l, gain) = JunctionSegmenter.LaplacianOfGaussian(img, sigma);
        double ss = 0; int count = 0, edge = (int)Math.Ceiling(4 * sigma) + 2;
        for (int y = edge; y < n - edge; y++)
            for (int x = edge; x < n - edge; x++) { ss += (double)l[y * n + x] * l[y * n + x]; count++; }
        double measured = Math.Sqrt(ss / count), continuous = 1 / (sigma * Math.Sqrt(2 * Math.PI));
        log.WriteLine($"sigma {sigma}: gain {gain:F5}, filtered noise sd {measured:F5}, continuous {continuous:F5} ({gain / continuous - 1:P1})");
        Assert.Equal(gain, measured, gain * 0.03);
        Assert.Equal(continuous, gain, continuous * 0.2 / (sigma * sigma));
    }

    [Fact]
    public void LaplacianOfGaussian_DarkDiscInBrightRing_ValleyInsideRidgeOnTheRing()
    {
        // A cell interior is dark and its junctions bright: at a scale below the cell's radius, L = -s^2 lap(G_s * F) is
        // positive on the bright ring (a ridge: negative second derivative across it) and negative just inside it, so
        // the interior is one closed valley whose minimum, the seed, lies inside the disc.
        const int n = 41, c = 20;
        var f = new float[n * n];
        for (int y = 0; y < n; y++)
            for (int x = 0; x < n; x++)
            {
                double r = Math.Sqrt((x - c) * (x - c) + (y - c) * (y - c));
                f[y * n + x] = r < 6 ? 1f : r < 7.5 ? 3f : 1f;
            }
        using var img = new Mat(n, n, MatType.CV_32FC1);
        img.SetArray(f);
        var (l, _) = JunctionSegmenter.LaplacianOfGaussian(img, 0.18 * 13);
        int best = 0;
        for (int i = 1; i < l.Length; i++) if (l[i] < l[best]) best = i;
        double rb = Math.Sqrt(Math.Pow(best % n - c, 2) + Math.Pow(best / n - c, 2));
        Assert.True(rb < 6, $"minimum at {rb:F1} px from the centre");
        Assert.True(l[c * n + c + 7] > 0 && l[(c + 7) * n + c] > 0, "L on the ring must be positive");
        Assert.True(l[best] < 0);
    }
}
