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

    [Fact]
    public void WithResolutionLimit_TauAboveLongestTrack_AtUpperBoundScaledWithUnit()
    {
        // The documented rule (docs/dynamics.md#fitted-times-at-a-search-bound-at_bound), hand cases: an ok tau of 120 frames
        // on tracks of at most 80 frames is at_bound (upper, bound 80), converted to minutes (2 min/frame) with the value;
        // 50 frames stays ok; an estimate that is not ok keeps its status.
        var e = Estimate.Judged(120, 100, 150, 40, "tracks").WithResolutionLimit(80);
        Assert.Equal(EstimateStatus.AtBound, e.Status);
        Assert.Equal(BoundSide.Upper, e.Bound);
        Assert.Equal(160, e.Scale(2).BoundValue);
        Assert.Equal(EstimateStatus.Ok, Estimate.Judged(50, 40, 60, 40, "tracks").WithResolutionLimit(80).Status);
        Assert.Equal(EstimateStatus.TooFew, Estimate.Judged(120, 100, 150, 3, "tracks").WithResolutionLimit(80).Status);
    }
}
