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
    double[] ModePowerRaw, double[] ProfileBinCentreDeg, double[] ProfileRaw, double[] ProfileCorrected, double[] ProfileFloor)
{
    /// <summary>The noise model behind the headline values (docs/measures.md#temporal-noise-model).</summary>
    public NoiseModel NoiseModel { get; init; } = NoiseModel.Modes;
    /// <summary>Pooled raw var_L / var_W (sample variances, no noise removed).</summary>
    public Estimate AnisotropyRaw { get; init; } = Estimate.NaN;
    /// <summary>Pooled raw sample variance of L (px^2).</summary>
    public double VarLRaw { get; init; } = double.NaN;
    /// <summary>Pooled raw sample variance of W (px^2).</summary>
    public double VarWRaw { get; init; } = double.NaN;
    /// <summary>White-noise variance e2 of L (temporal model; not applicable otherwise).</summary>
    public Estimate NoiseVarL { get; init; } = Estimate.NaN;
    /// <summary>White-noise variance e2 of W.</summary>
    public Estimate NoiseVarW { get; init; } = Estimate.NaN;
    /// <summary>White-noise variance e2 of the pole-sector residuals.</summary>
    public Estimate NoiseVarAlong { get; init; } = Estimate.NaN;
    /// <summary>White-noise variance e2 of the flank-sector residuals.</summary>
    public Estimate NoiseVarAcross { get; init; } = Estimate.NaN;
    /// <summary>The temporal model's fits; null under the other noise models.</summary>
    public TemporalNoiseResult? Temporal { get; init; }
}

/// <summary>The floor values a fixed-cell analysis exports (floor.json) for <c>--floor-from</c>, in px^2.</summary>
public sealed record NoiseFloorReference(int Rays, string Outline, double VarAlongPx2, double VarAcrossPx2,
    double VarLPx2, double VarWPx2, double FloorPerModePx2);
