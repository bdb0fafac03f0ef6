using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Pipeline;

/// <summary>Counts of what was seen and excluded. Divisions and merges count analysed cells only; Outliers,
/// BridgedMerges, BridgedSplits and Fragments are the one-frame segmentation errors (docs/measures.md#one-frame-errors).</summary>
public sealed record AnalysisCounts(int Frames, int Objects, int Outlines, int ExcludedBorder, int ExcludedSmall, int NonStarShaped,
    int Tracks, int TracksUsed, int TracksBelowFloor, int Divisions, int Merges,
    int Outliers = 0, int BridgedMerges = 0, int BridgedSplits = 0, int Fragments = 0);

/// <summary>Physical scale: pixel size and frame interval, each from metadata, options or unknown.</summary>
public sealed record Units(double? PixelSizeUm, string PixelSizeSource, double? FrameIntervalMin, string FrameIntervalSource)
{
    /// <summary>Pixel size s (um per px), 1 when unknown (lengths then stay in px).</summary>
    public double S => PixelSizeUm ?? 1.0;
    /// <summary>Frame interval dt (min per frame), 1 when unknown (times then stay in frames).</summary>
    public double Dt => FrameIntervalMin ?? 1.0;
    /// <summary>Length unit for text: "um", or "px" when the pixel size is unknown.</summary>
    public string Length => PixelSizeUm is null ? "px" : "um";
    /// <summary>Time unit for text: "min", or "frame" when the frame interval is unknown.</summary>
    public string Time => FrameIntervalMin is null ? "frame" : "min";
    /// <summary>Length column suffix: "um", or "px" when the pixel size is unknown (columns _um/_px, _um2/_px2, _min/_frames).</summary>
    public string L => PixelSizeUm is null ? "px" : "um";
    /// <summary>Area column suffix: "um2", or "px2" when the pixel size is unknown.</summary>
    public string L2 => PixelSizeUm is null ? "px2" : "um2";
    /// <summary>Time column suffix: "min", or "frames" when the frame interval is unknown.</summary>
    public string T => FrameIntervalMin is null ? "frames" : "min";
}

/// <summary>Everything <see cref="MovieAnalyzer"/> measured on one movie.</summary>
public sealed record AnalysisResult(Reading.MovieInfo Movie, AnalysisOptions Options, Units Units, AnalysisCounts Counts,
    IReadOnlyList<CellRecord> Cells, IReadOnlyList<TrackRecord> Tracks, PooledFluctuations Pooled, double MeanCellRadiusPx,
    NoiseFloorReference? FloorReference, IReadOnlyList<string> Warnings, Dynamics.DynamicsResult Dynamics,
    Nematic.DefectResult Defects, Nematic.HypothesisResult Hypothesis)
{
    /// <summary>Mean fraction of the field covered per frame, gaps of at most <see cref="Outlines.Coverage.MaxGapPx"/> px
    /// between masks closed; it gates the spatial block bootstrap and the defect stage (docs/defects.md#where-defects-apply).</summary>
    public double Coverage { get; init; } = double.NaN;
    /// <summary>Mean fraction of the field in labelled pixels per frame, no gap closing (docs/defects.md#where-defects-apply).</summary>
    public double CoverageRaw { get; init; } = double.NaN;
    /// <summary>Unit of the within-movie bootstrap: "tracks" or "spatial blocks" (docs/statistics.md#within-movie-intervals).</summary>
    public string ResamplingUnit { get; init; } = "tracks";
    /// <summary>Side of the spatial blocks (px); NaN for the track bootstrap.</summary>
    public double BlockSizePx { get; init; } = double.NaN;
    /// <summary>Estimated correlation length xi of the shape fluctuations (px); NaN for the track bootstrap.</summary>
    public double ShapeCorrelationLengthPx { get; init; } = double.NaN;
    /// <summary>Defect densities, lifetimes, creation and annihilation, +1/2 mean-squared displacement (docs/motion.md#defect-statistics); null when not computed.</summary>
    public Nematic.DefectStatisticsResult? DefectStatistics { get; init; }
    /// <summary>The defect picture re-run at each width of --coarse-sweep (empty without a sweep or where defects do not apply).</summary>
    public IReadOnlyList<Nematic.CoarseSweepPoint> CoarseSweep { get; init; } = [];
    /// <summary>Collective motion and nematic order (docs/motion.md).</summary>
    public ShapeNoise.Motion.MotionResult Motion { get; init; } = ShapeNoise.Motion.MotionResult.Empty("not computed");
}

