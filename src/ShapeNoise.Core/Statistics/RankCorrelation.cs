namespace ShapeNoise.Statistics;

/// <summary>Spearman rank correlation with a seeded permutation p-value.</summary>
/// <remarks>Spearman C. (1904), "The proof and measurement of association between two things", Am. J. Psychol.
/// 15:72-101: the Pearson correlation of the ranks (ties get their average rank). Permutation test: Good P. (2005),
/// Permutation, Parametric and Bootstrap Tests of Hypotheses, Springer; p = (hits + 1) / (B + 1) (Phipson B. and
/// Smyth G.K. (2010), "Permutation p-values should never be zero", Stat. Appl. Genet. Mol. Biol. 9:39).</remarks>
internal static class RankCorrelation
{
    /// <summary>Average ranks (1-based; ties share the mean of their positions).</summary>
    public static double[] Ranks(ReadOnlySpan<double> x)
    {
        int n = x.Length;
        var idx = new int[n];
        for (int i = 0; i < n; i++) idx[i] = i;
        var copy = x.ToArray();
        Array.Sort(copy, idx);
        var r = new double[n];
        for (int i = 0; i < n;)
        {
            int j = i;
            while (j + 1 < n && copy[j + 1] == copy[i]) j++;
            double avg = 0.5 * (i + j) + 1;
            for (int k = i; k <= j; k++) r[idx[k]] = avg;
            i = j + 1;
        }
        return r;
    }

    /// <summary>Pearson correlation of two equal-length spans.</summary>
    public static double Pearson(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        double mx = Descriptive.Mean(x), my = Descriptive.Mean(y), sxy = 0, sxx = 0, syy = 0;
        for (int i = 0; i < x.Length; i++) { double a = x[i] - mx, b = y[i] - my; sxy += a * b; sxx += a * a; syy += b * b; }
        return sxy / Math.Sqrt(sxx * syy);
    }

    /// <summary>Spearman's rho: Pearson correlation of the average ranks.</summary>
    public static double Spearman(ReadOnlySpan<double> x, ReadOnlySpan<double> y) => Pearson(Ranks(x), Ranks(y));

    /// <summary>Which deviations count as at least as extreme as the observed rho.</summary>
    internal enum Alternative { TwoSided, Greater, Less }

    /// <summary>Permutation p-value of Spearman's rho: the y ranks are shuffled <paramref name="permutations"/> times
    /// (seeded); p = (hits + 1) / (B + 1).</summary>
    public static (double Rho, double P) PermutationTest(ReadOnlySpan<double> x, ReadOnlySpan<double> y, int permutations, int seed,
        Alternative alternative = Alternative.TwoSided)
    {
        var rx = Ranks(x); var ry = Ranks(y);
        double rho = Pearson(rx, ry);
        var rng = new Random(seed);
        var perm = (double[])ry.Clone();
        int n = perm.Length, hits = 0;
        double mx = Descriptive.Mean(rx), my = Descriptive.Mean(ry), sxx = 0, syy = 0;
        for (int i = 0; i < n; i++) { sxx += (rx[i] - mx) * (rx[i] - mx); syy += (ry[i] - my) * (ry[i] - my); }
        double norm = Math.Sqrt(sxx * syy), eps = 1e-12;
        for (int b = 0; b < permutations; b++)
        {
            for (int i = n - 1; i > 0; i--) { int j = rng.Next(i + 1); (perm[i], perm[j]) = (perm[j], perm[i]); }
            double s = 0;
            for (int i = 0; i < n; i++) s += (rx[i] - mx) * (perm[i] - my);
            double r = s / norm;
            bool hit = alternative switch
            {
                Alternative.Greater => r >= rho - eps,
                Alternative.Less => r <= rho + eps,
                _ => Math.Abs(r) >= Math.Abs(rho) - eps,
            };
            if (hit) hits++;
        }
        return (rho, (hits + 1.0) / (permutations + 1.0));
    }
}
