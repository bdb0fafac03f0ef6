using System.Reflection;
using ShapeNoise.Fluctuations;
using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Nematic;

/// <summary>The velocity source is chosen before the run and bound once by the defect stage.</summary>
public class VelocitySourceTests
{
    /// <summary>A source that counts how often it is bound and gives every cell the velocity (1, 0) px/frame.</summary>
    private sealed class CountingSource : IVelocitySource
    {
        public int Binds;
        public Func<CellRecord, (double Vx, double Vy)> Bind(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks)
        {
            Interlocked.Increment(ref Binds);
            return _ => (1.0, 0.0);
        }
    }

    /// <summary>
    /// One analysis with a non-default source: the source is bound once (one defect stage), the defects in the result
    /// come from it (the coarse-grained velocity at every core is the uniform (1, 0): a weighted mean of ones), and the
    /// defects themselves are those of the default run (defects depend on Q only, docs/measures.md#nematic-field-and-defects).
    /// Drift is kept in both runs (a uniform velocity is all drift); with drift removal (third run) the tissue velocity of
    /// every frame is the source's (1, 0) (the median of equal values) and the flow at every core is 0 (docs/defects.md#drift).
    /// </summary>
    [Fact]
    public void Run_WithSource_DefectStageBindsOnceAndUsesIt()
    {
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions { Cells = 300, Frames = 12 });
        var frames = m.Frames().ToList();
        var o = new AnalysisOptions { BootstrapResamples = 20, KeepDrift = true };
        var source = new CountingSource();
        var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, frames), o, velocities: source);
        var plain = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, frames), o);
        Assert.Equal(1, source.Binds);
        Assert.NotEmpty(r.Defects.Observations);
        foreach (var ob in r.Defects.Observations)
            if (double.IsFinite(ob.FlowVx)) { Assert.Equal(1, ob.FlowVx, 9); Assert.Equal(0, ob.FlowVy, 9); }
        Assert.Contains(r.Defects.Observations, ob => double.IsFinite(ob.FlowVx));
        Assert.Equal(plain.Defects.Observations.Select(x => x.Defect), r.Defects.Observations.Select(x => x.Defect));
        Assert.Equal(plain.Hypothesis.SpearmanRho, r.Hypothesis.SpearmanRho);

        var removed = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, frames), o with { KeepDrift = false }, velocities: new CountingSource());
        Assert.True(removed.Defects.DriftRemoved);
        Assert.All(removed.Defects.Drift, f => { Assert.Equal(1.0, f.Ux); Assert.Equal(0.0, f.Uy); });
        foreach (var ob in removed.Defects.Observations)
            if (double.IsFinite(ob.FlowVx)) { Assert.Equal(0, ob.FlowVx, 9); Assert.Equal(0, ob.FlowVy, 9); }
    }

    /// <summary>Structural: the analyze job takes the source up front and has no step that re-runs stages on a finished
    /// result (the former postProcess that ran the defect stage and the hypothesis test a second time).</summary>
    [Fact]
    public void AnalyzeJobRun_Parameters_VelocitySourceAndNoResultRewrite()
    {
        var run = typeof(ShapeNoise.Cli.Jobs.AnalyzeJob).GetMethod("Run", BindingFlags.Public | BindingFlags.Static)!;
        var ps = run.GetParameters();
        Assert.Contains(ps, p => p.ParameterType == typeof(IVelocitySource));
        Assert.DoesNotContain(ps, p => p.ParameterType == typeof(Func<AnalysisResult, AnalysisResult>));
    }

    /// <summary>Central differences (x(t+1) - x(t-1)) / 2, one-sided at the ends and next to a gap, NaN for a frame with
    /// no neighbour (hand computation; docs/measures.md#nematic-field-and-defects).</summary>
    [Fact]
    public void CentroidVelocities_TrackWithGap_CentralOneSidedAndNaN()
    {
        int[] fr = [0, 1, 2, 4, 6];
        double[] x = [0, 1, 4, 10, 20], y = [0, 0, -2, 0, 0];
        var t = new TrackRecord(1, 0, 6, TrackEnd.MovieEnd, fr, new double[5], new double[5], new double[5], new double[5], new double[5], x, y, null, 0, 0, true);
        Assert.Equal((1.0, 0.0), CentroidVelocities.Of(t, 0));     // one-sided: x1 - x0
        Assert.Equal((2.0, -1.0), CentroidVelocities.Of(t, 1));    // (x2 - x0) / 2
        Assert.Equal((3.0, -2.0), CentroidVelocities.Of(t, 2));    // one-sided before the gap: x2 - x1
        Assert.True(double.IsNaN(CentroidVelocities.Of(t, 4).Vx)); // frames 3 and 5 missing
        Assert.True(double.IsNaN(CentroidVelocities.Of(t, 3).Vx)); // not in the track
        var bound = CentroidVelocities.Instance.Bind([], [t]);
        Assert.Equal((2.0, -1.0), bound(new CellRecord(1, 5, 1, default, 0, true, 0, 0, 0)));
        Assert.True(double.IsNaN(bound(new CellRecord(1, 5, 99, default, 0, true, 0, 0, 0)).Vx));   // unknown track
    }
}
