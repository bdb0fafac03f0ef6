using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

/// <summary>The multiplicity-weighted mean sum k_i x_i / sum k_i of a bootstrap resample (Efron and Tibshirani 1993,
/// ch. 6: a resample as multiplicities of the original units); values by hand.</summary>
public class WeightedMeanTests
{
    [Fact]
    public void WeightedMean_HandExample_Matches()
    {
        // (2 x 1 + 0 x 2 + 1 x 4) / (2 + 0 + 1) = 6 / 3 = 2
        Assert.Equal(2.0, Descriptive.WeightedMean([1.0, 2.0, 4.0], [2, 0, 1]), 15);
        // (3 x 0.5 + 1 x -1.5) / 4 = 0
        Assert.Equal(0.0, Descriptive.WeightedMean([0.5, -1.5], [3, 1]), 15);
    }

    [Fact]
    public void WeightedMean_AllOnes_IsPlainMean()
    {
        double[] x = [1.5, 2.25, -0.75, 10];
        Assert.Equal(Descriptive.Mean(x), Descriptive.WeightedMean(x, [1, 1, 1, 1]), 15);
    }

    [Fact]
    public void WeightedMean_ZeroCounts_NaN()
    {
        Assert.True(double.IsNaN(Descriptive.WeightedMean([1.0, 2.0], [0, 0])));
        Assert.True(double.IsNaN(Descriptive.WeightedMean([], [])));
    }

    [Fact]
    public void WeightedMean_LengthMismatch_Throws() =>
        Assert.Throws<ArgumentException>(() => Descriptive.WeightedMean([1.0, 2.0], [1]));
}
