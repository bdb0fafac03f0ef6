using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Core.Tests.Motion;

/// <summary>The collective-motion stage end to end through <see cref="MovieAnalyzer"/> on movies whose velocities are known
/// exactly (docs/motion.md).</summary>
public class MotionAnalysisTests
{
    /// <summary>A brick tiling of 16 x 8 px cells (long axis along x) shifted by <paramref name="stepPx"/> whole pixels per
    /// frame along x; every cell keeps its id (a shifted copy has identical outlines, so every centroid moves by exactly the step).</summary>
    private static MemoryMovie Translating(int frames, int stepPx, int width = 240, int height = 160)
    {
        var list = new List<int[]>();
        for (int t = 0; t < frames; t++)
        {
            var f = new int[width * height];
            for (int y = 0; y < height; y++)
                for (int x = 0; x < width; x++)
                {
                    int col = (int)Math.Floor((x - stepPx * t) / 16.0) + 1000, row = y / 8;
                    f[y * width + x] = col * 64 + row + 1;
                }
            list.Add(f);
        }
        return new MemoryMovie(width, height, list);
    }

    [Fact]
    public void Run_UniformTranslation_PolarOrderOneRmsSpeedZeroNoDefects()
    {
        // Analytic case (issue 15; Vicsek et al. 1995, Phys. Rev. Lett. 75:1226): every cell has the same velocity, so
        // phi = |N v| / (N |v|) = 1 and the fluctuation about the frame mean is 0; an aligned tissue has no defects.
        var r = MovieAnalyzer.Run(Translating(24, 1), new AnalysisOptions { BootstrapResamples = 100, MinTrackFrames = 5 });
        var m = r.Motion;
        Assert.Equal(1.0, m.PolarOrder.Value, 9);   // rounding of the polygon centroids only
        Assert.Equal(0.0, m.RmsSpeed.Value, 9);
        Assert.Equal(0.0, m.MeanSpeed.Value, 9);    // drift (the median velocity, here the common one) removed
        Assert.Equal(0, r.Defects.PlusPerFrame);
        Assert.Equal(0, r.Defects.MinusPerFrame);
        Assert.All(m.Frames, f => Assert.Equal(1.0, f.DriftVx, 9));
        // Zero-width interval: not ok (docs/statistics.md#estimate-status), never an interval of zero width.
        Assert.NotEqual(EstimateStatus.Ok, m.RmsSpeed.Status);
    }

    [Fact]
    public void Run_StillTissueKeepDrift_SpeedsZero()
    {
        // A still tissue: every centroid difference is exactly 0 (identical frames), so all speeds are 0 and the polar
        // order is undefined (0 / 0), reported as not a number rather than as a made-up value.
        var r = MovieAnalyzer.Run(Translating(12, 0), new AnalysisOptions { BootstrapResamples = 50, MinTrackFrames = 5, KeepDrift = true });
        Assert.Equal(0.0, r.Motion.MeanSpeed.Value);
        Assert.True(double.IsNaN(r.Motion.PolarOrder.Value));
        Assert.NotEqual(EstimateStatus.Ok, r.Motion.PolarOrder.Status);
    }
}
