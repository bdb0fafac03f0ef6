namespace ShapeNoise.Fluctuations;

/// <summary>How the measurement noise is taken out of the headline variances (docs/measures.md#temporal-noise-model).</summary>
public enum NoiseModel
{
    /// <summary>Each fluctuation coordinate = Ornstein-Uhlenbeck signal + white measurement noise, fitted to the pooled
    /// mean-subtracted autocovariance (the default; docs/measures.md#temporal-noise-model).</summary>
    Temporal,
    /// <summary>The contour variances minus the high-mode floor of the track's own spectrum (docs/measures.md#noise-floor);
    /// var_L and var_W uncorrected.</summary>
    Modes,
    /// <summary>Every variance minus the fixed-cell reference of <c>--floor-from</c> (docs/measures.md#noise-floor).</summary>
    FixedCells,
}
