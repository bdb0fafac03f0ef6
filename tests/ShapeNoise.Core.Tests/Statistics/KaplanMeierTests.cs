using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

/// <summary>
/// Kaplan-Meier product-limit estimate with Greenwood's variance and the Brookmeyer-Crowley median interval
/// (docs/motion.md#defect-lifetime), against a textbook worked example with censoring and, without censoring, the
/// empirical survival function.
/// </summary>
public class KaplanMeierTests
{
    /// <summary>The 6-MP arm of Freireich E.J. et al. (1963), Blood 21:699-716, remission times in weeks, + = censored, as
    /// tabulated by Kleinbaum D.G. and Klein M., Survival Analysis: A Self-Learning Text (Springer), ch. 2 (from memory):
    /// 6, 6, 6, 6+, 7, 9+, 10, 10+, 11+, 13, 16, 17+, 19+, 20+, 22, 23, 25+, 32+, 32+, 34+, 35+.</summary>
    private static readonly (double T, bool Event)[] SixMp =
    [
        (6, true), (6, true), (6, true), (6, false), (7, true), (9, false), (10, true), (10, false), (11, false), (13, true), (16, true),
        (17, false), (19, false), (20, false), (22, true), (23, true), (25, false), (32, false), (32, false), (34, false), (35, false),
    ];

    private static SurvivalCurve SixMpCurve()
    {
        var t = SixMp.Select(x => x.T).ToArray();
        var e = SixMp.Select(x => x.Event).ToArray();
        return KaplanMeier.Of(t, e);
    }

    /// <summary>
    /// Textbook values (Kleinbaum and Klein, table of the 6-MP group, from memory; 3 decimals): S = 0.857 at 6, 0.807 at 7,
    /// 0.753 at 10, 0.690 at 13, 0.627 at 16, 0.538 at 22, 0.448 at 23, median 23. Cross-checked by hand:
    /// 6: n = 21, d = 3, S = 18/21 = 0.857143; 7: n = 17 (3 deaths and 1 censored at 6 leave), S = 0.857143 x 16/17 = 0.806723;
    /// 10: n = 15 (9+ left), S x 14/15 = 0.752941; 13: n = 12 (10+, 11+ left), S x 11/12 = 0.690196; 16: n = 11, S x 10/11 =
    /// 0.627451; 22: n = 7 (17+, 19+, 20+ left), S x 6/7 = 0.537815; 23: n = 6, S x 5/6 = 0.448179 &lt;= 1/2 first, so the
    /// median is 23. Tolerance 5e-4: the table rounds to 3 decimals.
    /// </summary>
    [Fact]
    public void Of_SixMpLeukaemiaData_MatchesTextbookSurvival()
    {
        var c = SixMpCurve();
        var expected = new (double T, int N, double S)[] { (6, 21, 0.857), (7, 17, 0.807), (10, 15, 0.753), (13, 12, 0.690), (16, 11, 0.627), (22, 7, 0.538), (23, 6, 0.448) };
        foreach (var (t, n, s) in expected)
        {
            var step = c.Steps.Single(x => x.Time == t);
            Assert.Equal(n, step.AtRisk);
            Assert.Equal(s, step.Survival, 5e-4);
            Assert.Equal(s, c.At(t + 0.5), 5e-4);   // a step function: constant until the next event
        }
        Assert.Equal(0.448179, c.At(100), 1e-6);    // no event after 23 (all later times censored)
        Assert.Equal(1.0, c.At(5.9));
        Assert.Equal(21, c.Subjects);
        Assert.Equal(9, c.Events);
        Assert.Equal(23, KaplanMeier.Median(c).Median);
    }

    /// <summary>
    /// Greenwood's standard error, by hand: at 6, S sqrt(3 / (21 x 18)) = 0.857143 x 0.0890871 = 0.076360; at 13,
    /// 0.690196 x sqrt(3/378 + 1/272 + 1/210 + 1/132) = 0.690196 x sqrt(0.0239507) = 0.106815; at 23 the sum adds 1/110 +
    /// 1/42 + 1/30 to 0.0901844 and SE = 0.448179 x 0.300307 = 0.134591. The same 0.0764, 0.1068 and 0.1346 appear in the
    /// std.err column of the classic R survfit printout of these data (from memory). Tolerance 1e-5: hand arithmetic to 6 digits.
    /// </summary>
    [Fact]
    public void Of_SixMpLeukaemiaData_GreenwoodStandardErrorAsByHand()
    {
        var c = SixMpCurve();
        Assert.Equal(0.076360, c.Steps.Single(x => x.Time == 6).StandardError, 1e-5);
        Assert.Equal(0.106815, c.Steps.Single(x => x.Time == 13).StandardError, 1e-5);
        Assert.Equal(0.134591, c.Steps.Single(x => x.Time == 23).StandardError, 1e-5);
        var s6 = c.Steps.Single(x => x.Time == 6);
        Assert.Equal(Math.Min(1, s6.Survival + 1.959964 * s6.StandardError), s6.High, 1e-5);
        Assert.Equal(s6.Survival - 1.959964 * s6.StandardError, s6.Low, 1e-5);
    }

    /// <summary>
    /// Brookmeyer-Crowley interval {t : |S(t) - 1/2| &lt;= 1.96 SE(t)}, by hand from the values above: the lower curve
    /// S - 1.96 SE is 0.752941 - 0.188843 = 0.564 at 10 and 0.690196 - 0.209353 = 0.481 &lt;= 1/2 at 13, so the interval
    /// starts at 13; the upper curve at the last event (23) is 0.448179 + 0.263796 = 0.712 &gt; 1/2 and S stays there, so the
    /// upper end is not reached (+infinity).
    /// </summary>
    [Fact]
    public void Median_SixMpLeukaemiaData_IntervalFrom13UpperNotReached()
    {
        var m = KaplanMeier.Median(SixMpCurve());
        Assert.Equal(23, m.Median);
        Assert.Equal(13, m.Low);
        Assert.True(double.IsPositiveInfinity(m.High));
        Assert.True(m.Reached);
        Assert.Equal(35, m.LongestTime);
    }

    /// <summary>
    /// Without censoring the product-limit estimate is the empirical survival function S(t) = #{T_i &gt; t} / n, and
    /// Greenwood's variance reduces to the binomial S (1 - S) / n (Kaplan and Meier 1958; e.g. Collett D., Modelling
    /// Survival Data in Medical Research, ch. 2). Tolerance 1e-12: rounding of the products only.
    /// </summary>
    [Fact]
    public void Of_NoCensoring_EqualsEmpiricalSurvivalAndBinomialVariance()
    {
        double[] t = [3, 1, 4, 1, 5, 9, 2, 6, 5, 3];
        var c = KaplanMeier.Of(t, Enumerable.Repeat(true, t.Length).ToArray());
        Assert.Equal(t.Distinct().Count(), c.Steps.Count);
        foreach (var step in c.Steps)
        {
            double empirical = t.Count(x => x > step.Time) / (double)t.Length;
            Assert.Equal(empirical, step.Survival, 1e-12);
            Assert.Equal(Math.Sqrt(empirical * (1 - empirical) / t.Length), step.StandardError, 1e-12);
        }
        // Sorted: 1 1 2 3 3 4 5 5 6 9; S(3) = 5/10 exactly (up to rounding of the product), so the median is 3.
        Assert.Equal(3, KaplanMeier.Median(c).Median);
    }

    /// <summary>Every time censored: S stays 1, the median is not reached (+infinity) and no event is counted.</summary>
    [Fact]
    public void Median_AllCensored_NotReached()
    {
        var c = KaplanMeier.Of([4, 7, 9], [false, false, false]);
        Assert.All(c.Steps, s => Assert.Equal(1.0, s.Survival));
        var m = KaplanMeier.Median(c);
        Assert.False(m.Reached);
        Assert.Equal(9, m.LongestTime);
        Assert.Equal(0, c.Events);
    }
}
