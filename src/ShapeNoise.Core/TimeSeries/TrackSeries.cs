namespace ShapeNoise.TimeSeries;

/// <summary>One track's samples of a scalar quantity at the frames where the cell was seen (frames ascending, gaps allowed).</summary>
internal readonly record struct TrackSeries(int[] Frames, double[] Values)
{
    /// <summary>True when the frames have no gaps.</summary>
    public bool Contiguous => Frames.Length == 0 || Frames[^1] - Frames[0] == Frames.Length - 1;
}

/// <summary>Per-track sums of mean-subtracted lagged products, the building blocks of the pooled autocovariance.</summary>
/// <param name="Sum">Sum[k] = sum over present pairs (t, t+k) of (x_t - mean)(x_{t+k} - mean).</param>
/// <param name="Pairs">Pairs[k] = number of such pairs.</param>
internal sealed record LagSums(double[] Sum, int[] Pairs);
