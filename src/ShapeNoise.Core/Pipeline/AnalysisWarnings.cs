namespace ShapeNoise.Pipeline;

/// <summary>The warnings a run adds after its stages (summary.json "warnings", in this order); each names what makes a
/// result undefined or weak and, where one exists, the option or remedy.</summary>
public static class AnalysisWarnings
{
    /// <summary>The numbers the rules look at.</summary>
    /// <param name="Counts">What was seen, excluded and used.</param>
    /// <param name="MinTrackFrames">--min-track.</param>
    /// <param name="SokalWindowReached">Whether the integrated correlation time of q converged (Sokal window).</param>
    /// <param name="MaxLag">Longest lag of the correlation curves.</param>
    /// <param name="Coverage">Mean fraction of the field covered by analysed cells.</param>
    /// <param name="DefectTracks">Defect tracks found.</param>
    /// <param name="PlusTracksUsed">+1/2 defect tracks followed for 3 or more frames.</param>
    /// <param name="HypothesisDefectTracks">+1/2 defect tracks with a local anisotropy in the hypothesis test.</param>
    /// <param name="MaxGapFrames">--max-gap (docs/measures.md#one-frame-errors).</param>
    public sealed record Inputs(AnalysisCounts Counts, int MinTrackFrames, bool SokalWindowReached, int MaxLag, double Coverage,
        int DefectTracks, int PlusTracksUsed, int HypothesisDefectTracks, int MaxGapFrames = 2)
    {
        /// <summary>Cell flow at the +1/2 cores over the defects' own speed (Nematic.HeadwardStatistics.CoreFlowRatio); NaN = not checked.</summary>
        public double CoreFlowRatio { get; init; } = double.NaN;
        /// <summary>Whether the tissue's drift was removed before the ratio was taken (false with --keep-drift).</summary>
        public bool DriftRemoved { get; init; } = true;
    }

    /// <summary>Cell flow at the cores, as a fraction of the defects' own speed, above which defect motion is flagged as
    /// partly carried by the local flow (docs/defects.md#drift).</summary>
    public const double MaxCoreFlowRatio = 0.5;

    /// <summary>Share of outlines flagged as one-frame outliers above which the segmentation is questioned.</summary>
    public const double MaxOutlierShare = 0.05;
    /// <summary>Fragments per used track above which the tracks are said to break up.</summary>
    public const double MaxFragmentShare = 0.1;

    /// <summary>Cell coverage below which the nematic field's confluence assumption is flagged.</summary>
    public const double MinCoverage = 0.7;

    /// <summary>The warnings of nine rules: no used track; fewer than 10; over 10% non-star-shaped outlines; over 25% of
    /// used tracks below the noise floor; Sokal window not reached; coverage below 70%; no +1/2 defect followed for 3
    /// frames; fewer than 3 defect tracks for the hypothesis test; cell flow at the +1/2 cores above half the defects'
    /// own speed (docs/defects.md#drift); then, for one-frame segmentation errors (docs/measures.md#one-frame-errors),
    /// over 5% of outlines outliers and fragments over 10% of the used tracks.</summary>
    public static List<string> Of(Inputs x)
    {
        var w = new List<string>();
        var c = x.Counts;
        int used = c.TracksUsed;
        if (used == 0) w.Add($"no track reached --min-track {x.MinTrackFrames} frames: pooled values are undefined");
        else if (used < 10) w.Add($"only {used} tracks enter the statistics: intervals are wide");
        if (c.Outlines > 0 && c.NonStarShaped > 0.1 * c.Outlines)
            w.Add($"{c.NonStarShaped} of {c.Outlines} outlines are not star-shaped about their centroid: the radial function takes the farthest crossing");
        if (used > 0 && c.TracksBelowFloor > 0.25 * used) w.Add($"{c.TracksBelowFloor} of {used} tracks have contour fluctuations below the noise floor");
        if (used > 0 && !x.SokalWindowReached)
            w.Add($"the integrated correlation time of q did not converge within {x.MaxLag} lags (Sokal window): tracks are short compared with tau_q");
        if (x.Coverage < MinCoverage)
            w.Add($"cells cover {100 * x.Coverage:F0}% of the field: the nematic field and its defects assume a confluent tissue, so read the defect results with care");
        if (x.DefectTracks > 0 && x.PlusTracksUsed == 0)
            w.Add("no +1/2 defect was followed for 3 or more frames: headward speeds are undefined");
        if (x.PlusTracksUsed > 0 && x.HypothesisDefectTracks < 3)
            w.Add($"only {x.HypothesisDefectTracks} +1/2 defect track(s) with a local anisotropy: the within-movie hypothesis test needs 3 or more; compare movies instead");
        if (x.CoreFlowRatio > MaxCoreFlowRatio)
            w.Add($"cells at the +1/2 cores move at {x.CoreFlowRatio:0.00} times the defects' own speed{(x.DriftRemoved ? " (stage drift removed)" : " (drift kept, --keep-drift)")}: " +
                  "the defects are partly carried by the local flow, so their headward speed mixes their own motion with transport; compare it with the flow headward speed");
        int seen = c.Outlines + c.Outliers;
        if (seen > 0 && c.Outliers > MaxOutlierShare * seen)
            w.Add($"{c.Outliers} of {seen} outlines are one-frame outliers (segmentation errors, left out of the statistics): check the segmentation");
        if (used > 0 && c.Fragments > MaxFragmentShare * used)
            w.Add($"{c.Fragments} tracks end and a new track starts next to them (fragments): segmentation errors last longer than --max-gap {x.MaxGapFrames} frames"
                + (x.MaxGapFrames == 0 ? " (gap closing is off)" : ""));
        return w;
    }
}
