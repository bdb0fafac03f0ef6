using System.Diagnostics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Fluctuations;

/// <summary>
/// Coverage study of the within-movie interval of the pooled anisotropy var_L / var_W on a correlated confluent tissue
/// (docs/statistics.md#within-movie-intervals). Design (common practice for checking an interval procedure): many seeded
/// replications of a synthetic tissue with a known estimand, one interval per replication, and the fraction of intervals
/// that contain the estimand compared with the nominal 95 %. The spatial block bootstrap resamples blocks of neighbouring
/// cells (Künsch H.R. (1989), Ann. Statist. 17:1217-1241; Lahiri S.N. (2003), Resampling Methods for Dependent Data,
/// Springer, ch. 12) and should cover about 95 %; the bootstrap over tracks treats correlated cells as independent and
/// should cover less.
/// </summary>
public class SpatialBlocksCoverageTests(ITestOutputHelper output)
{
    internal static readonly TissueOptions Correlated = new(KernelPx: 12, ModulationLog: 0.3);

    internal sealed record CoverageResult(int Replications, int BlockCovers, int TrackCovers, double MeanXiPx, double MeanBlocks, double ElapsedS);

    internal static CoverageResult Run(TissueOptions o, int replications, int resamples, int firstSeed = 1000)
    {
        var sw = Stopwatch.StartNew();
        double truth = o.TrueAnisotropy;
        int block = 0, track = 0; double xiSum = 0, unitsSum = 0;
        // The interval procedure is under test, not the noise model: the pooled sample ratio (--noise-model modes; the
        // tissue has no measurement noise), so each resample is a ratio of means rather than a refit.
        var options = new PoolingOptions(resamples, 1, NoiseModel.Modes);
        for (int r = 0; r < replications; r++)
        {
            var tracks = CorrelatedTissue.Generate(o, firstSeed + r);
            var spatial = SpatialBlocks.For(tracks, 1.0, resamples, 7 + r);
            var overTracks = ResamplingPlan.OverTracks(tracks.Count, resamples, 7 + r);
            var b = Pooling.Of(tracks, 4, options, null, spatial.Plan).Anisotropy;
            var t = Pooling.Of(tracks, 4, options, null, overTracks).Anisotropy;
            if (b.IsOk && b.Low <= truth && truth <= b.High) block++;
            if (t.IsOk && t.Low <= truth && truth <= t.High) track++;
            xiSum += spatial.CorrelationLengthPx; unitsSum += spatial.Plan.Units;
        }
        return new CoverageResult(replications, block, track, xiSum / replications, unitsSum / replications, sw.Elapsed.TotalSeconds);
    }

    [Fact]
    public void For_CorrelatedConfluentTissue_BlockBootstrapCoversFarMoreThanTrackBootstrap()
    {
        // 100 seeded replications (binomial sd of a coverage near 90 % over 100 replications: sqrt(0.9 x 0.1 / 100) = 3 %);
        // 400 resamples each (percentile intervals; Efron and Tibshirani 1993, ch. 13). About 14 s in Debug.
        // Tissue: 576 cells, a = 16 px, T = 40, tau = 4 frames, kernel l = 12 px (generator 1/e distance 2 l = 24 px), between-
        // region modulation g = 0.3 (see CorrelatedTissue).
        // Measured (docs/statistics.md#within-movie-intervals): with the block-edge correction (Bootstrap.EdgeInflation,
        // docs/statistics.md#block-edges) block 92 %, track 60 % on seeds 1000-1099 (uncorrected blocks: 85 %); over seeds
        // 5000-5299 block 95.0 %, track 59 %. The band asserted is the 90-99 %; the track bootstrap must be at least
        // 10 points worse.
        var o = Correlated;
        var res = Run(o, 100, 400);
        double blockCov = res.BlockCovers / (double)res.Replications, trackCov = res.TrackCovers / (double)res.Replications;
        output.WriteLine($"truth {o.TrueAnisotropy:0.###}; replications {res.Replications}; block coverage {blockCov:P0} " +
                         $"(mean xi {res.MeanXiPx:0.0} px vs generator 1/e distance {o.TrueCorrelationLengthPx:0.0} px, mean blocks {res.MeanBlocks:0.0}); " +
                         $"track coverage {trackCov:P0}; {res.ElapsedS:0.0} s");
        Assert.InRange(blockCov, 0.90, 0.99);
        Assert.True(trackCov < blockCov - 0.10, $"track {trackCov:P0} vs block {blockCov:P0}");
        Assert.InRange(res.MeanXiPx / o.TrueCorrelationLengthPx, 1 / 1.3, 1.3);
    }
}
