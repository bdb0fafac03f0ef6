using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

/// <summary>The exact Poisson (Garwood) interval of a count and of a rate (docs/motion.md#creation-and-annihilation).</summary>
public class PoissonIntervalTests
{
    /// <summary>
    /// Garwood's exact 95 % Poisson limits against the published table (e.g. Sahai H. and Khurshid A. (1993), Statistics
    /// in Medicine 12:1189; the Documenta Geigy tables; from memory): 0 events -> (0, 3.689), 1 -> (0.0253, 5.572),
    /// 10 -> (4.795, 18.39). Tolerance 1e-3: the tables give 3-4 significant digits.
    /// </summary>
    [Theory]
    [InlineData(0, 0.0, 3.689)]
    [InlineData(1, 0.0253, 5.572)]
    [InlineData(10, 4.795, 18.390)]
    public void Garwood_PublishedTable_Matches(int k, double low, double high)
    {
        var (lo, hi) = PoissonInterval.Garwood(k);
        Assert.Equal(low, lo, 1e-3);
        Assert.Equal(high, hi, 1e-3);
    }

    /// <summary>A rate is the count and its Garwood limits over the exposure; fewer than 5 events are too_few.</summary>
    [Fact]
    public void Rate_TenEventsOverExposure_ScaledGarwoodAndOk()
    {
        var e = PoissonInterval.Rate(10, 200);
        Assert.Equal(EstimateStatus.Ok, e.Status);
        Assert.Equal(0.05, e.Value, 12);
        Assert.Equal(4.795 / 200, e.Low, 1e-5);
        Assert.Equal(18.39 / 200, e.High, 1e-5);
        Assert.Equal(10, e.N);
        Assert.Equal(EstimateStatus.TooFew, PoissonInterval.Rate(4, 200).Status);
    }
}
