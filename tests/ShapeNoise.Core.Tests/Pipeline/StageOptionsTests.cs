using ShapeNoise.TimeSeries;
using ShapeNoise.Dynamics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>Stage option records check themselves on construction; the ranges are the spec's option table
/// (docs/measures.md#3-tracking for --max-gap >= 0 and --link-overlap in (0, 1]; README's option list for the rest).</summary>
public class StageOptionsTests
{
    [Fact]
    public void TrackingOptions_NegativeMaxGap_ThrowsNamingTheProperty()
    {
        var e = Assert.Throws<ArgumentException>(() => new TrackingOptions(maxGapFrames: -1));
        Assert.StartsWith("MaxGapFrames must be >= 0", e.Message);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(1.5)]
    [InlineData(double.NaN)]
    public void TrackingOptions_OverlapOutsideUnitInterval_Throws(double f)
        => Assert.StartsWith("LinkOverlapFraction", Assert.Throws<ArgumentException>(() => new TrackingOptions(linkOverlapFraction: f)).Message);

    [Fact]
    public void StageOptions_OutOfRange_EachThrowsNamingItsProperty()
    {
        Assert.StartsWith("MinAreaPx", Assert.Throws<ArgumentException>(() => new OutlineOptions(minAreaPx: 2)).Message);
        Assert.StartsWith("BorderMarginPx", Assert.Throws<ArgumentException>(() => new OutlineOptions(borderMarginPx: -1)).Message);
        Assert.StartsWith("BootstrapResamples", Assert.Throws<ArgumentException>(() => new PoolingOptions(bootstrapResamples: -1)).Message);
        Assert.StartsWith("MaxLagFrames", Assert.Throws<ArgumentException>(() => new DynamicsOptions(maxLagFrames: 1)).Message);
    }

    [Fact]
    public void AnalysisOptions_StageRecords_CarryTheFlatValues()
    {
        var o = new AnalysisOptions { MaxGapFrames = 2, MinTrackFrames = 7, LinkOverlapFraction = 0.4, BootstrapResamples = 12, Seed = 5, MaxLagFrames = 9 };
        Assert.Equal((0.4, 2, 7), (o.ForTracking.LinkOverlapFraction, o.ForTracking.MaxGapFrames, o.ForTracking.MinTrackFrames));
        Assert.Equal((12, 5), (o.ForPooling.BootstrapResamples, o.ForPooling.Seed));
        Assert.Equal((9, 12, 5), (o.ForDynamics.MaxLagFrames, o.ForDynamics.BootstrapResamples, o.ForDynamics.Seed));
        Assert.StartsWith("MinTrackFrames", Assert.Throws<ArgumentException>(() => (o with { MinTrackFrames = 2 }).Validated()).Message);
    }
}
