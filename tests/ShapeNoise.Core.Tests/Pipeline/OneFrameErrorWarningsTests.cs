using ShapeNoise.Pipeline;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>The one-frame error warnings against their thresholds in AnalysisWarnings' summary (docs/measures.md#one-frame-errors:
/// outliers are left out of the statistics and counted; fragments are tracks that end and restart nearby).</summary>
public class OneFrameErrorWarningsTests
{
    private static AnalysisWarnings.Inputs Healthy => new(
        new AnalysisCounts(Frames: 20, Objects: 400, Outlines: 380, ExcludedBorder: 20, ExcludedSmall: 0, NonStarShaped: 0,
            Tracks: 25, TracksUsed: 20, TracksBelowFloor: 0, Divisions: 0, Merges: 0),
        MinTrackFrames: 10, SokalWindowReached: true, MaxLag: 30, Coverage: 0.9, DefectTracks: 4, PlusTracksUsed: 4, HypothesisDefectTracks: 4);

    [Theory]
    [InlineData(20, false)]   // 20 of 400 outlines seen = 5 %: not over the threshold
    [InlineData(21, true)]
    public void Of_Outliers_WarnAboveFivePercentOfOutlines(int outliers, bool warns)
    {
        var x = Healthy with { Counts = Healthy.Counts with { Outlines = 400 - outliers, Outliers = outliers } };
        Assert.Equal(warns, AnalysisWarnings.Of(x).Any(w => w.Contains("one-frame outliers")));
    }

    [Theory]
    [InlineData(2, 2, false)]   // 2 of 20 used tracks = 10 %: not over
    [InlineData(3, 2, true)]
    [InlineData(3, 0, true)]
    public void Of_Fragments_WarnAboveTenPercentOfUsedTracksAndNameMaxGap(int fragments, int maxGap, bool warns)
    {
        var w = AnalysisWarnings.Of(Healthy with { Counts = Healthy.Counts with { Fragments = fragments }, MaxGapFrames = maxGap });
        var hit = w.Where(s => s.Contains("fragments")).ToList();
        Assert.Equal(warns, hit.Count == 1);
        if (warns) Assert.Contains($"--max-gap {maxGap}", hit[0]);
        if (warns && maxGap == 0) Assert.Contains("gap closing is off", hit[0]);
    }
}
