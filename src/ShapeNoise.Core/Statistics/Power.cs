using MathNet.Numerics;
using MathNet.Numerics.Distributions;

namespace ShapeNoise.Statistics;

/// <summary>Power of the two-sided two-sample t test from the noncentral t distribution.</summary>
/// <remarks>
/// P(T &lt;= t) for T = (Z + delta) / sqrt(V / df), Z standard normal, V chi-square(df), is E_V[Phi(t sqrt(V/df) - delta)]
/// (the definition of the noncentral t; Johnson N.L., Kotz S. and Balakrishnan N. (1995), Continuous Univariate
/// Distributions vol. 2, ch. 31), integrated here over the chi-square density with MathNet.Numerics' double-exponential
/// quadrature; Phi and the central t quantile come from MathNet.Numerics.
/// Two equal groups of n: df = 2n - 2, delta = d sqrt(n/2); power = P(|T| &gt; t_{1 - alpha/2, df}) (Cohen J. (1988),
/// Statistical Power Analysis for the Behavioral Sciences, 2nd ed., ch. 2).
/// </remarks>
public static class Power
{
    /// <summary>CDF of the noncentral t with <paramref name="df"/> degrees of freedom and noncentrality <paramref name="delta"/>.</summary>
    public static double NoncentralTCdf(double t, double df, double delta)
    {
        var chi = new ChiSquared(df);
        // The chi-square(df) mass lies within df +- 12 sd (sd = sqrt(2 df)); beyond it the integrand is below 1e-20.
        double sd = Math.Sqrt(2 * df), lo = Math.Max(0, df - 12 * sd), hi = df + 12 * sd + 30;
        double f(double v) => chi.Density(v) * Normal.CDF(0, 1, t * Math.Sqrt(v / df) - delta);
        // Split at the mode so the quadrature sees a smooth hump on each side.
        double mode = Math.Max(df - 2, 0);
        return Math.Clamp(Integrate.DoubleExponential(f, lo, Math.Max(lo + 1e-9, mode)) + Integrate.DoubleExponential(f, Math.Max(lo + 1e-9, mode), hi), 0, 1);
    }

    /// <summary>Power of the two-sided two-sample t test with n per group, standardized effect d, level alpha.</summary>
    public static double TwoSampleT(int nPerGroup, double d, double alpha = 0.05)
    {
        if (nPerGroup < 2) return double.NaN;
        double df = 2.0 * nPerGroup - 2, delta = d * Math.Sqrt(nPerGroup / 2.0);
        double crit = StudentT.InvCDF(0, 1, df, 1 - alpha / 2);
        return 1 - NoncentralTCdf(crit, df, delta) + NoncentralTCdf(-crit, df, delta);
    }

    /// <summary>Smallest n per group whose power reaches <paramref name="target"/> (up to <paramref name="maxN"/>; -1 if none).</summary>
    public static int SampleSize(double d, double target = 0.8, double alpha = 0.05, int maxN = 100_000)
    {
        int lo = 2, hi = 2;
        while (hi <= maxN && TwoSampleT(hi, d, alpha) < target) { lo = hi; hi *= 2; }
        if (hi > maxN) return -1;
        while (lo < hi) { int mid = (lo + hi) / 2; if (TwoSampleT(mid, d, alpha) >= target) hi = mid; else lo = mid + 1; }
        return hi;
    }
}
