using MathNet.Numerics.Distributions;
using ShapeNoise.Statistics;

namespace ShapeNoise.Comparison;

/// <summary>One measure in one condition: value with hierarchical-bootstrap interval, and the movie-level values.</summary>
public sealed record ConditionMeasure(string Condition, string Measure, int Movies, int Units, Estimate Value, double[] MovieValues, string[] MovieNames);

/// <summary>One measure for a pair of conditions: a - b and a / b with intervals, and a Welch t test on movie-level values.</summary>
public sealed record MeasureDifference(string Measure, string A, string B, Estimate Difference, Estimate Ratio, double PValue, int MoviesA, int MoviesB);

/// <summary>Everything the comparison computed.</summary>
public sealed record ComparisonResult(IReadOnlyList<ConditionMeasure> Conditions, IReadOnlyList<MeasureDifference> Differences,
    IReadOnlyList<MovieData> Movies, string LengthUnit, string TimeUnit, IReadOnlyList<string> OrderStatements);

/// <summary>
/// Compares conditions without pseudo-replication: every interval comes from a hierarchical bootstrap (movies within a
/// condition, then tracks or defect tracks within each drawn movie), and p-values from a Welch t test on movie-level values.
/// </summary>
/// <remarks>Saravanan V., Berman G.J. and Sober S.J. (2020), Neurons, Behavior, Data analysis, and Theory 3(5) (hierarchical
/// bootstrap); Lord S.J. et al. (2020), "SuperPlots: communicating reproducibility and variability in cell biology",
/// J. Cell Biol. 219:e202001064; Welch B.L. (1947), Biometrika 34:28-35 (unequal-variance t test).</remarks>
public static class ConditionComparison
{
    /// <summary>The measures compared, in report order.</summary>
    public static readonly string[] Measures = ["anisotropy", "anisotropy_contour", "tau_q", "defect_headward_speed", "flow_headward_speed"];

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
                default:
                {
                    var v = measure == "defect_headward_speed" ? mv.DefectHeadward : mv.FlowHeadward;
                    for (int u = 0; u < v.Length; u++)
                    {
                        int w = units is null ? count[m] : units[m][u];
                        num += w * v[u]; den += w;
                    }
                    break;
                }
            }
        }
        return den > 0 ? num / den : double.NaN;
    }

    private static int UnitCount(string measure, MovieData m) => measure switch
    {
        "anisotropy" or "anisotropy_contour" => m.Tracks.Length,
        "tau_q" => 0,
        "defect_headward_speed" => m.DefectHeadward.Length,
        _ => m.FlowHeadward.Length,
    };

    /// <summary>One hierarchical resample of a condition: movie draw counts, then unit multiplicities per measure.</summary>
    private static (int[] Count, Dictionary<string, int[][]> Units) Draw(List<MovieData> movies, Random rng)
    {
        var counts = Measures.Select(k => (IReadOnlyList<int>)movies.Select(m => UnitCount(k, m)).ToArray()).ToList();
        var (count, units) = HierarchicalBootstrap.Draw(counts, movies.Count, rng);
        return (count, Measures.Select((k, j) => (k, units[j])).ToDictionary(x => x.k, x => x.Item2));
    }

    /// <summary>Compares every pair of conditions on every measure in <see cref="Measures"/>: per condition the value with a 95% percentile interval from <paramref name="resamples"/> hierarchical resamples (one stream seeded by <paramref name="seed"/>, drawn in condition order), per pair a - b and a / b with intervals and the Welch p-value on movie-level values. Throws <see cref="Reading.InputException"/> when the movies are in different units.</summary>
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
                measures.Add(new ConditionMeasure(c, k, list.Count, list.Sum(m => UnitCount(k, m)), Bootstrap.Interval(value, boot[c][k], list.Count, "movies"), perMovie,
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
                    diffs.Add(new MeasureDifference(k, a, b, Bootstrap.Interval(ma.Value.Value - mb.Value.Value, d, nm, "movies"),
                        Bootstrap.Interval(ma.Value.Value / mb.Value.Value, q, nm, "movies"), Welch(ma.MovieValues, mb.MovieValues), ma.Movies, mb.Movies));
                }
                order.Add(OrderStatement(diffs.First(x => x.A == a && x.B == b && x.Measure == "anisotropy"),
                    diffs.First(x => x.A == a && x.B == b && x.Measure == "defect_headward_speed")));
            }
        return new ComparisonResult(measures, diffs, movies, units[0].LengthUnit, units[0].TimeUnit, order);
    }

    /// <summary>Whether the two conditions' order in anisotropy matches their order in headward speed, said no stronger than the intervals allow.</summary>
    public static string OrderStatement(MeasureDifference anis, MeasureDifference head)
    {
        bool anisClear = anis.Difference.Low > 0 || anis.Difference.High < 0;
        bool headClear = head.Difference.Low > 0 || head.Difference.High < 0;
        string pair = $"{anis.A} vs {anis.B}";
        if (!double.IsFinite(head.Difference.Value)) return $"{pair}: headward speed is undefined in at least one condition (no +1/2 defect followed long enough), so the orders cannot be compared.";
        bool same = Math.Sign(anis.Difference.Value) == Math.Sign(head.Difference.Value);
        string verdict = same ? "the condition with the higher anisotropy also has the higher headward speed, as the shape-noise hypothesis predicts"
                              : "the condition with the higher anisotropy has the lower headward speed, against the shape-noise hypothesis";
        if (anisClear && headClear) return $"{pair}: {verdict}; both differences have 95% intervals that exclude 0.";
        return $"{pair}: the point estimates say {verdict}, but {(anisClear ? "the headward-speed" : headClear ? "the anisotropy" : "both")} difference interval(s) include 0, so the order is not established.";
    }

    /// <summary>Two-sided Welch t test p-value on two samples (NaN with fewer than 2 finite values in either).</summary>
    public static double Welch(double[] a, double[] b)
    {
        var x = a.Where(double.IsFinite).ToArray(); var y = b.Where(double.IsFinite).ToArray();
        if (x.Length < 2 || y.Length < 2) return double.NaN;
        double vx = Descriptive.SampleVariance(x) / x.Length, vy = Descriptive.SampleVariance(y) / y.Length;
        if (vx + vy == 0) return Descriptive.Mean(x) == Descriptive.Mean(y) ? 1 : 0;
        double t = (Descriptive.Mean(x) - Descriptive.Mean(y)) / Math.Sqrt(vx + vy);
        double df = (vx + vy) * (vx + vy) / (vx * vx / (x.Length - 1) + vy * vy / (y.Length - 1));
        return 2 * (1 - StudentT.CDF(0, 1, df, Math.Abs(t)));
    }
}
