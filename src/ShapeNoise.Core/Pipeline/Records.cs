using ShapeNoise.Fluctuations;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;

namespace ShapeNoise.Pipeline;

/// <summary>One analysed outline (one cell in one frame), in px.</summary>
public readonly record struct CellRecord(int Frame, int Label, int TrackId, ShapeMeasures Shape, double ThetaContinuousRad,
    bool StarShaped, double MeanRadiusPx, double Mode2AmplitudePx, int Vertices);

/// <summary>Runs of consecutive cells of the same frame (cells are stored in frame order).</summary>
public static class FrameRuns
{
    /// <summary>(frame, first index, count) for each frame present in <paramref name="cells"/>.</summary>
    public static List<(int Frame, int Start, int Count)> Of(IReadOnlyList<CellRecord> cells)
    {
        var runs = new List<(int Frame, int Start, int Count)>();
        for (int i = 0; i < cells.Count;)
        {
            int j = i;
            while (j < cells.Count && cells[j].Frame == cells[i].Frame) j++;
            runs.Add((cells[i].Frame, i, j - i));
            i = j;
        }
        return runs;
    }
}

/// <summary>Why a track ended.</summary>
public enum TrackEnd { MovieEnd, Lost, Border, Small, Division, Merge }

/// <summary>One track with its fluctuation measures (px, frames). Series are per frame of the track.</summary>
public sealed record TrackRecord(int Id, int FirstFrame, int LastFrame, TrackEnd End,
    int[] FrameIndex, double[] LengthPx, double[] WidthPx, double[] Elongation, double[] ThetaRad, double[] AreaPx2,
    double[] CentroidX, double[] CentroidY,
    TrackContour? Contour, double VarLPx2, double VarWPx2, bool Used)
{
    public int Frames => FrameIndex.Length;
}

/// <summary>Pooled fluctuation measures of one movie (px^2), each with its bootstrap interval over tracks.</summary>
public sealed record PooledFluctuations(
    Estimate Anisotropy, Estimate AnisotropyContour, Estimate AnisotropyContourRaw,
    Estimate VarL, Estimate VarW, Estimate VarAlong, Estimate VarAcross,
    double VarAlongRaw, double VarAcrossRaw, double FloorAlong, double FloorAcross, double FloorPerMode,
    double[] ModePowerRaw, double[] ProfileBinCentreDeg, double[] ProfileRaw, double[] ProfileCorrected, double[] ProfileFloor);

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

/// <summary>The floor values a fixed-cell analysis exports (floor.json) for <c>--floor-from</c>, in px^2.</summary>
public sealed record NoiseFloorReference(int Rays, string Outline, double VarAlongPx2, double VarAcrossPx2,
    double VarLPx2, double VarWPx2, double FloorPerModePx2);
