using ShapeNoise.Fluctuations;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>
/// Gaps between masks (docs/defects.md#where-defects-apply): a confluent monolayer whose masks are pulled apart by
/// 2 px of background, as many segmenters leave them, must still count as confluent, and its defect results must not
/// move; isolated cells must stay sparse. Invented data (our synthetic monolayer and ellipse scenarios).
/// </summary>
public class GapTests(ITestOutputHelper log)
{
    /// <summary>The scenario of DefectRecoveryTests. With 30 frames the single +1/2 track is short enough that two runs
    /// on slightly different masks gave headward speeds 11 % apart (0.320 and 0.285 px/frame, truth 0.4): noise of one
    /// short track, not an effect of the gaps; 60 frames keep that noise within the 10 % asserted below.</summary>
    private static readonly MonolayerMovieOptions Tissue = new() { Cells = 600, Frames = 60 };

    /// <summary>Sets to 0 every pixel whose 4-neighbour has a different non-zero label: 1 px off each side of every
    /// junction, a 2-px gap between neighbours.</summary>
    private static int[] WithGaps(int[] f, int w, int h)
    {
        var g = (int[])f.Clone();
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int l = f[y * w + x];
                if (l == 0) continue;
                bool junction = (x > 0 && f[y * w + x - 1] is var a && a != 0 && a != l) || (x < w - 1 && f[y * w + x + 1] is var b && b != 0 && b != l)
                             || (y > 0 && f[(y - 1) * w + x] is var c && c != 0 && c != l) || (y < h - 1 && f[(y + 1) * w + x] is var d && d != 0 && d != l);
                if (junction) g[y * w + x] = 0;
            }
        return g;
    }

    private static AnalysisResult Analyse(MonolayerMovie m, bool gaps)
    {
        var frames = m.Frames().Select(f => gaps ? WithGaps(f, m.Width, m.Height) : f).ToList();
        return MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, frames), new AnalysisOptions { BootstrapResamples = 200 });
    }

    [Fact]
    public void Analyze_MonolayerWithTwoPxGaps_ConfluentAndDefectsUnchanged()
    {
        var m = MonolayerMovie.Generate(Tissue);
        var plain = Analyse(m, gaps: false);
        var gapped = Analyse(m, gaps: true);
        var (d0, d1) = (plain.Defects, gapped.Defects);
        log.WriteLine($"{m.Truth.Cells} cells, {m.Options.Frames} frames, {m.Width} x {m.Height} px");
        log.WriteLine($"gap-free: coverage {plain.Coverage:F3} (raw {plain.CoverageRaw:F3}), {plain.ResamplingUnit}, +1/2 per frame {d0.PlusPerFrame:F2}, " +
                      $"-1/2 per frame {d0.MinusPerFrame:F2}, headward {d0.HeadwardSpeed.Value:F3} px/frame, contour anisotropy {plain.Pooled.AnisotropyContour.Value:F3}");
        log.WriteLine($"2-px gaps: coverage {gapped.Coverage:F3} (raw {gapped.CoverageRaw:F3}), {gapped.ResamplingUnit}, +1/2 per frame {d1.PlusPerFrame:F2}, " +
                      $"-1/2 per frame {d1.MinusPerFrame:F2}, headward {d1.HeadwardSpeed.Value:F3} px/frame, contour anisotropy {gapped.Pooled.AnisotropyContour.Value:F3}");
        log.WriteLine($"truth headward {m.Truth.DefectHeadwardSpeedPx:F3} px/frame; defects reason (gaps): {d1.NotApplicableReason ?? "none"}");

        // The gaps are real: the labelled pixels alone fall below the confluence threshold.
        Assert.True(gapped.CoverageRaw < SpatialBlocks.ConfluentCoverage, $"raw coverage {gapped.CoverageRaw:F3}");
        // Closed, the tissue is confluent: spatial blocks and the defect stage apply.
        Assert.True(gapped.Coverage >= SpatialBlocks.ConfluentCoverage, $"coverage {gapped.Coverage:F3}");
        Assert.Equal("spatial blocks", gapped.ResamplingUnit);
        Assert.Null(d1.NotApplicableReason);
        // The nematic field is built from centroids (docs/defects.md#coarse-grained-fields), which 1 px off every side
        // hardly moves: the defect results stay within 10 % of the gap-free run.
        Assert.InRange(d1.PlusPerFrame / d0.PlusPerFrame, 0.9, 1.1);
        Assert.InRange(d1.MinusPerFrame / d0.MinusPerFrame, 0.9, 1.1);
        Assert.True(double.IsFinite(d0.HeadwardSpeed.Value) && double.IsFinite(d1.HeadwardSpeed.Value));   // one +1/2 track: too_few, value kept
        Assert.InRange(d1.HeadwardSpeed.Value / d0.HeadwardSpeed.Value, 0.9, 1.1);
        // Contour anisotropy with and without gaps is logged above, not asserted: measured 4.153 and 4.144 here (the same
        // cells, 1 px smaller on every side); other segmenters' gaps are not a 1-px erosion, so no bound is claimed.
        // And both near the prescribed speed (the recovery of DefectRecoveryTests: within 25 %).
        Assert.InRange(d1.HeadwardSpeed.Value / m.Truth.DefectHeadwardSpeedPx, 0.75, 1.25);
    }

    [Fact]
    public void Analyze_EllipseDemo_StaysBelowConfluence()
    {
        var e = EllipseMovie.Generate(new EllipseMovieOptions());
        var r = MovieAnalyzer.Run(MemoryMovie.Of(e), new AnalysisOptions { BootstrapResamples = 50 });
        log.WriteLine($"ellipse demo: coverage {r.Coverage:F3} (raw {r.CoverageRaw:F3}), {r.ResamplingUnit}");
        // docs/defects.md#where-defects-apply: isolated cells cover about 14 %; the closing must not fill between them.
        Assert.True(r.Coverage < 0.3, $"coverage {r.Coverage:F3}");
        Assert.True(r.Coverage - r.CoverageRaw < 0.01, $"closing added {r.Coverage - r.CoverageRaw:F4}");
        Assert.Equal("tracks", r.ResamplingUnit);
    }
}
