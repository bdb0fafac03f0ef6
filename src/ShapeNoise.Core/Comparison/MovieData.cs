using System.Globalization;
using System.Text.Json.Nodes;
using ShapeNoise.Reading;

namespace ShapeNoise.Comparison;

/// <summary>One track of a movie as the comparison needs it (run units).</summary>
public readonly record struct TrackUnit(double Frames, double VarL, double VarW, double VarAlong, double VarAcross);

/// <summary>What the comparison reads back from one analysis output folder.</summary>
public sealed record MovieData(string Condition, string Replicate, string Folder, string LengthUnit, string TimeUnit,
    TrackUnit[] Tracks, double TauQ, double[] DefectHeadward, double[] FlowHeadward)
{
    /// <summary>Per +1/2 defect track, its frames with a speed (the weight of its mean in the time-weighted movie speed,
    /// docs/defects.md#headward-speed); null = every track weight 1.</summary>
    public int[]? DefectHeadwardFrames { get; init; }
    /// <summary>Per +1/2 defect track, its frames with a core flow; null = every track weight 1.</summary>
    public int[]? FlowHeadwardFrames { get; init; }
    /// <summary>Why the movie's defect stage did not apply (summary.json defects_reason), or null when it did; such a
    /// movie contributes no defect speeds (docs/defects.md#where-defects-apply).</summary>
    public string? DefectsNotApplicable { get; init; }
    /// <summary>The movie-level measures read from summary.json (collective motion, defect statistics; docs/motion.md), by
    /// key: one value per movie with its status; compared across movies like tau_q.</summary>
    public IReadOnlyDictionary<string, MovieValue> MovieLevel { get; init; } = new Dictionary<string, MovieValue>();
}

/// <summary>One movie-level estimate as read back from summary.json: its value (NaN unless the status is ok), status name
/// (ok, too_few, at_bound, not_applicable) and reason.</summary>
public readonly record struct MovieValue(double Value, string Status, string? Reason)
{
    /// <summary>Lower end of the movie's own 95% interval (NaN unless ok): the plan takes the movie's sampling variance from it.</summary>
    public double Low { get; init; } = double.NaN;
    /// <summary>Upper end of the movie's own 95% interval (NaN unless ok).</summary>
    public double High { get; init; } = double.NaN;
}

/// <summary>One row of conditions.csv: condition, replicate, path (an analysis folder or a movie to analyse); Line is its line number in the file.</summary>
public sealed record ConditionRow(string Condition, string Replicate, string Path, long Line = 0)
{
    /// <summary>"row 3 (wt, 1)": how a message names this row.</summary>
    public string Describe() => $"row {Line} ({Condition}, {Replicate})";
}
