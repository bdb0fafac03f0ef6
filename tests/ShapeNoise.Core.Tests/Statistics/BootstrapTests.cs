using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

public class BootstrapTests
{
    private static double MeanOf(double[] x, int[] k) { double s = 0, n = 0; for (int i = 0; i < x.Length; i++) { s += k[i] * x[i]; n += k[i]; } return s / n; }

    [Fact]
    public void Percentile_SameSeed_SameInterval()
    {
        var rng = new Random(1);
        var x = Enumerable.Range(0, 50).Select(_ => rng.NextDouble()).ToArray();
        var a = Bootstrap.Percentile(x.Length, k => MeanOf(x, k), 500, 42);
        var b = Bootstrap.Percentile(x.Length, k => MeanOf(x, k), 500, 42);
        Assert.Equal(a, b);
        var c = Bootstrap.Percentile(x.Length, k => MeanOf(x, k), 500, 43);
        Assert.NotEqual(a.Low, c.Low);
    }

    [Fact]
    public void Percentile_MeanOfNormalSample_WidthMatchesStandardError()
    {
        // Textbook: the 95% interval of a mean is about +-1.96 s / sqrt(n) wide (normal approximation).
        var rng = new Random(9);
        var x = Enumerable.Range(0, 400).Select(_ => MathNet.Numerics.Distributions.Normal.Sample(rng, 3, 2)).ToArray();
        var e = Bootstrap.Percentile(x.Length, k => MeanOf(x, k), 2000, 7);
        double expected = 2 * 1.96 * Descriptive.StandardDeviation(x) / Math.Sqrt(x.Length);
        Assert.InRange((e.High - e.Low) / expected, 0.85, 1.15);   // Monte Carlo error of 2000 resamples ~ +-5%
        Assert.True(e.Low < e.Value && e.Value < e.High);
    }
}
