namespace ShapeNoise.Statistics;

/// <summary>Two-level bootstrap for nested data: resample movies within a condition, then units (tracks) within each drawn movie.</summary>
/// <remarks>Saravanan V., Berman G.J. and Sober S.J. (2020), "Application of the hierarchical bootstrap to multi-level
/// data in neuroscience", Neurons, Behavior, Data analysis, and Theory 3(5). Seeded: the same data and seed give the
/// same interval.</remarks>
internal static class HierarchicalBootstrap
{
    /// <summary>
    /// One resample for several kinds of unit at once: M movie slots each draw a movie with replacement, and for every
    /// kind j the drawn movie's units of that kind (<paramref name="unitCounts"/>[j][movie] of them) are drawn with
    /// replacement. Returns how often each movie was drawn and, per kind and movie, each unit's multiplicity summed over
    /// slots. With a single kind this is the classic two-level resample.
    /// </summary>
    public static (int[] MovieCounts, int[][][] Units) Draw(IReadOnlyList<IReadOnlyList<int>> unitCounts, int movies, Random rng)
    {
        var count = new int[movies];
        var w = new int[unitCounts.Count][][];
        for (int j = 0; j < unitCounts.Count; j++)
        {
            w[j] = new int[movies][];
            for (int m = 0; m < movies; m++) w[j][m] = new int[unitCounts[j][m]];
        }
        for (int slot = 0; slot < movies; slot++)
        {
            int movie = rng.Next(movies);
            count[movie]++;
            for (int j = 0; j < w.Length; j++)
            {
                var units = w[j][movie];
                for (int k = 0; k < units.Length; k++) units[rng.Next(units.Length)]++;
            }
        }
        return (count, w);
    }

    /// <summary>Point value (all multiplicities 1) and the 2.5-97.5 percentile interval over <paramref name="resamples"/> two-level resamples.</summary>
    public static Estimate Percentile(IReadOnlyList<int> unitsPerMovie, Func<int[][], double> statistic, int resamples, int seed)
    {
        var ones = unitsPerMovie.Select(n => Enumerable.Repeat(1, n).ToArray()).ToArray();
        double value = statistic(ones);
        var rng = new Random(seed);
        var stats = new List<double>(resamples);
        for (int b = 0; b < resamples; b++) stats.Add(statistic(Draw([unitsPerMovie], unitsPerMovie.Count, rng).Units[0]));
        return Bootstrap.Interval(value, stats, unitsPerMovie.Count, "movies");
    }
}
