namespace ShapeNoise.Fluctuations;

/// <summary>Options of the movie pooling (docs/measures.md#movie-pooling); validated on construction. Messages name the
/// property (<c>nameof</c>); the CLI maps them to its flags.</summary>
public sealed record PoolingOptions
{
    /// <summary>Checks and holds the pooling options.</summary>
    /// <exception cref="ArgumentException">A value is out of range; the message starts with the property's name.</exception>
    public PoolingOptions(int bootstrapResamples = 1000, int seed = 1)
    {
        if (bootstrapResamples < 0) throw new ArgumentException($"{nameof(BootstrapResamples)} must be >= 0 (got {bootstrapResamples})");
        BootstrapResamples = bootstrapResamples; Seed = seed;
    }

    /// <summary>Bootstrap resamples over tracks.</summary>
    public int BootstrapResamples { get; }
    /// <summary>Seed of the resampling stream.</summary>
    public int Seed { get; }
}
