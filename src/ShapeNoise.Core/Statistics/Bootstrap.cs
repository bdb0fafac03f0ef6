namespace ShapeNoise.Statistics;

/// <summary>What stands behind an estimate (docs/statistics.md#estimate-status).</summary>
public enum EstimateStatus
{
    /// <summary>Enough independent units and a finite interval of non-zero width: value and interval are reported.</summary>
    Ok,
    /// <summary>Fewer independent units than the documented minimum (<see cref="Estimate.MinUnits"/>), or an interval that cannot be formed.</summary>
    TooFew,
    /// <summary>The fit (or more than <see cref="Estimate.MaxFractionAtBound"/> of its bootstrap resamples) ran to a search bound.</summary>
    AtBound,
    /// <summary>The estimate does not apply to these data (e.g. defects in a tissue that is not confluent).</summary>
    NotApplicable,
}

/// <summary>Which search bound an <see cref="EstimateStatus.AtBound"/> estimate reached.</summary>
public enum BoundSide
{
    /// <summary>No bound reached.</summary>
    None,
    /// <summary>The lower end of the search range.</summary>
    Lower,
    /// <summary>The upper end of the search range.</summary>
    Upper,
}

/// <summary>
/// A value with its 95% interval, the number of independent units <see cref="N"/> behind it and its <see cref="Status"/>
/// (docs/statistics.md#estimate-status). The value and bounds are kept internally whatever the status; writers show them
/// only when the status is <see cref="EstimateStatus.Ok"/>.
/// </summary>
public readonly record struct Estimate(double Value, double Low, double High)
{
    /// <summary>Fewest independent units from which an interval is formed (docs/statistics.md#minimum-units).</summary>
    public const int MinUnits = 5;
    /// <summary>Largest fraction of bootstrap resamples allowed at a search bound before the estimate is <see cref="EstimateStatus.AtBound"/>.</summary>
    public const double MaxFractionAtBound = 0.1;

    /// <summary>Independent units behind the estimate (tracks, spatial blocks, defect tracks, time blocks, movies).</summary>
    public int N { get; init; }
    /// <summary>What the estimate may claim.</summary>
    public EstimateStatus Status { get; init; }
    /// <summary>For <see cref="EstimateStatus.AtBound"/>: which bound.</summary>
    public BoundSide Bound { get; init; }
    /// <summary>For <see cref="EstimateStatus.AtBound"/>: the bound's value (in the estimate's unit; scaled with it).</summary>
    public double BoundValue { get; init; }
    /// <summary>Fraction of bootstrap resamples that ran to a search bound (NaN when not a fit).</summary>
    public double FractionAtBound { get; init; } = double.NaN;
    /// <summary>Why the estimate is not applicable (or too few), in words, e.g. "cells cover 14 % of the field"; null otherwise.</summary>
    public string? Reason { get; init; }
    /// <summary>What the units are ("tracks", "spatial blocks", "defect tracks", "time blocks", "movies"); null when unset.</summary>
    public string? UnitName { get; init; }

    /// <summary>True when value and interval may be reported.</summary>
    public bool IsOk => Status == EstimateStatus.Ok;

    /// <summary>No value: value and both bounds NaN, no units, status <see cref="EstimateStatus.TooFew"/>.</summary>
    public static Estimate NaN => new(double.NaN, double.NaN, double.NaN) { Status = EstimateStatus.TooFew };

    /// <summary>An estimate with no number: too few units (<paramref name="n"/> of them).</summary>
    public static Estimate TooFewUnits(int n, string? unitName = null, string? reason = null)
        => NaN with { N = n, UnitName = unitName, Reason = reason };

    /// <summary>An estimate that does not apply, with the reason in words.</summary>
    public static Estimate NotApplicableBecause(string reason, int n = 0, string? unitName = null)
        => NaN with { N = n, Status = EstimateStatus.NotApplicable, Reason = reason, UnitName = unitName };

    /// <summary>
    /// Value and interval from <paramref name="n"/> independent units, judged: <see cref="EstimateStatus.TooFew"/> when
    /// n &lt; <paramref name="minUnits"/>, the value or a bound is not finite, or the interval has zero width; else Ok.
    /// </summary>
    public static Estimate Judged(double value, double low, double high, int n, string? unitName = null, int minUnits = MinUnits)
    {
        var e = new Estimate(value, low, high) { N = n, UnitName = unitName };
        if (n < minUnits) return e with { Status = EstimateStatus.TooFew, Reason = $"n = {n} {unitName ?? "units"}, fewer than {minUnits}" };
        if (!double.IsFinite(value) || !double.IsFinite(low) || !double.IsFinite(high)) return e with { Status = EstimateStatus.TooFew, Reason = "no finite interval" };
        if (!(high > low)) return e with { Status = EstimateStatus.TooFew, Reason = "interval of zero width (the units do not vary)" };
        return e with { Status = EstimateStatus.Ok };
    }

    /// <summary>This estimate re-judged with <paramref name="n"/> units of kind <paramref name="unitName"/> (see <see cref="Judged"/>);
    /// an estimate already <see cref="EstimateStatus.NotApplicable"/> or <see cref="EstimateStatus.AtBound"/> keeps its status.</summary>
    public Estimate WithUnits(int n, string unitName, int minUnits = MinUnits)
        => Status is EstimateStatus.NotApplicable or EstimateStatus.AtBound ? this with { N = n, UnitName = unitName }
            : Judged(Value, Low, High, n, unitName, minUnits) with { FractionAtBound = FractionAtBound };

    /// <summary>
    /// A fitted parameter searched in [<paramref name="lowerBound"/>, <paramref name="upperBound"/>]: judged as
    /// <see cref="Judged"/>, then <see cref="EstimateStatus.AtBound"/> when the point fit lies within a relative
    /// <paramref name="tolerance"/> of a bound or more than <see cref="MaxFractionAtBound"/> of the finite resamples do
    /// (the side the most resamples reached). <paramref name="resampled"/> are the resampled fits.
    /// </summary>
    public static Estimate Fitted(double value, IReadOnlyList<double> resampled, int n, string unitName, double lowerBound, double upperBound, double tolerance = 0.01)
    {
        var e = Bootstrap.Interval(value, resampled, n, unitName);
        bool AtLo(double v) => v <= lowerBound * (1 + tolerance);
        bool AtHi(double v) => v >= upperBound * (1 - tolerance);
        int lo = 0, hi = 0, finite = 0;
        foreach (var v in resampled)
        {
            if (!double.IsFinite(v)) continue;
            finite++;
            if (AtLo(v)) lo++; else if (AtHi(v)) hi++;
        }
        double fraction = finite > 0 ? (lo + hi) / (double)finite : double.NaN;
        e = e with { FractionAtBound = fraction };
        BoundSide side = double.IsFinite(value) && AtHi(value) ? BoundSide.Upper : double.IsFinite(value) && AtLo(value) ? BoundSide.Lower
            : fraction > MaxFractionAtBound ? (hi >= lo ? BoundSide.Upper : BoundSide.Lower) : BoundSide.None;
        if (side == BoundSide.None || e.Status == EstimateStatus.TooFew && n < MinUnits) return e;
        double bound = side == BoundSide.Upper ? upperBound : lowerBound;
        return e with
        {
            Status = EstimateStatus.AtBound, Bound = side, BoundValue = bound,
            Reason = side == BoundSide.Upper ? $"{100 * fraction:0}% of resamples at the upper search bound" : $"{100 * fraction:0}% of resamples at the lower search bound",
        };
    }

    /// <summary>Reason of an estimate beyond its resolution limit (<see cref="WithResolutionLimit"/>).</summary>
    public const string BeyondResolutionReason = "longer than this movie can resolve (above the longest track)";

    /// <summary>A fitted correlation time judged against what the data can resolve: an <see cref="EstimateStatus.Ok"/> estimate
    /// whose value exceeds <paramref name="limit"/> (the longest used track, in the estimate's unit) becomes
    /// <see cref="EstimateStatus.AtBound"/>, upper, with <see cref="BoundValue"/> = the limit and the reason
    /// <see cref="BeyondResolutionReason"/> (docs/dynamics.md#fitted-times-at-a-search-bound-at_bound). Any other estimate is returned unchanged.</summary>
    public Estimate WithResolutionLimit(double limit)
        => Status == EstimateStatus.Ok && double.IsFinite(limit) && Value > limit
            ? this with { Status = EstimateStatus.AtBound, Bound = BoundSide.Upper, BoundValue = limit, Reason = BeyondResolutionReason }
            : this;

    /// <summary>The estimate times <paramref name="f"/> (a unit conversion); a negative factor swaps the bounds so Low &lt;= High
    /// stays true. Units, status and reason are kept; the bound value is scaled too.</summary>
    public Estimate Scale(double f) => (f >= 0 ? new Estimate(Value * f, Low * f, High * f) : new Estimate(Value * f, High * f, Low * f)) with
    {
        N = N, Status = Status, Bound = Bound, BoundValue = BoundValue * f, FractionAtBound = FractionAtBound, Reason = Reason, UnitName = UnitName,
    };

    /// <summary>True when the interval is reported and excludes <paramref name="x"/> (0 for a difference, 1 for a ratio).</summary>
    public bool Excludes(double x) => IsOk && (Low > x || High < x);
}

/// <summary>Seeded non-parametric bootstrap over independent units (tracks), with percentile intervals.</summary>
/// <remarks>Efron B. and Tibshirani R.J. (1993), An Introduction to the Bootstrap, Chapman and Hall, ch. 13 (percentile
/// interval). The random stream is System.Random with a fixed seed, so the same input and seed give the same interval.</remarks>
public static class Bootstrap
{
    /// <summary>
    /// Evaluates <paramref name="statistic"/> on the data (all multiplicities 1) and on <paramref name="resamples"/> resamples
    /// of <paramref name="units"/> units drawn with replacement (the statistic receives each unit's multiplicity), and returns
    /// the point value with the 2.5% and 97.5% percentiles of the finite resampled values, judged with n = units
    /// (<see cref="Estimate.Judged"/>).
    /// </summary>
    public static Estimate Percentile(int units, Func<int[], double> statistic, int resamples, int seed, string unitName = "tracks")
        => Percentile(ResamplingPlan.OverTracks(units, Math.Max(0, resamples), seed) with { UnitName = unitName }, statistic);

    /// <summary>The same over the draws of a <see cref="ResamplingPlan"/> (items resampled by their unit: track or spatial block).</summary>
    public static Estimate Percentile(ResamplingPlan plan, Func<int[], double> statistic)
        => Percentile(plan, statistic, null);

    /// <summary>The same, with the leave-one-item-out values of the block-edge inflation given by
    /// <paramref name="leaveOneOut"/> (null: computed from <paramref name="statistic"/>).</summary>
    public static Estimate Percentile(ResamplingPlan plan, Func<int[], double> statistic, Func<int, double>? leaveOneOut)
    {
        var ones = new int[plan.Items];
        Array.Fill(ones, 1);
        double value = statistic(ones);
        var stats = new List<double>(plan.Draws.Length);
        foreach (var counts in plan.Draws)
        {
            double s = statistic(counts);
            if (double.IsFinite(s)) stats.Add(s);
        }
        var e = Interval(value, stats, plan.Units, plan.UnitName);
        if (!e.IsOk || !plan.EdgeCorrected) return e;
        return Widened(e, leaveOneOut is null ? EdgeInflation(plan, statistic) : EdgeInflation(plan, leaveOneOut));
    }

    /// <summary>f = sqrt((W + C) / W) clamped to [1, 2]; 1 when W is not positive (docs/statistics.md#block-edges).</summary>
    private static double InflationFactor(double within, double cross)
        => within > 0 ? Math.Clamp(Math.Sqrt(Math.Max(0, (within + cross) / within)), 1, 2) : 1;

    /// <summary>
    /// Block-edge inflation from the delete-one-block jackknife (docs/statistics.md#block-edges), for statistics too
    /// costly to recompute once per item (fits): with u_k = (K - 1)(mean_j theta_(-j) - theta_(-k)) the block influences,
    /// f = sqrt((sum_k u_k^2 + 2 sum_{neighbour pairs} u_a u_b) / sum_k u_k^2), clamped to [1, 2]; neighbours are
    /// <see cref="ResamplingPlan.NeighbourUnits"/>. 1 when any value is not finite.
    /// </summary>
    /// <remarks>Block jackknife: Künsch (1989); the neighbour-pair covariance is Conley's (1999) spatial-band variance at
    /// the level of blocks.</remarks>
    public static double BlockEdgeInflation(ReadOnlySpan<double> leaveOneBlockOut, List<(int A, int B)> neighbours)
    {
        int k = leaveOneBlockOut.Length;
        if (k < 3) return 1;
        double mean = 0;
        foreach (var v in leaveOneBlockOut) { if (!double.IsFinite(v)) return 1; mean += v; }
        mean /= k;
        var u = new double[k];
        double within = 0;
        for (int i = 0; i < k; i++) { u[i] = (k - 1) * (mean - leaveOneBlockOut[i]); within += u[i] * u[i]; }
        double cross = 0;
        foreach (var (a, b) in neighbours) cross += 2 * u[a] * u[b];
        return InflationFactor(within, cross);
    }

    /// <summary>An ok interval widened about its value by <paramref name="f"/> (other statuses unchanged).</summary>
    public static Estimate Widened(Estimate e, double f)
        => e.IsOk && f > 1 ? e with { Low = e.Value - f * (e.Value - e.Low), High = e.Value + f * (e.High - e.Value) } : e;

    /// <summary>
    /// Block-edge inflation of a block-bootstrap interval (docs/statistics.md#block-edges): with jackknife influences
    /// u_i = (n - 1)(mean_j theta_(-j) - theta_(-i)) of the n items, the within-block variance W = sum_k (sum_{i in k} u_i)^2
    /// is what resampling whole blocks sees, and C = sum over ordered pairs i != j in different blocks within
    /// <see cref="ResamplingPlan.EdgeRadiusPx"/> of u_i u_j is the covariance across block edges it drops; the interval's
    /// half-widths are multiplied by f = sqrt((W + C) / W), clamped to [1, 2].
    /// </summary>
    /// <remarks>Jackknife influence values: Efron B. and Tibshirani R.J. (1993), An Introduction to the Bootstrap, ch. 11;
    /// the cross-unit covariance within a distance band is the spatial heteroskedasticity-and-autocorrelation-consistent
    /// variance of Conley T.G. (1999), "GMM estimation with cross sectional dependence", J. Econometrics 92:1-45; the
    /// block-edge bias of order xi / block side is discussed in Lahiri S.N. (2003), Resampling Methods for Dependent Data, ch. 12.</remarks>
    public static double EdgeInflation(ResamplingPlan plan, Func<int[], double> statistic)
    {
        int n = plan.Items;
        if (n < 3) return 1;
        var w = new int[n]; Array.Fill(w, 1);
        return EdgeInflation(plan, i => { w[i] = 0; double v = statistic(w); w[i] = 1; return v; });
    }

    /// <summary>The same from the leave-one-item-out values theta_(-i) = <paramref name="leaveOneOut"/>(i), for callers
    /// that compute them once for several statistics (docs/statistics.md#block-edges).</summary>
    public static double EdgeInflation(ResamplingPlan plan, Func<int, double> leaveOneOut)
    {
        int n = plan.Items;
        if (n < 3) return 1;
        var unit = plan.UnitOfItem;
        var loo = new double[n];
        double mean = 0;
        for (int i = 0; i < n; i++)
        {
            loo[i] = leaveOneOut(i);
            if (!double.IsFinite(loo[i])) return 1;
            mean += loo[i];
        }
        mean /= n;
        var u = new double[n];
        for (int i = 0; i < n; i++) u[i] = (n - 1) * (mean - loo[i]);
        var blockSum = new double[plan.Units];
        for (int i = 0; i < n; i++) blockSum[unit[i]] += u[i];
        double within = 0, cross = 0;
        foreach (var b in blockSum) within += b * b;
        foreach (var (i, j) in EdgePairs(plan)) cross += 2 * u[i] * u[j];
        return InflationFactor(within, cross);
    }

    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<ResamplingPlan, (int, int)[]> EdgePairCache = new();

    /// <summary>The item pairs i &lt; j in different units within <see cref="ResamplingPlan.EdgeRadiusPx"/>, in the order
    /// (i, then j) the inflation sums them; found once per plan.</summary>
    private static (int I, int J)[] EdgePairs(ResamplingPlan plan) => EdgePairCache.GetValue(plan, p =>
    {
        var x = p.ItemX!; var y = p.ItemY!; var unit = p.UnitOfItem;
        double r2 = p.EdgeRadiusPx * p.EdgeRadiusPx;
        var pairs = new List<(int, int)>();
        for (int i = 0; i < p.Items; i++)
            for (int j = i + 1; j < p.Items; j++)
            {
                if (unit[i] == unit[j]) continue;
                double dx = x[i] - x[j], dy = y[i] - y[j];
                if (dx * dx + dy * dy <= r2) pairs.Add((i, j));
            }
        return pairs.ToArray();
    });

    /// <summary>The resamples themselves: for each, every unit's multiplicity (units drawn with replacement from one
    /// System.Random stream seeded with <paramref name="seed"/>, in order).</summary>
    public static int[][] Draws(int units, int resamples, int seed)
    {
        var rng = new Random(seed);
        var draws = new int[resamples][];
        for (int b = 0; b < resamples; b++)
        {
            draws[b] = new int[units];
            for (int i = 0; i < units; i++) draws[b][rng.Next(units)]++;
        }
        return draws;
    }

    /// <summary>Point value with the 2.5% and 97.5% percentiles of the finite resampled values (NaN when fewer than 2), judged
    /// with <paramref name="n"/> independent units (<see cref="Estimate.Judged"/>).</summary>
    public static Estimate Interval(double value, IEnumerable<double> resampled, int n, string unitName)
    {
        var (lo, hi) = PercentileBounds(resampled);
        return Estimate.Judged(value, lo, hi, n, unitName);
    }

    /// <summary>The 2.5% and 97.5% percentiles (type 7) of the finite values; NaN when fewer than 2.</summary>
    public static (double Low, double High) PercentileBounds(IEnumerable<double> resampled)
    {
        var sorted = resampled.Where(double.IsFinite).ToArray();
        if (sorted.Length < 2) return (double.NaN, double.NaN);
        Array.Sort(sorted);
        return (Descriptive.QuantileSorted(sorted, 0.025), Descriptive.QuantileSorted(sorted, 0.975));
    }
}
