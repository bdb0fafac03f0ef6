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
    /// <remarks>Every bootstrap and leave-one-out fit pools the same tracks with other weights (20 000 times a run on the
    /// benchmark movie), so the tracks' sums are laid out once in one contiguous table (<see cref="PooledTable"/>) and
    /// each track adds a vector-wide w x row: per element the same multiply and add, in the same track order, as the
    /// scalar loop, so the sums are bit-identical (bench/README.md).</remarks>
    public static double[] Pool(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, out long[] pairs, int lags)
    {
        int K = tracks.Count > 0 ? Math.Min(lags, tracks[0].Sum.Length) : 0;
        var c = new double[K];
        var counts = new double[K];   // pair counts as doubles: integers far below 2^53, so exact
        var table = PooledTable.Of(tracks);
        for (int i = 0; i < tracks.Count; i++)
        {
            int w = weights.Length == 0 ? 1 : weights[i];
            if (w == 0) continue;
            if (table is not null)
            {
                SpanMath.AddScaled(c, table.Sums(i, K), w);
                SpanMath.AddScaled(counts, table.Pairs(i, K), w);
            }
            else
            {
                var track = tracks[i];
                for (int k = 0; k < K; k++) { c[k] += w * track.Sum[k]; counts[k] += (double)w * track.Pairs[k]; }
            }
        }
        pairs = new long[K];
        for (int k = 0; k < K; k++)
        {
            pairs[k] = (long)counts[k];
            c[k] = pairs[k] > 0 ? c[k] / pairs[k] : double.NaN;
        }
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

/// <summary>The lag sums and pair counts of a list of tracks in two contiguous row-major tables (row i = track i), built once
/// per list and cached while the list lives; null when the tracks' lag counts differ (callers then read the tracks).</summary>
internal sealed class PooledTable
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<IReadOnlyList<LagSums>, PooledTable> Cache = new();
    private readonly LagSums[] _tracks;
    private readonly double[] _sums, _pairs;
    private readonly int _stride;

    private PooledTable(LagSums[] tracks, int stride)
    {
        _tracks = tracks; _stride = stride;
        _sums = new double[tracks.Length * stride]; _pairs = new double[tracks.Length * stride];
        for (int i = 0; i < tracks.Length; i++)
        {
            tracks[i].Sum.CopyTo(_sums, i * stride);
            for (int k = 0; k < stride; k++) _pairs[i * stride + k] = tracks[i].Pairs[k];
        }
    }

    /// <summary>Track i's lag sums, lags 0..K-1.</summary>
    public ReadOnlySpan<double> Sums(int i, int K) => _sums.AsSpan(i * _stride, K);

    /// <summary>Track i's pair counts, lags 0..K-1.</summary>
    public ReadOnlySpan<double> Pairs(int i, int K) => _pairs.AsSpan(i * _stride, K);

    /// <summary>The table of <paramref name="tracks"/>: cached, and rebuilt when the list no longer holds the same tracks.</summary>
    public static PooledTable? Of(IReadOnlyList<LagSums> tracks)
    {
        if (tracks.Count == 0) return null;
        if (Cache.TryGetValue(tracks, out var hit) && hit.Holds(tracks)) return hit;
        int stride = tracks[0].Sum.Length;
        var copy = new LagSums[tracks.Count];
        for (int i = 0; i < copy.Length; i++)
        {
            copy[i] = tracks[i];
            if (copy[i].Sum.Length != stride || copy[i].Pairs.Length != stride) return null;
        }
        var table = new PooledTable(copy, stride);
        Cache.AddOrUpdate(tracks, table);
        return table;
    }

    private bool Holds(IReadOnlyList<LagSums> tracks)
    {
        if (tracks.Count != _tracks.Length) return false;
        for (int i = 0; i < _tracks.Length; i++) if (!ReferenceEquals(tracks[i], _tracks[i])) return false;
        return true;
    }
}
