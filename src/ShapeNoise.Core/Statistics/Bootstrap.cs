namespace ShapeNoise.Statistics;

/// <summary>A value with its 95% interval.</summary>
public readonly record struct Estimate(double Value, double Low, double High)
{
    /// <summary>No value: value and both bounds NaN (too few units to estimate).</summary>
    public static Estimate NaN => new(double.NaN, double.NaN, double.NaN);
    /// <summary>The estimate times <paramref name="f"/> (a unit conversion); a negative factor swaps the bounds so Low &lt;= High stays true.</summary>
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
        var stats = new List<double>(resamples);
        foreach (var counts in Draws(units, resamples, seed))
        {
            double s = statistic(counts);
            if (double.IsFinite(s)) stats.Add(s);
        }
        return Interval(value, stats);
    }

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

    /// <summary>Point value with the 2.5% and 97.5% percentiles of the finite resampled values (NaN when fewer than 2).</summary>
    public static Estimate Interval(double value, IEnumerable<double> resampled)
    {
        var sorted = resampled.Where(double.IsFinite).ToArray();
        if (sorted.Length < 2) return new Estimate(value, double.NaN, double.NaN);
        Array.Sort(sorted);
        return new Estimate(value, Descriptive.QuantileSorted(sorted, 0.025), Descriptive.QuantileSorted(sorted, 0.975));
    }
}
