using MathNet.Numerics.Distributions;
using ShapeNoise.Statistics;

namespace ShapeNoise.Comparison;

/// <summary>One measure in one condition: value with hierarchical-bootstrap interval, and the movie-level values.</summary>
public sealed record ConditionMeasure(string Condition, string Measure, int Movies, int Units, Estimate Value, double[] MovieValues, string[] MovieNames);

/// <summary>One measure for a pair of conditions: a - b and a / b with intervals, and a Student t test on movie-level values.</summary>
public sealed record MeasureDifference(string Measure, string A, string B, Estimate Difference, Estimate Ratio, double PValue, int MoviesA, int MoviesB)
{
    /// <summary>Movie-level effect from the Student t test on y_m (<see cref="ConditionComparison.MovieQuantity"/>): the ratio exp(mean_a - mean_b) for log-scale measures, the difference mean_a - mean_b otherwise, with its t interval; too_few below <see cref="ConditionComparison.MinMovies"/> movies in either condition.</summary>
    public Estimate Effect { get; init; } = Estimate.NaN;
    /// <summary>Whether <see cref="Effect"/> is a ratio (log-scale measure; no effect is 1) or a difference (no effect is 0).</summary>
    public bool LogScale { get; init; }
    /// <summary>Holm-adjusted p-value among the non-primary measures of this pair (NaN for the primary measure or without a test).</summary>
    public double HolmPValue { get; init; } = double.NaN;
    /// <summary>Whether this is the primary measure (<see cref="ConditionComparison.Primary"/>), reported without adjustment.</summary>
    public bool IsPrimary => Measure == ConditionComparison.Primary;
    /// <summary>Status of the movie-level comparison (ok or too_few).</summary>
    public EstimateStatus Status => Effect.Status;
}

/// <summary>Everything the comparison computed.</summary>
public sealed record ComparisonResult(IReadOnlyList<ConditionMeasure> Conditions, IReadOnlyList<MeasureDifference> Differences,
    IReadOnlyList<MovieData> Movies, string LengthUnit, string TimeUnit, IReadOnlyList<string> OrderStatements);

/// <summary>
/// Compares conditions without pseudo-replication: every interval comes from a hierarchical bootstrap (movies within a
/// condition, then tracks or defect tracks within each drawn movie), and p-values from a Student t test on movie-level values
/// (<see cref="MovieTest"/>).
/// </summary>
/// <remarks>Saravanan V., Berman G.J. and Sober S.J. (2020), Neurons, Behavior, Data analysis, and Theory 3(5) (hierarchical
/// bootstrap); Lord S.J. et al. (2020), "SuperPlots: communicating reproducibility and variability in cell biology",
/// J. Cell Biol. 219:e202001064; Student (1908), Biometrika 6:1-25.</remarks>
public static class ConditionComparison
{
    /// <summary>Measures with one value per movie read from summary.json (docs/motion.md): compared across movies like tau_q,
    /// with no within-movie units in the hierarchical bootstrap.</summary>
    public static readonly string[] MovieLevelMeasures = ["polar_order", "mean_speed", "rms_speed", "velocity_correlation_length",
        "velocity_correlation_length_1e", "vorticity_correlation_length", "enstrophy", "velocity_autocorrelation_time", "nematic_correlation_length",
        "plus_half_density", "minus_half_density", "defect_lifetime", "defect_creation_rate", "defect_annihilation_rate"];

    /// <summary>The measures compared, in report order.</summary>
    public static readonly string[] Measures = ["anisotropy", "anisotropy_contour", "tau_q", "defect_headward_speed", "flow_headward_speed", .. MovieLevelMeasures];

    /// <summary>Movie-level measures compared on a log scale (positive scales: speeds, lengths, times, enstrophy); the
    /// polar order (bounded in [0, 1]) and the defect densities and rates (which can be 0) are compared linearly.</summary>
    private static readonly string[] LogScaleMovieLevel = ["mean_speed", "rms_speed", "velocity_correlation_length",
        "velocity_correlation_length_1e", "vorticity_correlation_length", "enstrophy", "velocity_autocorrelation_time", "nematic_correlation_length", "defect_lifetime"];

    /// <summary>The primary measure: its p-value is reported unadjusted, the others Holm-adjusted (docs/statistics.md, "Comparing conditions").</summary>
    public const string Primary = "anisotropy";

    /// <summary>Fewest movies per condition for a test and an interval on a difference; below it the comparison is descriptive only (status too_few).</summary>
    public const int MinMovies = 3;

    /// <summary>Whether <paramref name="measure"/> is compared on a log scale (ratios and tau_q) rather than linearly (speeds).</summary>
    public static bool IsLogScale(string measure) => measure is "anisotropy" or "anisotropy_contour" or "tau_q" || LogScaleMovieLevel.Contains(measure);

    /// <summary>
    /// The one movie-level quantity y_m per measure, used by compare and by plan alike: ln of the movie's frame-weighted
    /// pooled variance ratio sum(F var_L) / sum(F var_W) (or along/across) for the anisotropies, ln(tau_q) for tau_q, and
    /// the movie's time-weighted mean speed (linear, speeds can be negative) for the headward speeds. NaN when undefined.
    /// </summary>
    public static double MovieQuantity(string measure, MovieData movie)
    {
        double v = Statistic(measure, [movie], [1], null);
        return IsLogScale(measure) ? (v > 0 ? Math.Log(v) : double.NaN) : v;
    }

    /// <summary>
    /// Two-sided Student two-sample t test with pooled variance on movie-level values: s_p^2 = ((n_a - 1) s_a^2 + (n_b - 1) s_b^2) / (n_a + n_b - 2),
    /// t = (mean_a - mean_b) / (s_p sqrt(1/n_a + 1/n_b)), df = n_a + n_b - 2; the 95% interval is the difference +- t_{0.975,df} SE.
    /// Null (no p, no interval) with fewer than <see cref="MinMovies"/> finite values in either sample.
    /// </summary>
    /// <remarks>Student (1908), Biometrika 6:1-25. Pooled rather than Welch so that the noncentral-t power used by plan
    /// (<see cref="Power.TwoSampleT"/>) is exact for this test (docs/statistics.md, "Comparing conditions").</remarks>
    public static (double Difference, double Low, double High, double PValue)? MovieTest(double[] a, double[] b, double level = 0.95)
    {
        var x = a.Where(double.IsFinite).ToArray(); var y = b.Where(double.IsFinite).ToArray();
        if (x.Length < MinMovies || y.Length < MinMovies) return null;
        double df = x.Length + y.Length - 2;
        double sp2 = ((x.Length - 1) * Descriptive.SampleVariance(x) + (y.Length - 1) * Descriptive.SampleVariance(y)) / df;
        double diff = Descriptive.Mean(x) - Descriptive.Mean(y), se = Math.Sqrt(sp2 * (1.0 / x.Length + 1.0 / y.Length));
        if (!(se > 0)) return null;
        double crit = StudentT.InvCDF(0, 1, df, 1 - (1 - level) / 2);
        return (diff, diff - crit * se, diff + crit * se, 2 * (1 - StudentT.CDF(0, 1, df, Math.Abs(diff / se))));
    }

    /// <summary>
    /// Holm's step-down adjusted p-values: with the k finite p-values sorted p_(1) &lt;= ... &lt;= p_(k),
    /// adj_(i) = max_{j &lt;= i} min(1, (k - j + 1) p_(j)); NaN entries stay NaN and do not count in k.
    /// </summary>
    /// <remarks>Holm S. (1979), "A simple sequentially rejective multiple test procedure", Scand. J. Statist. 6:65-70.</remarks>
    public static double[] Holm(IReadOnlyList<double> p)
    {
        var adj = Enumerable.Repeat(double.NaN, p.Count).ToArray();
        var idx = Enumerable.Range(0, p.Count).Where(i => double.IsFinite(p[i])).OrderBy(i => p[i]).ToArray();
        double running = 0;
        for (int j = 0; j < idx.Length; j++)
        {
            running = Math.Max(running, Math.Min(1, (idx.Length - j) * p[idx[j]]));
            adj[idx[j]] = running;
        }
        return adj;
    }

    /// <summary>
    /// Value of <paramref name="measure"/> for the movies <paramref name="movies"/> drawn <paramref name="count"/> times each,
    /// with per-movie unit multiplicities <paramref name="units"/> (null = every unit once).
    /// </summary>
    public static double Statistic(string measure, IReadOnlyList<MovieData> movies, int[] count, int[][]? units)
    {
        double num = 0, den = 0;
        for (int m = 0; m < movies.Count; m++)
        {
            if (count[m] == 0) continue;
            var mv = movies[m];
            switch (measure)
            {
                case "anisotropy":
                case "anisotropy_contour":
                    for (int u = 0; u < mv.Tracks.Length; u++)
                    {
                        int w = units is null ? count[m] : units[m][u];
                        if (w == 0) continue;
                        var t = mv.Tracks[u];
                        double a = measure == "anisotropy" ? t.VarL : t.VarAlong, b = measure == "anisotropy" ? t.VarW : t.VarAcross;
                        if (!double.IsFinite(a) || !double.IsFinite(b)) continue;
                        num += w * t.Frames * a; den += w * t.Frames * b;
                    }
                    break;
                case "tau_q":
                    if (double.IsFinite(mv.TauQ)) { num += count[m] * mv.TauQ; den += count[m]; }
                    break;
                case "defect_headward_speed":
                case "flow_headward_speed":
                {
                    var v = measure == "defect_headward_speed" ? mv.DefectHeadward : mv.FlowHeadward;
                    var frames = measure == "defect_headward_speed" ? mv.DefectHeadwardFrames : mv.FlowHeadwardFrames;
                    for (int u = 0; u < v.Length; u++)
                    {
                        // Time-weighted: each defect track counts with its frames with a speed (docs/defects.md#headward-speed).
                        double w = (units is null ? count[m] : units[m][u]) * (frames is null ? 1 : frames[u]);
                        num += w * v[u]; den += w;
                    }
                    break;
                }
                default:
                    // Movie-level measures: the mean over movies of their ok values (docs/motion.md#comparing-conditions).
                    if (mv.MovieLevel.TryGetValue(measure, out var mvv) && double.IsFinite(mvv.Value)) { num += count[m] * mvv.Value; den += count[m]; }
                    break;
            }
        }
        return den > 0 ? num / den : double.NaN;
    }

    /// <summary>For the defect measures: why they do not apply to this condition — every movie's defect stage was not
    /// applicable (the first movie's reason, e.g. "cells cover 14 % of the field") — or null.</summary>
    public static string? NotApplicable(string measure, IReadOnlyList<MovieData> movies)
    {
        if (MovieLevelMeasures.Contains(measure) && movies.Count > 0)
        {
            foreach (var m in movies) if (!m.MovieLevel.TryGetValue(measure, out var v) || v.Status != "not_applicable") return null;
            return $"not applicable in these movies: {movies[0].MovieLevel[measure].Reason}";
        }
        if (measure is not ("defect_headward_speed" or "flow_headward_speed") || movies.Count == 0) return null;
        foreach (var m in movies) if (m.DefectsNotApplicable is null) return null;
        return $"defects not analysed in these movies: {movies[0].DefectsNotApplicable}";
    }

    private static int UnitCount(string measure, MovieData m) => measure switch
    {
        "anisotropy" or "anisotropy_contour" => m.Tracks.Length,
        "defect_headward_speed" => m.DefectHeadward.Length,
        "flow_headward_speed" => m.FlowHeadward.Length,
        _ => 0,   // tau_q and the movie-level measures: one value per movie
    };

    /// <summary>One hierarchical resample of a condition: movie draw counts, then unit multiplicities per measure.</summary>
    private static (int[] Count, Dictionary<string, int[][]> Units) Draw(List<MovieData> movies, Random rng)
    {
        var counts = Measures.Select(k => (IReadOnlyList<int>)movies.Select(m => UnitCount(k, m)).ToArray()).ToList();
        var (count, units) = HierarchicalBootstrap.Draw(counts, movies.Count, rng);
        return (count, Measures.Select((k, j) => (k, units[j])).ToDictionary(x => x.k, x => x.Item2));
    }

    /// <summary>Compares every pair of conditions on every measure in <see cref="Measures"/>: per condition the value with a 95% percentile interval from <paramref name="resamples"/> hierarchical resamples (one stream seeded by <paramref name="seed"/>, drawn in condition order), per pair a - b and a / b with intervals and the Student p-value on movie-level values (<see cref="MovieTest"/>). Throws <see cref="Reading.InputException"/> when the movies are in different units.</summary>
    public static ComparisonResult Run(IReadOnlyList<MovieData> movies, int resamples, int seed)
    {
        var units = movies.Select(m => (m.LengthUnit, m.TimeUnit)).Distinct().ToList();
        if (units.Count > 1)
            throw new Reading.InputException(movies[0].Folder, $"movies are in different units ({string.Join(", ", units.Select(u => $"{u.LengthUnit}/{u.TimeUnit}"))}): give every movie a pixel size and frame interval");
        var conditions = movies.Select(m => m.Condition).Distinct().ToList();
        var byCondition = conditions.ToDictionary(c => c, c => movies.Where(m => m.Condition == c).ToList());
        // Resamples per condition, drawn in condition order from one seeded stream.
        var rng = new Random(seed);
        var boot = conditions.ToDictionary(c => c, c => new Dictionary<string, double[]>());
        foreach (var c in conditions)
        {
            var list = byCondition[c];
            foreach (var k in Measures) boot[c][k] = new double[resamples];
            for (int b = 0; b < resamples; b++)
            {
                var (count, u) = Draw(list, rng);
                foreach (var k in Measures) boot[c][k][b] = Statistic(k, list, count, u[k]);
            }
        }
        var measures = new List<ConditionMeasure>();
        foreach (var c in conditions)
        {
            var list = byCondition[c];
            var ones = Enumerable.Repeat(1, list.Count).ToArray();
            foreach (var k in Measures)
            {
                double value = Statistic(k, list, ones, null);
                var perMovie = list.Select(m => Statistic(k, [m], [1], null)).ToArray();
                var estimate = NotApplicable(k, list) is { } why ? Estimate.NotApplicableBecause(why, list.Count, "movies")
                    : Bootstrap.Interval(value, boot[c][k], list.Count, "movies");
                measures.Add(new ConditionMeasure(c, k, list.Count, list.Sum(m => UnitCount(k, m)), estimate, perMovie,
                    list.Select(m => m.Replicate).ToArray()));
            }
        }
        var diffs = new List<MeasureDifference>();
        var order = new List<string>();
        for (int i = 0; i < conditions.Count; i++)
            for (int j = i + 1; j < conditions.Count; j++)
            {
                string a = conditions[i], b = conditions[j];
                foreach (var k in Measures)
                {
                    var ma = measures.First(x => x.Condition == a && x.Measure == k); var mb = measures.First(x => x.Condition == b && x.Measure == k);
                    var d = Enumerable.Range(0, resamples).Select(r => boot[a][k][r] - boot[b][k][r]);
                    var q = Enumerable.Range(0, resamples).Select(r => boot[a][k][r] / boot[b][k][r]);
                    int nm = Math.Min(ma.Movies, mb.Movies);
                    bool log = IsLogScale(k);
                    var test = MovieTest(byCondition[a].Select(m => MovieQuantity(k, m)).ToArray(), byCondition[b].Select(m => MovieQuantity(k, m)).ToArray());
                    string few = $"not enough movies (n = {ma.Movies} and {mb.Movies}; at least {MinMovies} per condition)";
                    Estimate effect = test is { } t
                        ? (log ? Estimate.Judged(Math.Exp(t.Difference), Math.Exp(t.Low), Math.Exp(t.High), nm, "movies", MinMovies)
                               : Estimate.Judged(t.Difference, t.Low, t.High, nm, "movies", MinMovies))
                        : Estimate.TooFewUnits(nm, "movies", nm < MinMovies ? few : "no finite movie-level values to test");
                    // The bootstrap intervals are descriptive; below MinMovies there is no interval on a difference at all.
                    Estimate Boot(double v, IEnumerable<double> r) => nm < MinMovies ? new Estimate(v, double.NaN, double.NaN) { N = nm, UnitName = "movies", Status = EstimateStatus.TooFew, Reason = few }
                        : Bootstrap.Interval(v, r, nm, "movies");
                    if ((NotApplicable(k, byCondition[a]) ?? NotApplicable(k, byCondition[b])) is { } why)
                    {
                        var na = Estimate.NotApplicableBecause(why, nm, "movies");
                        diffs.Add(new MeasureDifference(k, a, b, na, na, double.NaN, ma.Movies, mb.Movies) { Effect = na, LogScale = log });
                        continue;
                    }
                    diffs.Add(new MeasureDifference(k, a, b, Boot(ma.Value.Value - mb.Value.Value, d), Boot(ma.Value.Value / mb.Value.Value, q),
                        test?.PValue ?? double.NaN, ma.Movies, mb.Movies) { Effect = effect, LogScale = log });
                }
                // Holm over the non-primary measures of this pair.
                var rest = diffs.Where(x => x.A == a && x.B == b && !x.IsPrimary).ToList();
                var holm = Holm(rest.Select(x => x.PValue).ToArray());
                for (int h = 0; h < rest.Count; h++) diffs[diffs.IndexOf(rest[h])] = rest[h] with { HolmPValue = holm[h] };
                order.Add(OrderStatement(diffs.First(x => x.A == a && x.B == b && x.Measure == "anisotropy"),
                    diffs.First(x => x.A == a && x.B == b && x.Measure == "defect_headward_speed")));
            }
        return new ComparisonResult(measures, diffs, movies, units[0].LengthUnit, units[0].TimeUnit, order);
    }

    /// <summary>Whether the two conditions' order in anisotropy matches their order in headward speed, said only as far as the movie-level intervals allow (a direction only when an interval excludes no effect).</summary>
    public static string OrderStatement(MeasureDifference anis, MeasureDifference head)
    {
        string pair = $"{anis.A} vs {anis.B}";
        if (anis.MoviesA < MinMovies || anis.MoviesB < MinMovies)
            return $"{pair}: not enough movies (n = {anis.MoviesA} and {anis.MoviesB}; at least {MinMovies} per condition), so the orders are not compared.";
        if (head.Effect.Status == EstimateStatus.NotApplicable) return $"{pair}: headward speed is not applicable ({head.Effect.Reason}); the orders are not compared.";
        if (!head.Effect.IsOk) return $"{pair}: headward speed has no movie-level test in at least one condition (no +1/2 defect followed long enough in enough movies), so the orders cannot be compared.";
        if (!anis.Effect.IsOk) return $"{pair}: anisotropy has no movie-level interval, so the orders cannot be compared.";
        bool anisClear = anis.Effect.Excludes(1), headClear = head.Effect.Excludes(0);
        if (!(anisClear && headClear))
            return $"{pair}: no order shown — {(anisClear ? "the headward-speed" : headClear ? "the anisotropy" : "both")} interval(s) include no difference (which is not evidence of none).";
        bool same = (anis.Effect.Value > 1) == (head.Effect.Value > 0);
        return $"{pair}: " + (same ? "the condition with the higher anisotropy also has the higher headward speed, as the shape-noise hypothesis predicts"
                                   : "the condition with the higher anisotropy has the lower headward speed, against the shape-noise hypothesis") + "; both movie-level 95% intervals exclude no difference.";
    }
}
