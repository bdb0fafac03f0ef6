using ShapeNoise.TimeSeries;
namespace ShapeNoise.Dynamics;

/// <summary>Options of the temporal estimators (docs/dynamics.md); validated on construction. Messages name the property
/// (<c>nameof</c>); the CLI maps them to its flags.</summary>
public sealed record DynamicsOptions
{
    /// <summary>Checks and holds the dynamics options.</summary>
    /// <exception cref="ArgumentException">A value is out of range; the message starts with the property's name.</exception>
    public DynamicsOptions(int maxLagFrames = 30, int bootstrapResamples = 1000, int seed = 1)
    {
        if (maxLagFrames < 2) throw new ArgumentException($"{nameof(MaxLagFrames)} must be at least 2 frames (got {maxLagFrames})");
        if (bootstrapResamples < 0) throw new ArgumentException($"{nameof(BootstrapResamples)} must be >= 0 (got {bootstrapResamples})");
        MaxLagFrames = maxLagFrames; BootstrapResamples = bootstrapResamples; Seed = seed;
    }

    /// <summary>Longest lag (frames) of the autocorrelation curves.</summary>
    public int MaxLagFrames { get; }
    /// <summary>Bootstrap resamples over tracks.</summary>
    public int BootstrapResamples { get; }
    /// <summary>Seed of the resampling stream.</summary>
    public int Seed { get; }
}
