using System.Collections.Concurrent;
using ShapeNoise.Comparison;
using ShapeNoise.Motion;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Core.Tests.Motion;

/// <summary>
/// Recovery of the collective-motion measures from synthetic flock and swirl movies (invented data, compared with their
/// own imposed flows; docs/motion.md#synthetic-flows). Shape noise is kept small (2 % / 1 %) so that the cells' own
/// jitter from the packing's relaxation (about 0.16 px/frame, measured from truth.json's realised speeds) stays well below
/// the imposed 0.4 px/frame; the flows decorrelate in 4 frames so that 60 frames hold enough independent time blocks.
/// </summary>
public class FlowRecoveryTests(ITestOutputHelper log)
{
    private static readonly ConcurrentDictionary<(TissueFlow, int), (MonolayerMovie Movie, AnalysisResult Result)> Cache = new();

    private static (MonolayerMovie Movie, AnalysisResult Result) Run(TissueFlow kind, int seed) => Cache.GetOrAdd((kind, seed), k =>
    {
        var o = new MonolayerMovieOptions
        {
            Cells = 500, Frames = 60, Seed = 100 + seed, Motion = DefectMotion.None, Flow = k.Item1, SigmaAlong = 0.02, SigmaAcross = 0.01,
            FlowSpeedPx = k.Item1 == TissueFlow.Flock ? 1.0 : 0, FlowNoise = k.Item1 == TissueFlow.Flock ? 0.4 : null,
            FlowRmsPx = k.Item1 == TissueFlow.Swirl ? 0.4 : null, FlowTauFrames = 4,
        };
        var m = MonolayerMovie.Generate(o);
        var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, m.Frames().ToList()), new AnalysisOptions { BootstrapResamples = 200 });
        return (m, r);
    });

    [Theory]
    [InlineData(TissueFlow.Flock)]
    [InlineData(TissueFlow.Swirl)]
    public void Run_FlockOrSwirl_RecoversPolarOrderRmsSpeedAndCorrelationLength(TissueFlow kind)
    {
        var (movie, r) = Run(kind, 1);
        var truth = movie.FlowStatistics();
        var m = r.Motion;
        log.WriteLine($"{kind}: phi {m.PolarOrder.Value:F3} (truth {truth.PolarOrder:F3}), rms {m.RmsSpeed.Value:F3} px/frame (imposed {truth.RmsSpeedPx:F3}), "
            + $"first zero {m.VelocityCorrelationLength.Value:F1} px (imposed field {truth.FirstZeroPx:F1}), n = {m.PolarOrder.N} time blocks");
        Assert.Equal(EstimateStatus.Ok, m.PolarOrder.Status);
        // Issue 15's thresholds: a flock above 0.85, swirls below 0.3.
        if (kind == TissueFlow.Flock) Assert.True(m.PolarOrder.Value > 0.85); else Assert.True(m.PolarOrder.Value < 0.3);
        // rms speed about the frame mean (drift removed) within 15 % of the imposed flow's.
        Assert.InRange(m.RmsSpeed.Value / truth.RmsSpeedPx, 0.85, 1.15);
        // The velocity correlation length (first zero of C_vv) from the cells within 15 % of the imposed field's (both
        // flows' fluctuations are single-wavenumber fields, C_vv = J0(kr); Abramowitz and Stegun table 9.5).
        Assert.Equal(EstimateStatus.Ok, m.VelocityCorrelationLength.Status);
        Assert.InRange(m.VelocityCorrelationLength.Value / truth.FirstZeroPx, 0.85, 1.15);
    }

    [Fact]
    public void Compare_ThreeFlocksVsThreeSwirls_PolarOrderDifferenceExcludesZero()
    {
        // Movies are the replicates (docs/statistics.md): one polar order per movie, Student's t test (Student 1908).
        var movies = new List<MovieData>();
        foreach (var kind in new[] { TissueFlow.Flock, TissueFlow.Swirl })
            for (int seed = 1; seed <= 3; seed++)
            {
                var r = Run(kind, seed).Result;
                var level = new Dictionary<string, MovieValue> { ["polar_order"] = new(r.Motion.PolarOrder.Value, "ok", null) };
                foreach (var k in ConditionComparison.MovieLevelMeasures) level.TryAdd(k, new(double.NaN, "too_few", "not used here"));
                movies.Add(new MovieData(kind.ToString(), seed.ToString(), "memory", "px", "frame", [], double.NaN, [], []) { MovieLevel = level });
            }
        var c = ConditionComparison.Run(movies, 200, 1);
        var d = c.Differences.Single(x => x.Measure == "polar_order");
        log.WriteLine($"flock - swirl polar order {d.Effect.Value:F3} [{d.Effect.Low:F3}, {d.Effect.High:F3}], p = {d.PValue:G3}");
        Assert.Equal(EstimateStatus.Ok, d.Effect.Status);
        Assert.False(d.LogScale);
        Assert.True(d.Effect.Low > 0, "the interval of flock - swirl excludes 0");
    }
}
