namespace ShapeNoise.Fluctuations;

/// <summary>Options of the movie pooling (docs/measures.md#movie-pooling); validated on construction. Messages name the
/// property (<c>nameof</c>); the CLI maps them to its flags.</summary>
public sealed record PoolingOptions
{
    /// <summary>Checks and holds the pooling options.</summary>
    /// <exception cref="ArgumentException">A value is out of range; the message starts with the property's name.</exception>
    public PoolingOptions(int bootstrapResamples = 1000, int seed = 1, NoiseModel noiseModel = NoiseModel.Temporal, int maxLagFrames = ContourFluctuations.DefaultMaxLagFrames)
    {
        if (bootstrapResamples < 0) throw new ArgumentException($"{nameof(BootstrapResamples)} must be >= 0 (got {bootstrapResamples})");
        if (!Enum.IsDefined(noiseModel)) throw new ArgumentException($"{nameof(NoiseModel)} must be temporal, modes or fixed-cells (got {(int)noiseModel})");
        if (maxLagFrames < 1) throw new ArgumentException($"{nameof(MaxLagFrames)} must be >= 1 frame (got {maxLagFrames})");
        BootstrapResamples = bootstrapResamples; Seed = seed; NoiseModel = noiseModel; MaxLagFrames = maxLagFrames;
    }

    /// <summary>Bootstrap resamples over tracks.</summary>
    public int BootstrapResamples { get; }
    /// <summary>Seed of the resampling stream.</summary>
    public int Seed { get; }
    /// <summary>How the measurement noise is removed from the headline variances (docs/measures.md#temporal-noise-model).</summary>
    public NoiseModel NoiseModel { get; }
    /// <summary>Longest lag (frames) of the autocovariances the temporal model is fitted to (its fit lags are at most this).</summary>
    public int MaxLagFrames { get; }
}
