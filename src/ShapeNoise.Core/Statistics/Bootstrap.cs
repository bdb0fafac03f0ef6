namespace ShapeNoise.Statistics;

/// <summary>A value with its 95% interval.</summary>
public readonly record struct Estimate(double Value, double Low, double High)
{
    public static Estimate NaN => new(double.NaN, double.NaN, double.NaN);
    public Estimate Scale(double f) => f >= 0 ? new(Value * f, Low * f, High * f) : new(Value * f, High * f, Low * f);
}

/// <summary>Seeded non-parametric bootstrap over independent units (tracks), with percentile intervals.</summary>
/// <remarks>Efron B. and Tibshirani R.J. (1993), An Introduction to the Bootstrap, Chapman and Hall, ch. 13 (percentile
/// interval). The random stream is System.Random with a fixed seed, so the same input and seed give the same interval.</remarks>
public static class Bootstrap
{
    /// <summary>
    /// Evaluates <paramref name="statistic"/> on the data (all multiplicities 1) and on <paramref name="resamples"/> resamples
    /// of <paramref name="units"/> units drawn with replacement (the statistic receives each unit's multiplicity), and returns
    /// the point value with the 2.5% and 97.5% percentiles of the finite resampled values.
    /// </summary>
    public static Estimate Percentile(int units, Func<int[], double> statistic, int resamples, int seed)
    {
        var ones = new int[units];
        Array.Fill(ones, 1);
        double value = statistic(ones);
        if (units == 0 || resamples <= 0) return new Estimate(value, double.NaN, double.NaN);
        var rng = new Random(seed);
        var counts = new int[units];
        var stats = new List<double>(resamples);
        for (int b = 0; b < resamples; b++)
        {
            Array.Clear(counts);
            for (int i = 0; i < units; i++) counts[rng.Next(units)]++;
            double s = statistic(counts);
            if (double.IsFinite(s)) stats.Add(s);
        }
        if (stats.Count < 2) return new Estimate(value, double.NaN, double.NaN);
        var sorted = stats.ToArray();
        Array.Sort(sorted);
        return new Estimate(value, Descriptive.QuantileSorted(sorted, 0.025), Descriptive.QuantileSorted(sorted, 0.975));
    }
}
