using MathNet.Numerics.Distributions;

namespace ShapeNoise.Statistics;

/// <summary>
/// Exact (Garwood) two-sided interval for the mean mu of a Poisson count k:
/// mu_low = chi2_(2k)^-1(alpha/2) / 2 (0 when k = 0), mu_high = chi2_(2k+2)^-1(1 - alpha/2) / 2, alpha = 1 - level,
/// from the chi-square inverse CDF (MathNet.Numerics); a rate is the count and both bounds divided by the exposure
/// (docs/motion.md#creation-and-annihilation).
/// </summary>
/// <remarks>Garwood F. (1936), "Fiducial limits for the Poisson distribution", Biometrika 28:437-442. The identity
/// P(Poisson(mu) &gt;= k) = P(chi2_(2k) &lt;= 2 mu) makes the bounds the means at which the observed count is just in the
/// upper or lower tail; the interval covers at least the nominal level for every mu.</remarks>
public static class PoissonInterval
{
    /// <summary>(mu_low, mu_high) for the count <paramref name="k"/> (&gt;= 0) at <paramref name="level"/> (default 95 %).</summary>
    public static (double Low, double High) Garwood(int k, double level = 0.95)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(k);
        if (!(level > 0 && level < 1)) throw new ArgumentOutOfRangeException(nameof(level), level, "must lie in (0, 1)");
        double alpha = 1 - level;
        double low = k == 0 ? 0 : ChiSquared.InvCDF(2 * k, alpha / 2) / 2;
        double high = ChiSquared.InvCDF(2 * (k + 1), 1 - alpha / 2) / 2;
        return (low, high);
    }

    /// <summary>The rate k / <paramref name="exposure"/> with its Garwood interval, judged with n = k events
    /// (<see cref="Estimate.Judged"/>: too_few under <see cref="Estimate.MinUnits"/> events); NaN rate when the exposure is
    /// not positive.</summary>
    public static Estimate Rate(int k, double exposure, string unitName = "events")
    {
        if (!(exposure > 0)) return Estimate.TooFewUnits(k, unitName, "no exposure (area x time) in which events could be seen");
        var (lo, hi) = Garwood(k);
        return Estimate.Judged(k / exposure, lo / exposure, hi / exposure, k, unitName);
    }
}
