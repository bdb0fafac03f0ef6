using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Nematic;

/// <summary>
/// Recovery on our own confluent-monolayer scenario (about 600 cells, 60 frames) whose cells follow a prescribed
/// director field with a +1/2 / -1/2 pair; the +1/2 moves toward its head or its tail. The truth is the prescribed motion.
/// </summary>
public class DefectRecoveryTests(ITestOutputHelper log)
{
    private (MonolayerMovie Movie, AnalysisResult Result) Run(DefectMotion motion, double flow = 0, bool keepDrift = false)
    {
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions { Motion = motion, FlowSpeedPx = flow });
        var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, m.Frames().ToList()), new AnalysisOptions { BootstrapResamples = 200, KeepDrift = keepDrift });
        return (m, r);
    }

    private int FramesFound(MonolayerMovie m, AnalysisResult r)
    {
        var d = r.Defects; int hit = 0;
        for (int t = 0; t < m.Options.Frames; t++)
            if (d.Observations.Any(o => o.Frame == t && o.Defect.Charge == 0.5 &&
                                        Math.Sqrt(Math.Pow(o.Defect.X - m.Truth.PlusX[t], 2) + Math.Pow(o.Defect.Y - m.Truth.PlusY[t], 2)) <= d.CoarsePx))
                hit++;
        return hit;
    }

    [Theory]
    [InlineData(DefectMotion.Headward)]
    [InlineData(DefectMotion.Tailward)]
    public void Analyze_MovingPlusHalf_FoundAndHeadwardSpeedRecovered(DefectMotion motion)
    {
        var (m, r) = Run(motion);
        var d = r.Defects;
        int hit = FramesFound(m, r);
        log.WriteLine($"{motion}: {m.Truth.Cells} cells; +1/2 within one coarse width ({d.CoarsePx:F1} px) of truth in {hit}/{m.Options.Frames} frames; " +
                      $"headward {d.HeadwardSpeed.Value:F3} px/frame (truth {m.Truth.DefectHeadwardSpeedPx:F3}); flow headward {d.FlowHeadwardSpeed.Value:F3} (truth {m.Truth.FlowHeadwardSpeedPx:F3})");
        Assert.InRange(m.Truth.Cells, 550, 650);
        Assert.True(hit >= 0.95 * m.Options.Frames);
        Assert.Equal(Math.Sign(m.Truth.DefectHeadwardSpeedPx), Math.Sign(d.HeadwardSpeed.Value));
        Assert.InRange(d.HeadwardSpeed.Value / m.Truth.DefectHeadwardSpeedPx, 0.75, 1.25);
        Assert.Equal(motion == DefectMotion.Headward ? 1.0 : 0.0, d.FractionHeadward);
        Assert.InRange(d.PlusPerFrame, 0.9, 1.1);
        Assert.InRange(d.MinusPerFrame, 0.9, 1.1);
    }

    /// <summary>A uniform flow carrying every cell is, by definition, a drift of the whole tissue (docs/defects.md#drift),
    /// so the lab-frame flow is measured with --keep-drift (drift removal would take it out; DriftTests covers that).</summary>
    [Fact]
    public void Analyze_CellsCarriedByFlow_FlowHeadwardSpeedRecovered()
    {
        var (m, r) = Run(DefectMotion.None, flow: 0.3, keepDrift: true);
        var d = r.Defects;
        log.WriteLine($"flow headward {d.FlowHeadwardSpeed.Value:F3} px/frame (truth {m.Truth.FlowHeadwardSpeedPx:F3}); kinematic {d.HeadwardSpeed.Value:F3} (truth 0)");
        Assert.InRange(d.FlowHeadwardSpeed.Value / m.Truth.FlowHeadwardSpeedPx, 0.75, 1.25);
        Assert.InRange(d.HeadwardSpeed.Value, -0.1, 0.1);
    }
}
