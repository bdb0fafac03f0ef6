namespace ShapeNoise.TimeSeries;

/// <summary>Result of fitting the mean-subtracted autocovariance of an Ornstein-Uhlenbeck signal plus white noise.</summary>
/// <param name="Rho">Lag-1 correlation of the signal, exp(-dt/tau).</param>
/// <param name="TauFrames">Correlation time in frames, -1 / ln rho.</param>
/// <param name="SignalVariance">Stationary variance of the OU signal, sigma^2 (measurement noise removed).</param>
/// <param name="NoiseVariance">Variance of the white measurement noise, eta^2.</param>
/// <param name="UncorrectedTauFrames">-1 / ln C(1) of the raw pooled autocorrelation: what ignoring both biases would give.</param>
internal readonly record struct OuFit(double Rho, double TauFrames, double SignalVariance, double NoiseVariance, double UncorrectedTauFrames);

/// <summary>
/// Correlation time of an Ornstein-Uhlenbeck process seen in many short tracks, corrected for the bias that subtracting
/// each track's own mean introduces, by fitting the exact expected value of the pooled mean-subtracted autocovariance.
/// </summary>
/// <remarks>
/// For a stationary series with autocovariance gamma(h), centred on its own mean over n samples,
/// E[sum_t (x_t - xbar)(x_{t+k} - xbar)] = sum_t [gamma(k) - a_t - a_{t+k} + b], a_t = (1/n) sum_u gamma(t - u),
/// b = (1/n^2) sum_{u,v} gamma(u - v). With gamma(h) = sigma^2 rho^|h| + eta^2 [h = 0] (OU signal sampled at the frame
/// interval plus white measurement noise) every term is a geometric sum, so the expectation is linear in sigma^2 and
/// eta^2 and closed-form in rho. The pooled estimate is fitted by weighted least squares over lags 0..K (weights = pair
/// counts): sigma^2 and eta^2 in closed form for each rho, rho by a grid over log tau refined by golden section.
/// To first order in 1/n the expectation is the textbook E[c(k)] = gamma(k) - Var(xbar) (Priestley M.B. (1981), Spectral
/// Analysis and Time Series, Academic Press, sec. 5.3), so the pooled lag-1 autocorrelation C(1) is biased by
/// -(1 + rho)/n; the classical single-series result E[r1] = rho - (1 + 3 rho)/n (Marriott F.H.C. and Pope J.A. (1954),
/// "Bias in the estimation of autocorrelations", Biometrika 41:390-402; Kendall M.G. (1954), Biometrika 41:403-404) adds
/// the numerator-denominator correlation of a single ratio, which pooling over tracks removes. The fit is exact for any n, any mix of
/// track lengths and gaps, rather than first-order. The OU autocorrelation exp(-|t|/tau) is that of
/// Uhlenbeck G.E. and Ornstein L.S. (1930), "On the theory of the Brownian motion", Phys. Rev. 36:823-841.
/// </remarks>
internal static class OrnsteinUhlenbeckFit
{
    /// <summary>Shortest tau (frames) of the search range.</summary>
    public const double MinTauFrames = 0.05;

    /// <summary>
    /// Expected lagged sums per unit sigma^2 (<paramref name="signal"/>) and per unit eta^2 (<paramref name="noise"/>) of a
    /// contiguous track of n samples, lags 0..K, for the OU signal with lag-1 correlation rho. Closed form.
    /// </summary>
    public static void ExpectedSumsContiguous(int n, double rho, Span<double> signal, Span<double> noise)
    {
        Span<double> pow = n < 512 ? stackalloc double[n + 1] : new double[n + 1];
        Powers(rho, pow);
        ExpectedSumsContiguous(n, rho, pow, signal, noise);
    }

    /// <summary>pow[j] = Math.Pow(rho, j) for every j of the span: the powers <see cref="ExpectedSumsContiguous(int, double, ReadOnlySpan{double}, Span{double}, Span{double})"/>
    /// reads, computed once for all the track lengths of one objective evaluation (the same values as calling Math.Pow there).</summary>
    public static void Powers(double rho, Span<double> pow)
    {
        for (int j = 0; j < pow.Length; j++) pow[j] = Math.Pow(rho, j);
    }

    /// <summary><see cref="ExpectedSumsContiguous(int, double, Span{double}, Span{double})"/> with the powers rho^j (j = 0..n)
    /// given: <paramref name="pow"/>[j] = Math.Pow(rho, j), at least n + 1 of them.</summary>
    public static void ExpectedSumsContiguous(int n, double rho, ReadOnlySpan<double> pow, Span<double> signal, Span<double> noise)
    {
        ExpectedSignalContiguous(n, rho, pow, signal);
        ExpectedNoiseContiguous(n, noise);
    }

    /// <summary>The signal part of <see cref="ExpectedSumsContiguous(int, double, ReadOnlySpan{double}, Span{double}, Span{double})"/>:
    /// the expected lagged sums per unit sigma^2.</summary>
    public static void ExpectedSignalContiguous(int n, double rho, ReadOnlySpan<double> pow, Span<double> signal)
    {
        double q = 1 - rho;
        double b = (n * (1 + rho) / q - 2 * rho * (1 - pow[n]) / (q * q)) / ((double)n * n);
        double twoOverNq = 2.0 / (n * q);
        for (int k = 0; k < signal.Length; k++)
        {
            int m = n - k;
            if (m <= 0) { signal[k] = 0; continue; }
            double rk = pow[k];
            double sumA = twoOverNq * (m * (1 + rho) - (rho + rk * rho) * (1 - pow[m]) / q);
            signal[k] = m * rk + m * b - sumA;
        }
    }

    /// <summary>The noise part: the expected lagged sums per unit eta^2, ([k = 0] m - m / n) with m = n - k (0 beyond the
    /// track), the same for every rho.</summary>
    public static void ExpectedNoiseContiguous(int n, Span<double> noise)
    {
        for (int k = 0; k < noise.Length; k++)
        {
            int m = n - k;
            noise[k] = m <= 0 ? 0 : (k == 0 ? m : 0) - (double)m / n;
        }
    }

    /// <summary>The same expectation for any set of frames (gaps allowed), by direct summation: O(n^2 + nK).</summary>
    public static void ExpectedSums(ReadOnlySpan<int> frames, double rho, Span<double> signal, Span<double> noise)
    {
        int n = frames.Length;
        var a = new double[n];
        double b = 0;
        for (int i = 0; i < n; i++)
        {
            double s = 0;
            for (int j = 0; j < n; j++) s += Math.Pow(rho, Math.Abs(frames[i] - frames[j]));
            a[i] = s / n; b += s;
        }
        b /= (double)n * n;
        signal.Clear(); noise.Clear();
        int f0 = frames[0], span = frames[n - 1] - f0 + 1;
        var at = new int[span];
        Array.Fill(at, -1);
        for (int i = 0; i < n; i++) at[frames[i] - f0] = i;
        for (int i = 0; i < n; i++)
            for (int k = 0; k < signal.Length && frames[i] - f0 + k < span; k++)
            {
                int j = at[frames[i] - f0 + k];
                if (j < 0) continue;
                signal[k] += Math.Pow(rho, k) - a[i] - a[j] + b;
                noise[k] += (k == 0 ? 1 : 0) - 1.0 / n;
            }
    }

    /// <summary>Fitted tau (frames) with its seeded percentile-bootstrap 95% interval over tracks; at_bound (upper, bound = the
    /// longest track) when tau exceeds the longest track (docs/dynamics.md#fitted-times-at-a-search-bound-at_bound).</summary>
    public static Statistics.Estimate TauWithInterval(IReadOnlyList<LagSums> tracks, IReadOnlyList<int[]> frames, int fitLags, int resamples, int seed)
        => Statistics.Bootstrap.Percentile(tracks.Count, w => Fit(tracks, frames, w, fitLags).TauFrames, resamples, seed)
            .WithResolutionLimit(frames.Count == 0 ? double.NaN : frames.Max(f => f.Length == 0 ? 0 : f[^1] - f[0] + 1));

    /// <summary>
    /// The pooled autocorrelation the fitted model predicts for these tracks, lags 0..K: E[c(k)] / E[c(0)], including
    /// the mean-subtraction bias and the measurement noise at lag 0.
    /// </summary>
    public static double[] ModelCorrelation(IReadOnlyList<int[]> frames, OuFit fit, int maxLag)
    {
        int K = maxLag + 1;
        var e = new double[K]; var p = new double[K]; var tS = new double[K]; var tN = new double[K];
        foreach (var f in frames)
        {
            if (f[^1] - f[0] == f.Length - 1) ExpectedSumsContiguous(f.Length, fit.Rho, tS, tN);
            else ExpectedSums(f, fit.Rho, tS, tN);
            for (int k = 0; k < K; k++) { e[k] += fit.SignalVariance * tS[k] + fit.NoiseVariance * tN[k]; p[k] += Math.Max(0, f[^1] - f[0] + 1 - k); }
        }
        var c = new double[K];
        for (int k = 0; k < K; k++) c[k] = p[k] > 0 ? e[k] / p[k] : double.NaN;
        double c0 = c[0];
        for (int k = 0; k < K; k++) c[k] /= c0;
        return c;
    }

    /// <summary>
    /// Fits the pooled lagged sums of <paramref name="tracks"/> (with bootstrap multiplicities <paramref name="weights"/>,
    /// empty = all 1) over lags 0..<paramref name="fitLags"/>. <paramref name="frames"/> gives each track's frames; tau is
    /// searched in [<see cref="MinTauFrames"/>, <paramref name="maxTauFrames"/>] (0 = 20 x the longest weighted track).
    /// </summary>
    /// <remarks>About 70 lines on purpose: the least-squares objective (closed-form s2, e2 for each rho) is a local function
    /// over the track groups it closes on; it runs once per grid point per bootstrap resample, so the groups are built once
    /// here rather than passed around. With <paramref name="split"/> (the weights split by the units of the plan they were
    /// drawn from), the pooled sums and the groups are formed per unit (<see cref="Statistics.UnitSplit"/>,
    /// <see cref="UnitGroups"/>): the same numbers, bit for bit, as without it (docs/statistics.md#how-a-resample-is-pooled).</remarks>
    public static OuFit Fit(IReadOnlyList<LagSums> tracks, IReadOnlyList<int[]> frames, ReadOnlySpan<int> weights, int fitLags, double maxTauFrames = 0,
        Statistics.UnitSplit.Parts? split = null)
    {
        int K = fitLags + 1;
        var c = PooledAutocovariance.Pool(tracks, weights, out var pairs, Math.Max(K, 2), split);   // only the fitted lags (and lag 1)
        if (c.Length < 2 || !(c[0] > 0) || pairs[1] == 0) return new OuFit(double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);
        K = Math.Min(K, c.Length);
        double r1 = c[1] / c[0];
        double uncorrected = r1 > 0 && r1 < 1 ? -1 / Math.Log(r1) : double.NaN;

        var (groups, gaps) = split is not null ? UnitGroups.Of(frames, split.Of).Groups(weights, split, K) : GroupsByTrack(frames, weights, K);
        var eS = new double[K]; var eN = new double[K]; var tS = new double[K]; var tN = new double[K];
        var target = new double[K]; var weight = new double[K];
        for (int k = 0; k < K; k++) { target[k] = c[k]; weight[k] = pairs[k]; }

        double lo = Math.Log(MinTauFrames), hi = Math.Log(maxTauFrames > 0 ? maxTauFrames : 20.0 * LongestWeightedSpan(frames, weights));
        // At the search grid's points the expectations are the same in every fit (every bootstrap resample): tabulated once.
        var tables = new GridExpectations[groups.Length];
        for (int g = 0; g < groups.Length; g++) tables[g] = GridExpectations.Of(groups[g].Length, K, lo, hi);
        // rho^j for j up to the longest group length (and the lags): once per evaluation, read by every group.
        int longest = K;
        foreach (var (len, _) in groups) longest = Math.Max(longest, len);
        var pow = new double[longest + 1];
        // The noise part does not depend on rho: summed once, in the order every evaluation summed it before.
        for (int gi = 0; gi < groups.Length; gi++)
        {
            ExpectedNoiseContiguous(groups[gi].Length, tN);
            SpanMath.AddScaled(eN, tN, groups[gi].Weight);
        }
        gaps.AddNoiseTo(eN);
        double Objective(double rho, int grid, out double s2, out double e2)
        {
            Array.Clear(eS);
            if (grid < 0) Powers(rho, pow);
            for (int gi = 0; gi < groups.Length; gi++)
            {
                var (len, gw) = groups[gi];
                // eS += gw x (the group's expectation): a multiply then an add per element, vector-wide (the scalar loop's rounding).
                if (grid >= 0) { SpanMath.AddScaled(eS, tables[gi].Signal[grid].AsSpan(0, K), gw); continue; }
                ExpectedSignalContiguous(len, rho, pow, tS);
                SpanMath.AddScaled(eS, tS, gw);
            }
            gaps.AddSignalTo(rho, eS);
            // Model of the pooled estimate: E[c(k)] = (sigma^2 eS[k] + eta^2 eN[k]) / pairs[k].
            double saa = 0, sab = 0, sbb = 0, sya = 0, syb = 0;
            for (int k = 0; k < K; k++)
            {
                if (weight[k] <= 0) continue;
                double A = eS[k] / pairs[k], B = eN[k] / pairs[k], y = target[k], wk = weight[k];
                saa += wk * A * A; sab += wk * A * B; sbb += wk * B * B; sya += wk * y * A; syb += wk * y * B;
            }
            double det = saa * sbb - sab * sab;
            s2 = det != 0 ? (sya * sbb - syb * sab) / det : 0;
            e2 = det != 0 ? (syb * saa - sya * sab) / det : 0;
            if (e2 < 0) { e2 = 0; s2 = saa > 0 ? sya / saa : 0; }
            if (s2 < 0) { s2 = 0; e2 = sbb > 0 ? syb / sbb : 0; }
            double sse = 0;
            for (int k = 0; k < K; k++)
            {
                if (weight[k] <= 0) continue;
                double r = target[k] - (s2 * eS[k] + e2 * eN[k]) / pairs[k];
                sse += weight[k] * r * r;
            }
            return sse;
        }

        // Grid over log tau from 0.05 frame to 20 x the longest track (or the caller's bound), then golden-section refinement.
        double logTau = Statistics.Minimize.GridThenGolden(lt => Objective(Math.Exp(-1 / Math.Exp(lt)), Statistics.Minimize.GridIndexOf(lt, lo, hi), out _, out _), lo, hi);
        double tau = Math.Exp(logTau), rho = Math.Exp(-1 / tau);
        Objective(rho, -1, out var sig2, out var eta2);
        return new OuFit(rho, tau, sig2, eta2, uncorrected);
    }

    /// <summary>The tracks with a multiplicity, grouped by shape: contiguous tracks of the same length share one expectation
    /// (groups by increasing length, the order the objective sums them in, whichever tracks a resample holds); gapped tracks'
    /// expectations are linear in the powers rho^h, so their weighted lag structure is summed once per fit (not once per
    /// rho) and each objective costs O(K x span) for all of them together.</summary>
    private static ((int Length, long Weight)[] Groups, GapLags Gaps) GroupsByTrack(IReadOnlyList<int[]> frames, ReadOnlySpan<int> weights, int K)
    {
        var shapes = TrackShapes.Of(frames);
        var groupWeight = new long[shapes.LongestContiguous + 1];
        var gapped = new List<(int[] Frames, int W)>();
        for (int i = 0; i < frames.Count; i++)
        {
            int wi = weights.Length == 0 ? 1 : weights[i];
            if (wi == 0) continue;
            int len = shapes.ContiguousLength[i];
            if (len < 0) gapped.Add((frames[i], wi));
            else groupWeight[len] += wi;
        }
        return (Increasing(groupWeight), GapLags.Sum(gapped, K));
    }

    /// <summary>The longest span (frames) among the tracks with a multiplicity (at least 1): the default upper bound of the
    /// tau search is 20 times it.</summary>
    private static int LongestWeightedSpan(IReadOnlyList<int[]> frames, ReadOnlySpan<int> weights)
    {
        var span = TrackShapes.Of(frames).Span;
        int maxLen = 1;
        for (int i = 0; i < span.Length; i++) if (weights.Length == 0 || weights[i] != 0) maxLen = Math.Max(maxLen, span[i]);
        return maxLen;
    }

    /// <summary>The lengths with a positive weight, by increasing length.</summary>
    internal static (int Length, long Weight)[] Increasing(long[] groupWeight)
    {
        var groups = new List<(int Length, long Weight)>();
        for (int len = 0; len < groupWeight.Length; len++) if (groupWeight[len] > 0) groups.Add((len, groupWeight[len]));
        return groups.ToArray();
    }
}

/// <summary>The signal part of <see cref="OrnsteinUhlenbeckFit.ExpectedSumsContiguous(int, double, Span{double}, Span{double})"/>
/// (<see cref="OrnsteinUhlenbeckFit.ExpectedSignalContiguous"/>) of a track of n frames at the points of the fit's search
/// grid over log tau in [lo, hi] (rho = exp(-1 / exp(log tau)), the fit's own expression), lags 0..K-1: the same numbers
/// in every bootstrap fit, computed once (bench/README.md). The noise part does not depend on rho and is summed once per fit.</summary>
internal sealed record GridExpectations(double[][] Signal)
{
    private static readonly System.Collections.Concurrent.ConcurrentDictionary<(int N, int K, double Lo, double Hi), GridExpectations> Cache = new();

    public static GridExpectations Of(int n, int K, double lo, double hi)
    {
        if (Cache.TryGetValue((n, K, lo, hi), out var hit)) return hit;
        if (Cache.Count > 4096) Cache.Clear();   // bounded: a run needs one entry per track length (Count locks: only on a miss)
        return Cache.GetOrAdd((n, K, lo, hi), static key =>
        {
            int points = Statistics.Minimize.DefaultGrid + 1;
            var s = new double[points][];
            var pow = new double[key.N + 1];
            for (int g = 0; g < points; g++)
            {
                s[g] = new double[key.K];
                double rho = Math.Exp(-1 / Math.Exp(Statistics.Minimize.GridPoint(key.Lo, key.Hi, g)));
                OrnsteinUhlenbeckFit.Powers(rho, pow);
                OrnsteinUhlenbeckFit.ExpectedSignalContiguous(key.N, rho, pow, s[g]);
            }
            return new GridExpectations(s);
        });
    }
}

/// <summary>Per track: the span f_last - f_first + 1 (frames) and the length when the frames are contiguous (-1 with
/// gaps); computed once per frame list and cached, since every bootstrap fit groups the same tracks.</summary>
internal sealed class TrackShapes
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<IReadOnlyList<int[]>, TrackShapes> Cache = new();

    public int[] Span { get; }
    public int[] ContiguousLength { get; }
    public int LongestContiguous { get; }

    private TrackShapes(IReadOnlyList<int[]> frames)
    {
        Span = new int[frames.Count]; ContiguousLength = new int[frames.Count];
        for (int i = 0; i < frames.Count; i++)
        {
            var f = frames[i];
            Span[i] = f[^1] - f[0] + 1;
            ContiguousLength[i] = f[^1] - f[0] == f.Length - 1 ? f.Length : -1;
            LongestContiguous = Math.Max(LongestContiguous, ContiguousLength[i]);
        }
    }

    public static TrackShapes Of(IReadOnlyList<int[]> frames) => Cache.GetValue(frames, static f => new TrackShapes(f));
}

/// <summary>The track groups of <see cref="OrnsteinUhlenbeckFit.Fit"/> for resamples of units (<see cref="Statistics.UnitSplit"/>):
/// the number of contiguous tracks of each length over all tracks and per unit, built once per frame list and split; a
/// resample's counts are then the totals plus each changed unit's and each correction's, instead of a pass over every
/// track. The gapped tracks (few: one-frame errors) are summed track by track, in track order, as the pass over the tracks
/// does, so the groups, their order and the gapped sum are those of that pass.</summary>
internal sealed class UnitGroups
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<IReadOnlyList<int[]>, UnitGroups> Cache = new();
    private readonly IReadOnlyList<int[]> _frames;
    private readonly Statistics.UnitSplit _split;
    private readonly TrackShapes _shapes;
    private readonly long[] _total;                            // contiguous tracks per length, all tracks
    private readonly (int Length, int Count)[][] _unitGroups;  // the same per unit
    private readonly int[] _gapped;                            // the tracks with gaps, in order

    private UnitGroups(IReadOnlyList<int[]> frames, Statistics.UnitSplit split)
    {
        _frames = frames; _split = split; _shapes = TrackShapes.Of(frames);
        if (split.UnitOfItem.Length != frames.Count) throw new ArgumentException($"the split covers {split.UnitOfItem.Length} items, there are {frames.Count} tracks");
        _total = new long[_shapes.LongestContiguous + 1];
        var gapped = new List<int>();
        for (int i = 0; i < frames.Count; i++)
        {
            int len = _shapes.ContiguousLength[i];
            if (len < 0) gapped.Add(i); else _total[len]++;
        }
        _gapped = gapped.ToArray();
        _unitGroups = new (int, int)[split.Units][];
        var count = new SortedDictionary<int, int>();
        for (int u = 0; u < split.Units; u++)
        {
            count.Clear();
            foreach (int i in split.Members[u])
                if (_shapes.ContiguousLength[i] is var len and >= 0) count[len] = count.GetValueOrDefault(len) + 1;
            _unitGroups[u] = count.Select(kv => (kv.Key, kv.Value)).ToArray();
        }
    }

    /// <summary>The groups of <paramref name="frames"/> for resamples of <paramref name="split"/>'s units (cached per frame list).</summary>
    public static UnitGroups Of(IReadOnlyList<int[]> frames, Statistics.UnitSplit split)
    {
        if (Cache.TryGetValue(frames, out var hit) && ReferenceEquals(hit._split, split)) return hit;
        var g = new UnitGroups(frames, split);
        Cache.AddOrUpdate(frames, g);
        return g;
    }

    /// <summary>The groups by increasing length (those with a positive weight) and the gapped tracks' summed structure over
    /// <paramref name="lags"/> lags, for <paramref name="weights"/> split into <paramref name="split"/>.</summary>
    public ((int Length, long Weight)[] Groups, GapLags Gaps) Groups(ReadOnlySpan<int> weights, Statistics.UnitSplit.Parts split, int lags)
    {
        int u = _split.Units;
        var (change, corrections) = (split.UnitChange, split.Corrections);
        var gw = new long[_total.Length];
        _total.CopyTo(gw, 0);
        for (int j = 0; j < u; j++)
            if (change[j] != 0) foreach (var (len, n) in _unitGroups[j]) gw[len] += (long)change[j] * n;
        foreach (var (i, d) in corrections)
            if (_shapes.ContiguousLength[i] is var len and >= 0) gw[len] += d;
        var gapped = new List<(int[] Frames, int W)>();
        foreach (int i in _gapped) if (weights[i] != 0) gapped.Add((_frames[i], weights[i]));
        return (OrnsteinUhlenbeckFit.Increasing(gw), GapLags.Sum(gapped, lags));
    }
}

/// <summary>
/// The expected lagged sums of <see cref="OrnsteinUhlenbeckFit.ExpectedSums"/> for a track with gaps, rewritten as a
/// polynomial in rho: with frames f_i (n of them), d_i[h] = #{j : |f_i - f_j| = h}, P[k] = #{pairs f_j - f_i = k},
/// m_i[k] = [f_i + k seen] + [f_i - k seen] (2 at k = 0) and D[h] = sum_i d_i[h],
/// E_signal[k] = P[k] rho^k + sum_h Q[k, h] rho^h with Q[k, h] = P[k] D[h] / n^2 - (1/n) sum_i m_i[k] d_i[h],
/// and E_noise[k] = P[k] ([k = 0] - 1/n), independent of rho. The weighted sum over tracks of P and Q is formed once, so
/// every evaluation of the fit's objective costs O(K x span) however many tracks have gaps (docs/measures.md#one-frame-errors).
/// </summary>
/// <remarks>Same expectation as the direct summation (Priestley M.B. (1981), Spectral Analysis and Time Series, sec. 5.3,
/// for E[c(k)] of a mean-centred series), reordered; each track's structure is computed once per run and cached.</remarks>
internal sealed class GapLags
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<int[], GapLags> Cache = new();
    private readonly int _lags, _span;
    private readonly double[] _pairs, _noise, _q;       // P[k]; P[k]([k=0] - 1/n); Q[k * span + h]

    private GapLags(int lags, int span, double[] pairs, double[] noise, double[] q)
    { _lags = lags; _span = span; _pairs = pairs; _noise = noise; _q = q; }

    /// <summary>The lag structure of one track's frames for lags 0..<paramref name="lags"/> - 1.</summary>
    public static GapLags Of(int[] frames, int lags)
    {
        if (Cache.TryGetValue(frames, out var hit) && hit._lags == lags) return hit;
        int n = frames.Length, f0 = frames[0], span = frames[n - 1] - f0 + 1;
        var seen = new bool[span];
        foreach (var f in frames) seen[f - f0] = true;
        var d = new int[n, span];
        var dSum = new double[span];
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++) { int h = Math.Abs(frames[i] - frames[j]); d[i, h]++; dSum[h]++; }
        var pairs = new double[lags]; var noise = new double[lags];
        var q = new double[lags * span];
        for (int k = 0; k < lags; k++)
        {
            for (int i = 0; i < n; i++)
            {
                int u = frames[i] - f0;
                bool up = u + k < span && seen[u + k], down = u - k >= 0 && seen[u - k];
                if (up) pairs[k]++;
                int m = k == 0 ? 2 : (up ? 1 : 0) + (down ? 1 : 0);
                if (m == 0) continue;
                for (int h = 0; h < span; h++) q[k * span + h] -= (double)m * d[i, h] / n;
            }
            for (int h = 0; h < span; h++) q[k * span + h] += pairs[k] * dSum[h] / ((double)n * n);
            noise[k] = pairs[k] * ((k == 0 ? 1 : 0) - 1.0 / n);
        }
        var g = new GapLags(lags, span, pairs, noise, q);
        Cache.AddOrUpdate(frames, g);
        return g;
    }

    /// <summary>The weighted sum of the tracks' structures (weights = bootstrap multiplicities).</summary>
    public static GapLags Sum(List<(int[] Frames, int W)> tracks, int lags)
    {
        int span = 1;
        var parts = new List<(GapLags G, int W)>(tracks.Count);
        foreach (var (f, w) in tracks) { var g = Of(f, lags); parts.Add((g, w)); span = Math.Max(span, g._span); }
        var pairs = new double[lags]; var noise = new double[lags]; var q = new double[lags * span];
        foreach (var (g, w) in parts)
            for (int k = 0; k < lags; k++)
            {
                pairs[k] += w * g._pairs[k]; noise[k] += w * g._noise[k];
                for (int h = 0; h < g._span; h++) q[k * span + h] += w * g._q[k * g._span + h];
            }
        return new GapLags(lags, span, pairs, noise, q);
    }

    /// <summary>Adds the expected sums per unit sigma^2 (<paramref name="signal"/>) and per unit eta^2
    /// (<paramref name="noise"/>) at lag-1 correlation <paramref name="rho"/>.</summary>
    public void AddTo(double rho, Span<double> signal, Span<double> noise)
    {
        AddSignalTo(rho, signal);
        AddNoiseTo(noise[..Math.Min(noise.Length, signal.Length)]);
    }

    /// <summary>The signal part of <see cref="AddTo"/>.</summary>
    public void AddSignalTo(double rho, Span<double> signal)
    {
        int len = Math.Max(_span, _lags);
        Span<double> pow = len <= 512 ? stackalloc double[len] : new double[len];
        pow[0] = 1;
        for (int h = 1; h < len; h++) pow[h] = pow[h - 1] * rho;
        for (int k = 0; k < _lags && k < signal.Length; k++)
        {
            double s = _pairs[k] * pow[k];
            int row = k * _span;
            for (int h = 0; h < _span; h++) s += _q[row + h] * pow[h];
            signal[k] += s;
        }
    }

    /// <summary>The noise part of <see cref="AddTo"/> (independent of rho).</summary>
    public void AddNoiseTo(Span<double> noise)
    {
        for (int k = 0; k < _lags && k < noise.Length; k++) noise[k] += _noise[k];
    }

}
