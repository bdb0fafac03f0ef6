namespace ShapeNoise.Statistics;

/// <summary>Two-level bootstrap for nested data: resample movies within a condition, then units (tracks) within each drawn movie.</summary>
/// <remarks>Saravanan V., Berman G.J. and Sober S.J. (2020), "Application of the hierarchical bootstrap to multi-level
/// data in neuroscience", Neurons, Behavior, Data analysis, and Theory 3(5). Seeded: the same data and seed give the
/// same interval.</remarks>
public static class HierarchicalBootstrap
{
    /// <summary>
    /// One resample: for each of the M movie slots a movie drawn with replacement, and for it the multiplicity of each of
    /// its units (drawn with replacement). Returned as per-movie, per-unit multiplicities summed over slots.
    /// </summary>
    public static int[][] Draw(IReadOnlyList<int> unitsPerMovie, Random rng)
    {
        int m = unitsPerMovie.Count;
        var w = new int[m][];
        for (int i = 0; i < m; i++) w[i] = new int[unitsPerMovie[i]];
        for (int slot = 0; slot < m; slot++)
        {
            int movie = rng.Next(m), n = unitsPerMovie[movie];
            for (int k = 0; k < n; k++) w[movie][rng.Next(n)]++;
        }
        return w;
    }

    /// <summary>Point value (all multiplicities 1) and the 2.5-97.5 percentile interval over <paramref name="resamples"/> two-level resamples.</summary>
    public static Estimate Percentile(IReadOnlyList<int> unitsPerMovie, Func<int[][], double> statistic, int resamples, int seed)
    {
        var ones = unitsPerMovie.Select(n => Enumerable.Repeat(1, n).ToArray()).ToArray();
        double value = statistic(ones);
        var rng = new Random(seed);
        var stats = new List<double>(resamples);
        for (int b = 0; b < resamples; b++) stats.Add(statistic(Draw(unitsPerMovie, rng)));
        return Bootstrap.Interval(value, stats);
    }
}
