namespace ShapeNoise.Fluctuations;

/// <summary>The noise floor a track's contour variances are corrected by (docs/measures.md#noise-floor): the fixed-cell
/// reference when one is given (<c>--floor-from</c>), else the track's own high-mode floor.</summary>
public static class NoiseFloor
{
    /// <summary>Floor of var_along (px^2): <c>reference.VarAlongPx2</c>, else <c>c.FloorAlong</c>.</summary>
    public static double AlongOf(TrackContour c, NoiseFloorReference? reference) => reference?.VarAlongPx2 ?? c.FloorAlong;

    /// <summary>Floor of var_across (px^2): <c>reference.VarAcrossPx2</c>, else <c>c.FloorAcross</c>.</summary>
    public static double AcrossOf(TrackContour c, NoiseFloorReference? reference) => reference?.VarAcrossPx2 ?? c.FloorAcross;
}
