using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Pipeline;

/// <summary>Counts of what was seen and excluded.</summary>
public sealed record AnalysisCounts(int Frames, int Objects, int Outlines, int ExcludedBorder, int ExcludedSmall, int NonStarShaped,
    int Tracks, int TracksUsed, int TracksBelowFloor, int Divisions, int Merges);

/// <summary>Physical scale: pixel size and frame interval, each from metadata, options or unknown.</summary>
public sealed record Units(double? PixelSizeUm, string PixelSizeSource, double? FrameIntervalMin, string FrameIntervalSource)
{
    public double S => PixelSizeUm ?? 1.0;
    public double Dt => FrameIntervalMin ?? 1.0;
    public string Length => PixelSizeUm is null ? "px" : "um";
    public string Time => FrameIntervalMin is null ? "frame" : "min";
    /// <summary>Column suffixes: _um/_px, _um2/_px2, _min/_frames.</summary>
    public string L => PixelSizeUm is null ? "px" : "um";
    public string L2 => PixelSizeUm is null ? "px2" : "um2";
    public string T => FrameIntervalMin is null ? "frames" : "min";
}

/// <summary>Everything <see cref="MovieAnalyzer"/> measured on one movie.</summary>
public sealed record AnalysisResult(Reading.MovieInfo Movie, AnalysisOptions Options, Units Units, AnalysisCounts Counts,
    IReadOnlyList<CellRecord> Cells, IReadOnlyList<TrackRecord> Tracks, PooledFluctuations Pooled, double MeanCellRadiusPx,
    NoiseFloorReference? FloorReference, IReadOnlyList<string> Warnings, Dynamics.DynamicsResult Dynamics,
    Nematic.DefectResult Defects, Nematic.HypothesisResult Hypothesis);

