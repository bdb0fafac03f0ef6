using System.Diagnostics;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Nematic;

/// <summary>
/// The within-movie shape-noise test on our own many-defect tissue (docs/defects.md#many-defect-tissue): regions differ in
/// shape-noise anisotropy and each +1/2 moves headward or tailward at a speed that follows its region's anisotropy
/// (hypothesis true) or is independent of it (false). Acceptance criterion of issue 13: power at least 80 % and false
/// rejections at most 10 % over 20 seeded movies each (the nominal size of the test is 5 %, a fact of the trade).
/// Measured (seeds 100-119, docs/measures.md#shape-noise-hypothesis): 19/20 found with both p below 0.05; 2/20 false
/// rejections (both nulls below 0.05 in each, so also by either); 9-14 defect tracks per movie; about 2.3 min in Release
/// for the 40 movies. (Before drift removal and robust defect slopes: 20/20 and 0/20.)
/// </summary>
public class ManyDefectHypothesisTests(ITestOutputHelper log)
{
    /// <summary>The tissue of the test: 12 pairs over about 600 cells, 40 frames, |speed| up to 0.5 px/frame.</summary>
    internal static MonolayerMovieOptions Tissue(int seed, bool follows) => new()
    {
        Pairs = 12, Cells = 600, Frames = 40, DefectSpeedPx = 0.5, SpeedFollowsAnisotropy = follows, Seed = seed,
    };

    private const int Movies = 20;

    private (int Rejected, int Positive, string Lines) Run(bool follows, int movies)
    {
        int rejected = 0, positive = 0; var lines = new System.Text.StringBuilder();
        for (int s = 0; s < movies; s++)
        {
            var sw = Stopwatch.StartNew();
            var m = MonolayerMovie.Generate(Tissue(100 + s, follows));
            var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, m.Frames().ToList()), new AnalysisOptions { BootstrapResamples = 200 });
            var h = r.Hypothesis;
            // Rejection as the report states it: permutation p and random-position p both below 0.05.
            bool rej = h.PValue < 0.05 && h.RandomPositionP < 0.05;
            if (h.PValue < 0.05 || h.RandomPositionP < 0.05) rejected++;   // false rejection by either null counts
            if (rej && h.SpearmanRho > 0) positive++;
            lines.AppendLine($"seed {100 + s} follows={follows}: n={h.DefectTracks} (short {h.ShortTracksLeftOut}) rho={h.SpearmanRho:F2} p={h.PValue:F3} pnull={h.RandomPositionP:F3} speed={r.Defects.HeadwardSpeed.Value:F3} plus/frame={r.Defects.PlusPerFrame:F1} ({sw.Elapsed.TotalSeconds:F1} s)");
        }
        return (rejected, positive, lines.ToString());
    }

    [Fact]
    public void Test_SpeedFollowsAnisotropy_PositiveCorrelationFoundInAtLeast80Percent()
    {
        const int movies = Movies;
        var (_, positive, lines) = Run(true, movies);
        log.WriteLine(lines);
        log.WriteLine($"positive and p < 0.05 in {positive}/{movies}");
        Assert.True(positive >= 0.8 * movies, $"power {positive}/{movies}");
    }

    [Fact]
    public void Test_SpeedIndependentOfAnisotropy_RejectsInAtMost10Percent()
    {
        const int movies = Movies;
        var (rejected, _, lines) = Run(false, movies);
        log.WriteLine(lines);
        log.WriteLine($"p < 0.05 in {rejected}/{movies}");
        Assert.True(rejected <= 0.1 * movies, $"false rejections {rejected}/{movies}");
    }
}
