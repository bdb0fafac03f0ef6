using ShapeNoise.Pipeline;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>The warning rules, against their statement in the project's spec (docs/measures.md#track-definitions:
/// only tracks of at least --min-track frames enter the statistics; docs/measures.md#outline-definitions: the radial
/// function of a non-star-shaped outline takes the farthest crossing) and the thresholds in AnalysisWarnings' summary.</summary>
public class AnalysisWarningsTests
{
    private static AnalysisWarnings.Inputs Healthy => new(
        new AnalysisCounts(Frames: 20, Objects: 400, Outlines: 380, ExcludedBorder: 20, ExcludedSmall: 0, NonStarShaped: 0,
            Tracks: 25, TracksUsed: 20, TracksBelowFloor: 0, Divisions: 0, Merges: 0),
        MinTrackFrames: 10, SokalWindowReached: true, MaxLag: 30, Coverage: 0.9, DefectTracks: 4, PlusTracksUsed: 4, HypothesisDefectTracks: 4);

    [Fact]
    public void Of_HealthyRun_NoWarning() => Assert.Empty(AnalysisWarnings.Of(Healthy));

    [Fact]
    public void Of_NoUsedTrack_SaysPooledValuesAreUndefinedAndNamesMinTrack()
    {
        var w = AnalysisWarnings.Of(Healthy with { Counts = Healthy.Counts with { TracksUsed = 0 } });
        var only = Assert.Single(w);   // the Sokal and floor rules need a used track
        Assert.Contains("--min-track 10", only);
        Assert.Contains("undefined", only);
    }

    [Fact]
    public void Of_FewUsedTracks_WarnsIntervalsAreWide()
        => Assert.Contains("only 9 tracks", Assert.Single(AnalysisWarnings.Of(Healthy with { Counts = Healthy.Counts with { TracksUsed = 9 } })));

    [Theory]
    [InlineData(38, false)]   // exactly 10% of 380: not over the threshold
    [InlineData(39, true)]
    public void Of_NonStarShapedOutlines_WarnsAboveTenPercent(int nonStar, bool warns)
    {
        var w = AnalysisWarnings.Of(Healthy with { Counts = Healthy.Counts with { NonStarShaped = nonStar } });
        Assert.Equal(warns, w.Any(x => x.Contains("not star-shaped")));
    }

    [Fact]
    public void Of_LowCoverage_WarnsAboutConfluence()
        => Assert.Contains("cover 50%", Assert.Single(AnalysisWarnings.Of(Healthy with { Coverage = 0.5 })));

    [Fact]
    public void Of_FewHypothesisTracks_PointsToComparingMovies()
        => Assert.Contains("compare movies", Assert.Single(AnalysisWarnings.Of(Healthy with { HypothesisDefectTracks = 2 })));
}
