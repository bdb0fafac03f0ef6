using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

/// <summary>
/// NIST Statistical Reference Datasets, univariate summary statistics (itl.nist.gov/div898/strd), "lower difficulty"
/// NumAcc1 and "average/higher difficulty" NumAcc2-4. The data are constructed (a centre value, then 500 pairs of
/// centre-0.1 / centre+0.1 for NumAcc2-4) and the certified values are mean = centre, sample SD = 1 (NumAcc1) or 0.1,
/// lag-1 autocorrelation -0.5 (NumAcc1) or -0.999. Data construction and certified values recalled from memory of the
/// NIST pages; each is also re-derivable by hand from the construction.
/// </summary>
public class DescriptiveTests
{
    private static double[] NumAcc(double centre)
    {
        var y = new double[1001];
        y[0] = centre;
        for (int i = 0; i < 500; i++) { y[1 + 2 * i] = centre - 0.1; y[2 + 2 * i] = centre + 0.1; }
        return y;
    }

    [Fact]
    public void Statistics_NistNumAcc1_MatchCertifiedValues()
    {
        double[] y = [10000001, 10000003, 10000002];
        Assert.Equal(10000002.0, Descriptive.Mean(y), 9);
        Assert.Equal(1.0, Descriptive.StandardDeviation(y), 12);
        Assert.Equal(-0.5, Descriptive.Lag1Autocorrelation(y), 12);
    }

    // Tolerance: the inputs themselves carry representation error ~ulp(centre)/2 (1e-16 relative at 1.2, 9e-10 absolute at
    // 1e7), which sets how close the 0.1 deviations can be; NIST grades by log relative error (LRE), and we require LRE >= 7.
    [Theory]
    [InlineData("NumAcc2", 1.2)]
    [InlineData("NumAcc3", 1000000.2)]
    [InlineData("NumAcc4", 10000000.2)]
    public void Statistics_NistNumAcc2To4_MatchCertifiedValuesToLre7(string dataset, double centre)
    {
        var y = NumAcc(centre);
        Assert.True(Lre(Descriptive.Mean(y), centre) >= 7, $"{dataset} mean");
        Assert.True(Lre(Descriptive.StandardDeviation(y), 0.1) >= 7, $"{dataset} sd {Descriptive.StandardDeviation(y):R}");
        Assert.True(Lre(Descriptive.Lag1Autocorrelation(y), -0.999) >= 7, $"{dataset} r1");
    }

    private static double Lre(double x, double c) => x == c ? 16 : -Math.Log10(Math.Abs(x - c) / Math.Abs(c));

    [Fact]
    public void Median_EvenAndOdd_MatchDefinition()
    {
        Assert.Equal(2.5, Descriptive.Median([4, 1, 3, 2]));
        Assert.Equal(3.0, Descriptive.Median([5, 3, 1]));
    }

    [Fact]
    public void QuantileSorted_Type7_MatchesMathNet()
    {
        // Reference library: MathNet.Numerics SortedArrayStatistics.QuantileCustom with QuantileDefinition.R7 (Hyndman-Fan type 7, R's default).
        var rng = new Random(2);
        var x = Enumerable.Range(0, 37).Select(_ => rng.NextDouble()).OrderBy(v => v).ToArray();
        foreach (var p in new[] { 0.025, 0.5, 0.975 })
            Assert.Equal(MathNet.Numerics.Statistics.SortedArrayStatistics.QuantileCustom(x, p, MathNet.Numerics.Statistics.QuantileDefinition.R7), Descriptive.QuantileSorted(x, p), 12);
    }
}
