using MathNet.Numerics.Distributions;

namespace ShapeNoise.Statistics;

/// <summary>One distinct time of a survival curve: S(t) just after it, Greenwood's standard error and the pointwise 95 %
/// band S -+ z SE clipped to [0, 1].</summary>
/// <param name="Time">The time t_i (an event or a censoring time).</param>
/// <param name="AtRisk">n_i, subjects with time &gt;= t_i.</param>
/// <param name="Events">d_i, events (deaths) at t_i.</param>
/// <param name="Censored">Subjects censored at t_i (they count as at risk at t_i: censoring after the events).</param>
/// <param name="Survival">S(t_i) = prod_{t_j &lt;= t_i} (1 - d_j / n_j).</param>
/// <param name="StandardError">Greenwood: S(t_i) sqrt(sum_{t_j &lt;= t_i} d_j / (n_j (n_j - d_j))); 0 once S = 0.</param>
/// <param name="Low">max(0, S - z SE).</param><param name="High">min(1, S + z SE).</param>
public readonly record struct SurvivalStep(double Time, int AtRisk, int Events, int Censored, double Survival, double StandardError, double Low, double High);

/// <summary>A median survival time with its interval; a bound that is not reached is +infinity.</summary>
/// <param name="Median">Smallest t with S(t) &lt;= 1/2 (+infinity when S stays above 1/2).</param>
/// <param name="Low">Smallest t with S(t) - z SE(t) &lt;= 1/2: the lower end of the Brookmeyer-Crowley interval (the median
/// of the band's lower curve).</param>
/// <param name="High">Smallest t with S(t) + z SE(t) &lt;= 1/2: the upper end (the median of the band's upper curve;
/// +infinity when not reached).</param>
/// <param name="LongestTime">The largest time observed (event or censoring): what "not reached" means.</param>
public readonly record struct SurvivalMedian(double Median, double Low, double High, double LongestTime)
{
    /// <summary>True when S(t) falls to 1/2 within the data.</summary>
    public bool Reached => double.IsFinite(Median);
}

/// <summary>A Kaplan-Meier survival curve: one step per distinct time, in increasing order.</summary>
/// <param name="Steps">The distinct times with their S, SE and band.</param>
/// <param name="Subjects">Subjects (observations) in all.</param>
/// <param name="Events">Uncensored observations (events).</param>
public sealed record SurvivalCurve(IReadOnlyList<SurvivalStep> Steps, int Subjects, int Events)
{
    /// <summary>S(t): 1 before the first step, else S of the last step with time &lt;= t.</summary>
    public double At(double t)
    {
        double s = 1;
        foreach (var step in Steps) { if (step.Time > t) break; s = step.Survival; }
        return s;
    }
}

/// <summary>
/// Product-limit (Kaplan-Meier) survival curve of right-censored times, S(t) = prod_{t_i &lt;= t} (1 - d_i / n_i) with
/// n_i the subjects at risk (time &gt;= t_i) and d_i the events at t_i; Greenwood's variance
/// Var S(t) = S(t)^2 sum_{t_i &lt;= t} d_i / (n_i (n_i - d_i)); the median as the smallest t with S(t) &lt;= 1/2 and its 95 %
/// interval {t : |S(t) - 1/2| &lt;= z SE(t)} from the Greenwood band (docs/motion.md#defect-lifetime).
/// </summary>
/// <remarks>Kaplan E.L. and Meier P. (1958), "Nonparametric estimation from incomplete observations", J. Am. Stat. Assoc.
/// 53:457-481; Greenwood M. (1926), "The natural duration of cancer", Reports on Public Health and Medical Subjects 33,
/// HMSO, London; Brookmeyer R. and Crowley J. (1982), "A confidence interval for the median survival time", Biometrics
/// 38:29-41 (the interval is the set of times where the test of S(t) = 1/2 with Greenwood's variance does not reject).
/// An event and a censoring at the same time: the censored subject counts as at risk (Kaplan and Meier 1958).</remarks>
public static class KaplanMeier
{
    /// <summary>z = Phi^-1(0.975) of the two-sided 95 % band.</summary>
    public static readonly double Z95 = Normal.InvCDF(0, 1, 0.975);

    /// <summary>Slack when comparing a product of ratios with 1/2 (n = 10 with five events gives 0.5 up to rounding).</summary>
    private const double HalfSlack = 1e-12;

    /// <summary>The curve of <paramref name="times"/> (finite, &gt;= 0), <paramref name="observed"/>[i] true for an event and
    /// false for a censored time. Non-finite times are skipped.</summary>
    public static SurvivalCurve Of(ReadOnlySpan<double> times, ReadOnlySpan<bool> observed)
    {
        if (times.Length != observed.Length) throw new ArgumentException($"{nameof(times)} and {nameof(observed)} differ in length ({times.Length} vs {observed.Length})");
        var items = new List<(double T, bool Event)>(times.Length);
        for (int i = 0; i < times.Length; i++) if (double.IsFinite(times[i])) items.Add((times[i], observed[i]));
        items.Sort((a, b) => a.T.CompareTo(b.T));
        var steps = new List<SurvivalStep>();
        int atRisk = items.Count, events = 0;
        double s = 1, greenwood = 0;
        for (int i = 0; i < items.Count;)
        {
            double t = items[i].T;
            int d = 0, c = 0;
            for (; i < items.Count && items[i].T == t; i++) if (items[i].Event) d++; else c++;
            if (d > 0)
            {
                s *= 1 - d / (double)atRisk;
                greenwood = d < atRisk ? greenwood + d / ((double)atRisk * (atRisk - d)) : double.PositiveInfinity;
            }
            double se = s > 0 ? s * Math.Sqrt(greenwood) : 0;
            steps.Add(new SurvivalStep(t, atRisk, d, c, s, se, Math.Max(0, s - Z95 * se), Math.Min(1, s + Z95 * se)));
            atRisk -= d + c; events += d;
        }
        return new SurvivalCurve(steps, items.Count, events);
    }

    /// <summary>The median and its Brookmeyer-Crowley interval (see <see cref="SurvivalMedian"/>); all NaN without subjects.</summary>
    public static SurvivalMedian Median(SurvivalCurve curve)
    {
        if (curve.Steps.Count == 0) return new SurvivalMedian(double.NaN, double.NaN, double.NaN, double.NaN);
        double FirstAtOrBelowHalf(Func<SurvivalStep, double> of)
        {
            foreach (var step in curve.Steps) if (of(step) <= 0.5 + HalfSlack) return step.Time;
            return double.PositiveInfinity;
        }
        return new SurvivalMedian(FirstAtOrBelowHalf(s => s.Survival), FirstAtOrBelowHalf(s => s.Survival - Z95 * s.StandardError),
            FirstAtOrBelowHalf(s => s.Survival + Z95 * s.StandardError), curve.Steps[^1].Time);
    }
}
