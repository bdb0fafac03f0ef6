namespace ShapeNoise.TimeSeries;

/// <summary>Autocovariance pooled over many short tracks, using only pairs of samples that are both present.</summary>
/// <remarks>
/// Each track is centred on its own mean; the pooled estimate at lag k is the sum over tracks of the lagged products
/// divided by the total number of pairs, and the autocorrelation is that divided by the pooled lag-0 value (spec
/// section 3). This is the usual pooled (panel) estimator; its bias from subtracting each short track's own mean is
/// removed downstream by <see cref="OrnsteinUhlenbeckFit"/>.
/// </remarks>
internal static class PooledAutocovariance
{
    /// <summary>Lagged sums of one track for lags 0..<paramref name="maxLag"/>; a pair needs both frames present.</summary>
    public static LagSums Of(TrackSeries s, int maxLag)
    {
        var sum = new double[maxLag + 1]; var pairs = new int[maxLag + 1];
        int n = s.Values.Length;
        if (n == 0) return new LagSums(sum, pairs);
        double mean = 0;
        for (int i = 0; i < n; i++) mean += s.Values[i];
        mean /= n;
        int f0 = s.Frames[0], span = s.Frames[^1] - f0 + 1;
        var at = new int[span];
        Array.Fill(at, -1);
        for (int i = 0; i < n; i++) at[s.Frames[i] - f0] = i;
        for (int i = 0; i < n; i++)
        {
            int fi = s.Frames[i] - f0;
            double di = s.Values[i] - mean;
            for (int k = 0; k <= maxLag && fi + k < span; k++)
            {
                int j = at[fi + k];
                if (j < 0) continue;
                sum[k] += di * (s.Values[j] - mean);
                pairs[k]++;
            }
        }
        return new LagSums(sum, pairs);
    }

    /// <summary>Pooled autocovariance c(k) = sum_i w_i Sum_i[k] / sum_i w_i Pairs_i[k] with track weights (bootstrap multiplicities).</summary>
    public static double[] Pool(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, out long[] pairs)
        => Pool(tracks, weights, out pairs, int.MaxValue);

    /// <summary>The same for lags 0..<paramref name="lags"/> - 1 only (each lag is pooled on its own, so these values are
    /// those of the full pooling; a fit over its first lags need not pool the rest).</summary>
    public static double[] Pool(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, out long[] pairs, int lags)
    {
        int K = tracks.Count > 0 ? Math.Min(lags, tracks[0].Sum.Length) : 0;
        var c = new double[K]; pairs = new long[K];
        for (int i = 0; i < tracks.Count; i++)
        {
            int w = weights.Length == 0 ? 1 : weights[i];
            if (w == 0) continue;
            for (int k = 0; k < K; k++) { c[k] += w * tracks[i].Sum[k]; pairs[k] += (long)w * tracks[i].Pairs[k]; }
        }
        for (int k = 0; k < K; k++) c[k] = pairs[k] > 0 ? c[k] / pairs[k] : double.NaN;
        return c;
    }

    /// <summary>Autocorrelation C(k) = c(k) / c(0).</summary>
    public static double[] Correlation(double[] c)
    {
        var r = new double[c.Length];
        for (int k = 0; k < c.Length; k++) r[k] = c[k] / c[0];
        return r;
    }
}
