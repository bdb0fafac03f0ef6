using ShapeNoise.TimeSeries;
using ShapeNoise.Dynamics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Fluctuations;

/// <summary>
/// Coverage of the fitted correlation time of the cell length on the spatially correlated tissue of
/// <see cref="SpatialBlocksCoverageTests"/> (truth: the generator's AR(1) time, 4 frames): spatial blocks with the
/// delete-one-block jackknife edge correction (docs/statistics.md#block-edges) against the bootstrap over tracks.
/// Coverage study design: common practice. Measured (seeds 1000-1099): with 300 resamples edge-corrected blocks 91 %,
/// uncorrected blocks 88 %, tracks 73 % (signal variance 90 %, uncorrected 88 %); with the 200 resamples used here
/// blocks 93 %, tracks 72 %.
/// </summary>
public class FittedTimeCoverageTests(ITestOutputHelper output)
{
    [Fact]
    public void Run_CorrelatedTissue_BlockIntervalOfTauCoversNearNominal()
    {
        var o = SpatialBlocksCoverageTests.Correlated;
        const int reps = 100;
        int block = 0, track = 0;
        for (int r = 0; r < reps; r++)
        {
            var tracks = CorrelatedTissue.Generate(o, 1000 + r);
            var plan = SpatialBlocks.For(tracks, 1.0, 200, 7 + r).Plan;
            var b = DynamicsAnalysis.Run(tracks, new DynamicsOptions(20, 200, 1), plan).Coordinates[0].TauFrames;
            var t = DynamicsAnalysis.Run(tracks, new DynamicsOptions(20, 200, 1), ResamplingPlan.OverTracks(tracks.Count, 200, 7 + r)).Coordinates[0].TauFrames;
            if (b.IsOk && b.Low <= o.TauFrames && o.TauFrames <= b.High) block++;
            if (t.IsOk && t.Low <= o.TauFrames && o.TauFrames <= t.High) track++;
        }
        output.WriteLine($"tau_length coverage: blocks {block}/{reps}, tracks {track}/{reps}");
        // 0.85: nominal 95 % minus the uncorrected-block shortfall seen for the pooled ratio (docs/statistics.md#block-edges)
        // and 3 binomial sd of 100 replications; the tracks must be clearly worse.
        Assert.InRange(block / (double)reps, 0.85, 0.99);
        Assert.True(track < block - 8, $"tracks {track} vs blocks {block}");
    }
}
