using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Fluctuations;

/// <summary>One track with its fluctuation measures (px, frames). Series are per frame of the track.</summary>
public sealed record TrackRecord(int Id, int FirstFrame, int LastFrame, TrackEnd End,
    int[] FrameIndex, double[] LengthPx, double[] WidthPx, double[] Elongation, double[] ThetaRad, double[] AreaPx2,
    double[] CentroidX, double[] CentroidY,
    TrackContour? Contour, double VarLPx2, double VarWPx2, bool Used)
{
    /// <summary>Number of frames in the track (length of <see cref="FrameIndex"/>).</summary>
    public int Frames => FrameIndex.Length;
}

/// <summary>Pooled fluctuation measures of one movie (px^2), each with its bootstrap interval over tracks.</summary>
public sealed record PooledFluctuations(
    Estimate Anisotropy, Estimate AnisotropyContour, Estimate AnisotropyContourRaw,
    Estimate VarL, Estimate VarW, Estimate VarAlong, Estimate VarAcross,
    double VarAlongRaw, double VarAcrossRaw, double FloorAlong, double FloorAcross, double FloorPerMode,
    double[] ModePowerRaw, double[] ProfileBinCentreDeg, double[] ProfileRaw, double[] ProfileCorrected, double[] ProfileFloor);

/// <summary>The floor values a fixed-cell analysis exports (floor.json) for <c>--floor-from</c>, in px^2.</summary>
public sealed record NoiseFloorReference(int Rays, string Outline, double VarAlongPx2, double VarAcrossPx2,
    double VarLPx2, double VarWPx2, double FloorPerModePx2);
