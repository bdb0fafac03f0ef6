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
        => Pool(tracks, weights, out pairs, lags, null);

    /// <summary>The same, for the multiplicities <paramref name="weights"/> of a resample split by units
    /// (<paramref name="split"/>, from <see cref="Statistics.UnitSplit.Split"/>; null: pooled track by track): the sums are
    /// then formed from the sum over all tracks and per-unit sums.</summary>
    /// <remarks>Every bootstrap, jackknife and leave-one-out fit pools the same tracks with other weights (20 000 times a
    /// run on the benchmark movie). The sums are exact: each track's lag sums are held as integers in units of 2^-s
    /// (<see cref="PooledTable"/>) and added in 128-bit integers, then rounded once to a double. So the pooled values do
    /// not depend on the order of the tracks or on how the sum is formed (track by track, or per unit), and the fits on
    /// them (whose minimum is located only to about the square root of the double precision, 1.5e-8) are the same
    /// whichever way the resample was pooled (docs/statistics.md#within-movie-intervals).</remarks>
    public static double[] Pool(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, out long[] pairs, int lags, Statistics.UnitSplit.Parts? split)
    {
        var table = PooledTable.Of(tracks);
        if (table is null) { pairs = []; return []; }
        int K = Math.Min(lags, table.Lags);
        var sums = new Int128[K];
        var counts = new long[K];
        var bad = new long[K];
        if (split is not null) table.AddByUnits(split, sums, counts, bad);
        else table.AddByTracks(weights, sums, counts, bad);
        var c = new double[K];
        pairs = counts;
        for (int k = 0; k < K; k++)
            c[k] = bad[k] > 0 ? double.NaN : counts[k] > 0 ? table.ToDouble(sums[k]) / counts[k] : double.NaN;
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

/// <summary>The lag sums and pair counts of a list of tracks as contiguous row-major integer tables (row i = track i),
/// built once per list and cached while the list lives: sums as Int128 multiples of 2^-<see cref="Shift"/>, exact for every
/// double at or above 2^-Shift (about 2^-85 times the largest sum; smaller ones are rounded to that step), so weighted sums
/// over tracks are exact and independent of their order. Non-finite sums are kept out of the integers and flagged: a lag
/// whose weighted tracks include one is NaN, as a floating-point sum would be.</summary>
internal sealed class PooledTable
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<IReadOnlyList<LagSums>, PooledTable> Cache = new();
    private readonly LagSums[] _tracks;
    private readonly Int128[] _sums;
    private readonly long[] _pairs, _bad;
    private readonly int _stride;
    private readonly bool _anyBad;
    private UnitRows? _units;

    /// <summary>The sums over all tracks and per unit of one split.</summary>
    private sealed record UnitRows(Statistics.UnitSplit Split, Int128[] Sums, long[] Pairs, long[] Bad, Int128[] UnitSums, long[] UnitPairs, long[] UnitBad);

    /// <summary>Lags per track (the longest track's; shorter rows are padded with zero sums and pairs).</summary>
    public int Lags => _stride;
    /// <summary>The sums are integers in units of 2^-Shift.</summary>
    public int Shift { get; }

    private PooledTable(LagSums[] tracks, int stride)
    {
        _tracks = tracks; _stride = stride;
        double max = 0;
        foreach (var t in tracks) foreach (var v in t.Sum) if (double.IsFinite(v)) max = Math.Max(max, Math.Abs(v));
        // |sum| <= (sum of |weights|) 2^(e + 1 + Shift) = (sum of |weights|) 2^86 < 2^127 for up to 2^40 weighted tracks.
        Shift = max > 0 ? 85 - Math.ILogB(max) : 0;
        _sums = new Int128[tracks.Length * stride]; _pairs = new long[tracks.Length * stride]; _bad = new long[tracks.Length * stride];
        for (int i = 0; i < tracks.Length; i++)
        {
            var t = tracks[i];
            for (int k = 0; k < t.Sum.Length; k++)
            {
                double v = t.Sum[k];
                if (double.IsFinite(v)) _sums[i * stride + k] = (Int128)Math.Round(Math.ScaleB(v, Shift));
                else { _bad[i * stride + k] = 1; _anyBad = true; }
                _pairs[i * stride + k] = t.Pairs[k];
            }
        }
    }

    /// <summary>An exact sum back to the nearest double.</summary>
    public double ToDouble(Int128 sum) => Math.ScaleB((double)sum, -Shift);

    /// <summary>Adds sum_i w_i row_i (lags 0..sums.Length - 1) track by track; empty weights = all 1.</summary>
    public void AddByTracks(ReadOnlySpan<int> weights, Span<Int128> sums, Span<long> pairs, Span<long> bad)
    {
        for (int i = 0; i < _tracks.Length; i++)
        {
            int w = weights.Length == 0 ? 1 : weights[i];
            if (w != 0) AddRow(_sums.AsSpan(i * _stride), _pairs.AsSpan(i * _stride), _bad.AsSpan(i * _stride), w, sums, pairs, bad);
        }
    }

    /// <summary>Adds the same sums for the multiplicities of a resample of <paramref name="split"/>'s units: the sum over all
    /// tracks, plus each changed unit's sum times its change, plus each correction (<see cref="Statistics.UnitSplit"/>).
    /// Exact, so equal to <see cref="AddByTracks"/>.</summary>
    public void AddByUnits(Statistics.UnitSplit.Parts split, Span<Int128> sums, Span<long> pairs, Span<long> bad)
    {
        var t = UnitTotals(split.Of);
        int u = split.Of.Units;
        var (change, corrections) = (split.UnitChange, split.Corrections);
        AddRow(t.Sums, t.Pairs, t.Bad, 1, sums, pairs, bad);
        for (int j = 0; j < u; j++)
            if (change[j] != 0) AddRow(t.UnitSums.AsSpan(j * _stride), t.UnitPairs.AsSpan(j * _stride), t.UnitBad.AsSpan(j * _stride), change[j], sums, pairs, bad);
        foreach (var (i, d) in corrections) AddRow(_sums.AsSpan(i * _stride), _pairs.AsSpan(i * _stride), _bad.AsSpan(i * _stride), d, sums, pairs, bad);
    }

    private void AddRow(ReadOnlySpan<Int128> rowSums, ReadOnlySpan<long> rowPairs, ReadOnlySpan<long> rowBad, int w, Span<Int128> sums, Span<long> pairs, Span<long> bad)
    {
        int K = sums.Length;
        if (w == 1)
            for (int k = 0; k < K; k++) { sums[k] += rowSums[k]; pairs[k] += rowPairs[k]; }
        else
            for (int k = 0; k < K; k++) { sums[k] += w * rowSums[k]; pairs[k] += w * rowPairs[k]; }
        if (_anyBad) for (int k = 0; k < K; k++) bad[k] += w * rowBad[k];
    }

    private UnitRows UnitTotals(Statistics.UnitSplit split)
    {
        // Read without the lock (a reference read is atomic); the lock only guards building (every parallel fit asks).
        if (Volatile.Read(ref _units) is { } seen && ReferenceEquals(seen.Split, split)) return seen;
        lock (_sums)
        {
            if (_units is { } hit && ReferenceEquals(hit.Split, split)) return hit;
            if (split.UnitOfItem.Length != _tracks.Length) throw new ArgumentException($"the split covers {split.UnitOfItem.Length} items, the table {_tracks.Length} tracks");
            var sums = new Int128[_stride]; var pairs = new long[_stride]; var bad = new long[_stride];
            var us = new Int128[split.Units * _stride]; var up = new long[split.Units * _stride]; var ub = new long[split.Units * _stride];
            for (int i = 0; i < _tracks.Length; i++)
            {
                int u = split.UnitOfItem[i];
                ReadOnlySpan<Int128> rs = _sums.AsSpan(i * _stride, _stride);
                ReadOnlySpan<long> rp = _pairs.AsSpan(i * _stride, _stride), rb = _bad.AsSpan(i * _stride, _stride);
                AddRow(rs, rp, rb, 1, sums, pairs, bad);
                AddRow(rs, rp, rb, 1, us.AsSpan(u * _stride, _stride), up.AsSpan(u * _stride, _stride), ub.AsSpan(u * _stride, _stride));
            }
            var rows = new UnitRows(split, sums, pairs, bad, us, up, ub);
            Volatile.Write(ref _units, rows);
            return rows;
        }
    }

    /// <summary>The table of <paramref name="tracks"/> (null when there are none): cached, and rebuilt when the list no longer
    /// holds the same tracks.</summary>
    public static PooledTable? Of(IReadOnlyList<LagSums> tracks)
    {
        if (tracks.Count == 0) return null;
        if (Cache.TryGetValue(tracks, out var hit) && hit.Holds(tracks)) return hit;
        int stride = 0;
        var copy = new LagSums[tracks.Count];
        for (int i = 0; i < copy.Length; i++) { copy[i] = tracks[i]; stride = Math.Max(stride, copy[i].Sum.Length); }
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
