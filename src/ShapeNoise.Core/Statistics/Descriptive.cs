namespace ShapeNoise.Statistics;

/// <summary>Basic descriptive statistics on spans, computed in two passes for accuracy.</summary>
/// <remarks>Two-pass (corrected) variance: Chan T.F., Golub G.H. and LeVeque R.J. (1983), "Algorithms for computing the
/// sample variance: analysis and recommendations", The American Statistician 37:242-247. Checked against the NIST
/// Statistical Reference Datasets (univariate summary statistics).</remarks>
internal static class Descriptive
{
    /// <summary>Arithmetic mean, sum y_i / n.</summary>
    public static double Mean(ReadOnlySpan<double> y)
    {
        if (y.Length == 0) return double.NaN;
        double s = 0;
        for (int i = 0; i < y.Length; i++) s += y[i];
        double m = s / y.Length;
        // One correction pass (sum of residuals) recovers digits lost to large offsets.
        double r = 0;
        for (int i = 0; i < y.Length; i++) r += y[i] - m;
        return m + r / y.Length;
    }

    /// <summary>Sum of squared deviations about the mean, with the Chan-Golub-LeVeque correction term.</summary>
    public static double SumSquaredDeviations(ReadOnlySpan<double> y, double mean)
    {
        double ss = 0, s = 0;
        for (int i = 0; i < y.Length; i++) { double d = y[i] - mean; ss += d * d; s += d; }
        return ss - s * s / y.Length;
    }

    /// <summary>Sample variance s^2 = sum (y_i - mean)^2 / (n - 1).</summary>
    public static double SampleVariance(ReadOnlySpan<double> y)
        => y.Length < 2 ? double.NaN : SumSquaredDeviations(y, Mean(y)) / (y.Length - 1);

    /// <summary>Variance about the mean, sum (y_i - mean)^2 / n: the spec's "variance about the track mean" (mean_t of squared residuals).</summary>
    public static double PopulationVariance(ReadOnlySpan<double> y)
        => y.Length < 1 ? double.NaN : SumSquaredDeviations(y, Mean(y)) / y.Length;

    /// <summary>Sample standard deviation sqrt(s^2).</summary>
    public static double StandardDeviation(ReadOnlySpan<double> y) => Math.Sqrt(SampleVariance(y));

    /// <summary>Lag-1 autocorrelation as the NIST StRD defines it: r1 = sum_{i&lt;n} (y_i - m)(y_{i+1} - m) / sum_i (y_i - m)^2.</summary>
    public static double Lag1Autocorrelation(ReadOnlySpan<double> y)
    {
        double m = Mean(y), num = 0, den = 0;
        for (int i = 0; i < y.Length; i++)
        {
            double d = y[i] - m;
            den += d * d;
            if (i + 1 < y.Length) num += d * (y[i + 1] - m);
        }
        return num / den;
    }

    /// <summary>Median (mean of the two middle values for even n). Does not modify the input.</summary>
    public static double Median(ReadOnlySpan<double> y)
    {
        if (y.Length == 0) return double.NaN;
        var a = y.ToArray();
        Array.Sort(a);
        int n = a.Length;
        return n % 2 == 1 ? a[n / 2] : 0.5 * (a[n / 2 - 1] + a[n / 2]);
    }

    /// <summary>Linear-interpolation quantile (type 7 of Hyndman and Fan 1996, the default of R and NumPy) of sorted data.</summary>
    public static double QuantileSorted(ReadOnlySpan<double> sorted, double p)
    {
        if (sorted.Length == 0) return double.NaN;
        double h = (sorted.Length - 1) * p;
        int lo = (int)Math.Floor(h), hi = Math.Min(lo + 1, sorted.Length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }

    /// <summary>
    /// Multiplicity-weighted mean sum_i k_i x_i / sum_i k_i (the mean of a bootstrap resample given each unit's
    /// multiplicity k_i); NaN when the counts sum to 0. Sums are taken in index order.
    /// </summary>
    public static double WeightedMean(ReadOnlySpan<double> x, ReadOnlySpan<int> counts)
    {
        if (x.Length != counts.Length) throw new ArgumentException($"{nameof(x)} has {x.Length} values, {nameof(counts)} {counts.Length}");
        double s = 0, n = 0;
        for (int i = 0; i < x.Length; i++) { s += counts[i] * x[i]; n += counts[i]; }
        return n > 0 ? s / n : double.NaN;
    }
}
