using ShapeNoise.TimeSeries;
using System.Collections.Concurrent;
using ShapeNoise.Dynamics;
using ShapeNoise.Statistics;

namespace ShapeNoise.Fluctuations;

/// <summary>One fluctuation coordinate under the temporal noise model (px, frames): x = Ornstein-Uhlenbeck signal
/// (variance s2, time tau) + white measurement noise (variance e2) (docs/measures.md#temporal-noise-model).</summary>
/// <param name="Name">"L", "W", "along" or "across".</param>
/// <param name="SignalVariancePx2">s2, the fluctuation with the noise and the finite-track shrinkage removed.</param>
/// <param name="NoiseVariancePx2">e2, the white measurement noise.</param>
/// <param name="TauFrames">tau of the signal (at_bound when the fit reaches its search bound).</param>
/// <param name="DPx2PerFrame">D = s2 / tau.</param>
/// <param name="RawVariancePx2">The pooled raw sample variance c(0) = sum_i N_i v_i / sum_i N_i.</param>
public sealed record TemporalCoordinate(string Name, Estimate SignalVariancePx2, Estimate NoiseVariancePx2, Estimate TauFrames,
    Estimate DPx2PerFrame, double RawVariancePx2);

/// <summary>The four coordinates of the temporal noise model with the headline ratios built from their signal variances.</summary>
/// <param name="L">Cell length L.</param>
/// <param name="W">Cell width W.</param>
/// <param name="Along">Pole-sector normal displacements (gives var_along).</param>
/// <param name="Across">Flank-sector normal displacements (gives var_across).</param>
/// <param name="Anisotropy">s2_L / s2_W.</param>
/// <param name="AnisotropyContour">s2_along / s2_across.</param>
/// <param name="FitLags">Lags 0..FitLags fitted (frames).</param>
public sealed record TemporalNoiseResult(TemporalCoordinate L, TemporalCoordinate W, TemporalCoordinate Along, TemporalCoordinate Across,
    Estimate Anisotropy, Estimate AnisotropyContour, int FitLags)
{
    /// <summary>The coordinates in the order L, W, along, across.</summary>
    public IReadOnlyList<TemporalCoordinate> Coordinates => [L, W, Along, Across];
}

/// <summary>
/// Temporal noise model of the fluctuation coordinates (docs/measures.md#temporal-noise-model): for each of L, W and the
/// pole and flank sector residuals, the autocovariance pooled over mean-subtracted tracks is fitted with its exact
/// expectation for finite tracks, E[sum_t (x_t - xbar)(x_{t+k} - xbar)] = s2 S_n(k; rho) + e2 ([k = 0] (n - k) - (n - k)/n)
/// (the Ornstein-Uhlenbeck signal with gamma(h) = s2 rho^|h|, plus white noise contributing e2 at lag 0 and -e2/n at every
/// lag through the mean), by <see cref="OrnsteinUhlenbeckFit"/> (docs/dynamics.md#tau_q-and-the-other-ou-coordinates-the-mean-subtraction-bias-corrected-exactly).
/// </summary>
/// <remarks>
/// The mean-subtracted sample autocovariance and its expectation: Priestley M.B. (1981), Spectral Analysis and Time
/// Series, Academic Press, sec. 5.3; signal plus white noise is the AR(1)-plus-noise (ARMA(1,1)) model of the same book,
/// sec. 3.5. Every interval refits the model on each resample of the run's <see cref="ResamplingPlan"/>
/// (percentile bootstrap, Efron B. and Tibshirani R.J. (1993), An Introduction to the Bootstrap, ch. 13).
/// </remarks>
public static class TemporalNoise
{
    private static readonly string[] Names = ["L", "W", "along", "across"];

    /// <summary>Fits the four coordinates over the tracks that are used and have a contour with sector lag sums
    /// (<see cref="TrackContour.AlongLags"/>); the lags: K = min(<paramref name="maxLagFrames"/>, longest span - 1), fitted lags
    /// min(K, max(4, median length / 3)), tau searched in [0.05, 20 x the longest span] frames, as for tau_q.
    /// <paramref name="plan"/> covers those tracks, in order.</summary>
    public static TemporalNoiseResult Of(IReadOnlyList<TrackRecord> allTracks, ResamplingPlan plan, int maxLagFrames)
    {
        var t = allTracks.Where(x => x.Used && x.Contour is not null).ToList();
        if (plan.Items != t.Count) throw new ArgumentException($"{nameof(plan)} covers {plan.Items} tracks, {t.Count} are used");
        if (t.Count == 0 || t.Any(x => x.Frames < 2)) return Empty(t.Count, plan.UnitName);
        // Contours built without their sector lag sums: L and W are fitted, along and across are not.
        bool contour = t.All(x => x.Contour!.AlongLags is not null && x.Contour.AcrossLags is not null);
        int maxLen = t.Max(x => x.FrameIndex[^1] - x.FrameIndex[0] + 1);
        var lengths = t.Select(x => x.Frames).OrderBy(n => n).ToArray();
        int K = Math.Max(1, Math.Min(maxLagFrames, maxLen - 1));
        int fitLags = Math.Min(K, Math.Max(4, lengths[lengths.Length / 2] / 3));
        double maxTau = 20.0 * maxLen;
        var frames = t.Select(x => x.FrameIndex).ToArray();
        var sums = new List<LagSums>[4];
        sums[0] = t.Select(x => PooledAutocovariance.Of(new TrackSeries(x.FrameIndex, x.LengthPx), K)).ToList();
        sums[1] = t.Select(x => PooledAutocovariance.Of(new TrackSeries(x.FrameIndex, x.WidthPx), K)).ToList();
        if (contour)
        {
            sums[2] = t.Select(x => Truncate(x.Contour!.AlongLags!, K)).ToList();
            sums[3] = t.Select(x => Truncate(x.Contour!.AcrossLags!, K)).ToList();
        }
        int fitted = contour ? 4 : 2;

        // Every resample and leave-one-out fit pools per unit (docs/statistics.md#within-movie-intervals).
        var units = UnitSplit.Of(plan);
        var memo = new ConcurrentDictionary<int[], OuFit[]>(new WeightComparer());
        OuFit[] Fitted(int[] key)
        {
            var r = new OuFit[4];
            for (int s = 2; s < 4; s++) r[s] = new OuFit(double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);
            var split = key.Length == 0 ? null : units.Split(key);   // once for the four coordinates
            for (int s = 0; s < fitted; s++) r[s] = OrnsteinUhlenbeckFit.Fit(sums[s], frames, key, fitLags, maxTau, split);
            return r;
        }
        // The plan's draws are fitted once, in parallel, and found by reference (every statistic below passes the same
        // arrays); other multiplicity vectors through the structural cache (copied only when added).
        var drawFits = new OuFit[plan.Draws.Length][];
        Parallel.For(0, drawFits.Length, b => drawFits[b] = Fitted(plan.Draws[b]));
        var byDraw = new Dictionary<int[], OuFit[]>(ReferenceEqualityComparer.Instance);
        for (int b = 0; b < drawFits.Length; b++) byDraw.TryAdd(plan.Draws[b], drawFits[b]);
        OuFit[] FitAll(int[] w) => byDraw.TryGetValue(w, out var f) ? f
            : memo.TryGetValue(w, out var hit) ? hit : memo.GetOrAdd(w.Length == 0 ? w : (int[])w.Clone(), Fitted);
        var ones = new int[t.Count]; Array.Fill(ones, 1);
        var point = FitAll(ones);
        // The block-edge inflation's leave-one-track-out fits, once for every statistic and in parallel, not through the cache
        // (docs/statistics.md#block-edges).
        var loo = LeaveOneOut(plan, t.Count, Fitted);

        Func<int, double>? Loo(Func<OuFit[], double> f) => loo is null ? null : i => f(loo[i]);

        TemporalCoordinate Coordinate(int s)
        {
            if (s >= fitted)
            {
                var none = Estimate.TooFewUnits(t.Count, plan.UnitName, "the contours carry no sector lag sums");
                return new TemporalCoordinate(Names[s], none, none, none, none, double.NaN);
            }
            var tau = Estimate.Fitted(point[s].TauFrames, plan.Draws.Select(d => FitAll(d)[s].TauFrames).ToArray(), plan.Units, plan.UnitName,
                OrnsteinUhlenbeckFit.MinTauFrames, maxTau).WithResolutionLimit(maxLen);
            var s2 = WithTauBound(NonNegative(Bootstrap.Percentile(plan, w => FitAll(w)[s].SignalVariance, Loo(i => i[s].SignalVariance))), tau);
            var e2 = WithTauBound(NonNegative(Bootstrap.Percentile(plan, w => FitAll(w)[s].NoiseVariance, Loo(i => i[s].NoiseVariance))), tau);
            var d = WithTauBound(NonNegative(Bootstrap.Percentile(plan, w => { var f = FitAll(w)[s]; return f.SignalVariance / f.TauFrames; }, Loo(i => i[s].SignalVariance / i[s].TauFrames))), tau);
            var c0 = PooledAutocovariance.Pool(sums[s], [], out _);
            return new TemporalCoordinate(Names[s], s2, e2, tau, d, c0[0]);
        }
        var cs = Enumerable.Range(0, 4).Select(Coordinate).ToArray();
        var anis = WithTauBound(WithTauBound(Bootstrap.Percentile(plan, w => Ratio(FitAll(w), 0, 1), Loo(i => Ratio(i, 0, 1))), cs[0].TauFrames), cs[1].TauFrames);
        var anisC = contour ? WithTauBound(WithTauBound(Bootstrap.Percentile(plan, w => Ratio(FitAll(w), 2, 3), Loo(i => Ratio(i, 2, 3))), cs[2].TauFrames), cs[3].TauFrames)
            : cs[2].SignalVariancePx2;
        return new TemporalNoiseResult(cs[0], cs[1], cs[2], cs[3], anis, anisC, fitLags);
    }

    /// <summary>The fits with each item left out in turn (multiplicity 0, the others 1), computed in parallel; null when the
    /// plan has no block-edge correction or fewer than 3 items (the inflation is then not computed).</summary>
    private static OuFit[][]? LeaveOneOut(ResamplingPlan plan, int n, Func<int[], OuFit[]> fit)
    {
        if (!plan.EdgeCorrected || n < 3) return null;
        var r = new OuFit[n][];
        Parallel.For(0, n, () => Ones(n), (i, _, w) => { w[i] = 0; r[i] = fit(w); w[i] = 1; return w; }, _ => { });
        return r;
    }

    private static int[] Ones(int n)
    {
        var w = new int[n];
        Array.Fill(w, 1);
        return w;
    }

    /// <summary>The result when no track has what the model needs: every estimate too few.</summary>
    private static TemporalNoiseResult Empty(int n, string unit)
    {
        var e = Estimate.TooFewUnits(n, unit, "no used track with contour lag sums");
        TemporalCoordinate C(string name) => new(name, e, e, e, e, double.NaN);
        return new TemporalNoiseResult(C("L"), C("W"), C("along"), C("across"), e, e, 0);
    }

    /// <summary>A variance's interval cut at 0: the fit constrains s2, e2 &gt;= 0, but the block-edge inflation of a spatial
    /// plan (docs/statistics.md#block-edges) can widen the lower bound below it.</summary>
    private static Estimate NonNegative(Estimate e) => e.IsOk && e.Low < 0 ? Estimate.Judged(e.Value, 0, e.High, e.N, e.UnitName) : e;

    private static double Ratio(OuFit[] f, int a, int b) => f[b].SignalVariance > 0 ? f[a].SignalVariance / f[b].SignalVariance : double.NaN;

    /// <summary>An estimate built on a fitted tau that ran to a search bound is itself at that bound (s2 and e2 are then not
    /// separately identified: a white signal looks like noise, a frozen one like a track mean).</summary>
    private static Estimate WithTauBound(Estimate e, Estimate tau)
        => tau.Status == EstimateStatus.AtBound && e.Status != EstimateStatus.AtBound
            ? e with { Status = EstimateStatus.AtBound, Bound = tau.Bound, BoundValue = double.NaN, FractionAtBound = tau.FractionAtBound, Reason = $"tau of the noise model: {tau.Reason}" }
            : e;

    private static LagSums Truncate(LagSums s, int K)
    {
        var sum = new double[K + 1]; var pairs = new int[K + 1];
        int n = Math.Min(K + 1, s.Sum.Length);
        Array.Copy(s.Sum, sum, n); Array.Copy(s.Pairs, pairs, n);
        return new LagSums(sum, pairs);
    }

    /// <summary>Structural equality of multiplicity vectors, so each resample is fitted once for every statistic.</summary>
    private sealed class WeightComparer : IEqualityComparer<int[]>
    {
        public bool Equals(int[]? x, int[]? y) => ReferenceEquals(x, y) || x is not null && y is not null && x.AsSpan().SequenceEqual(y);
        public int GetHashCode(int[] w)
        {
            var h = new HashCode();
            foreach (var v in w) h.Add(v);
            return h.ToHashCode();
        }
    }
}
