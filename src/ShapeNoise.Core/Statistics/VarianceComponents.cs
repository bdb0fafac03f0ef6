namespace ShapeNoise.Statistics;

/// <summary>Between-movie and within-movie variance components of a unit-level measure.</summary>
/// <param name="Between">sigma_b^2: variance of the movie means around the condition mean (beyond sampling).</param>
/// <param name="Within">sigma_w^2: variance of units around their movie's mean.</param>
/// <param name="N0">Effective group size n0 of the unbalanced design.</param>
/// <param name="Movies">Number of movies (groups).</param>
/// <param name="Units">Number of units (tracks) over all movies.</param>
public readonly record struct VarianceComponents(double Between, double Within, double N0, int Movies, int Units)
{
    /// <summary>Intraclass correlation sigma_b^2 / (sigma_b^2 + sigma_w^2).</summary>
    public double Icc => Between + Within > 0 ? Between / (Between + Within) : double.NaN;

    /// <summary>Design effect of m units per movie: 1 + (m - 1) ICC (Kish L. (1965), Survey Sampling, Wiley).</summary>
    public double DesignEffect(double m) => 1 + (m - 1) * Icc;

    /// <summary>
    /// One-way random-effects ANOVA estimators for the unbalanced case: MSB and MSW from the groups,
    /// n0 = (N - sum n_i^2 / N) / (a - 1), sigma_w^2 = MSW, sigma_b^2 = max(0, (MSB - MSW) / n0).
    /// </summary>
    /// <remarks>Searle S.R., Casella G. and McCulloch C.E. (1992), Variance Components, Wiley, sec. 3.5 (ANOVA estimation,
    /// unbalanced one-way classification).</remarks>
    public static VarianceComponents Anova(IReadOnlyList<double[]> groups)
    {
        var g = groups.Where(x => x.Length > 0).ToList();
        int a = g.Count, N = g.Sum(x => x.Length);
        if (a < 2 || N <= a) return new VarianceComponents(double.NaN, double.NaN, double.NaN, a, N);
        double grand = g.Sum(x => x.Sum()) / N, ssb = 0, ssw = 0, sumN2 = 0;
        foreach (var x in g)
        {
            double m = Descriptive.Mean(x);
            ssb += x.Length * (m - grand) * (m - grand);
            ssw += Descriptive.SumSquaredDeviations(x, m);
            sumN2 += (double)x.Length * x.Length;
        }
        double msb = ssb / (a - 1), msw = ssw / (N - a), n0 = (N - sumN2 / N) / (a - 1);
        return new VarianceComponents(Math.Max(0, (msb - msw) / n0), msw, n0, a, N);
    }
    /// <summary>
    /// Method-of-moments components of a movie-level quantity y_i whose within-movie sampling variance V_i is known
    /// (estimated) and comes from m_i units: sigma_w^2 = mean_i (m_i V_i) (the per-unit within variance, so that a movie
    /// of m units has sampling variance sigma_w^2 / m); s_p^2 = sum_g sum_i (y_i - ybar_g)^2 / sum_g (n_g - 1), the
    /// sample variance of y pooled within the groups (conditions); sigma_b^2 = max(0, s_p^2 - mean_i V_i), since
    /// E[s_p^2] = sigma_b^2 + mean V. N0 is the mean of m_i. NaN components when no group has two movies.
    /// </summary>
    /// <remarks>Searle S.R., Casella G. and McCulloch C.E. (1992), Variance Components, Wiley, ch. 3 (ANOVA / method of
    /// moments estimation: equate an observed mean square to its expectation, truncate a negative variance at 0).</remarks>
    public static VarianceComponents MovieLevel(IReadOnlyList<IReadOnlyList<(double Y, double V, int Units)>> groups)
    {
        int movies = groups.Sum(g => g.Count), units = groups.Sum(g => g.Sum(x => x.Units));
        double df = groups.Sum(g => Math.Max(0, g.Count - 1.0));
        if (movies == 0 || df < 1) return new VarianceComponents(double.NaN, double.NaN, double.NaN, movies, units);
        double ss = 0, meanV = 0, within = 0;
        foreach (var g in groups)
        {
            if (g.Count == 0) continue;
            double mean = g.Average(x => x.Y);
            foreach (var x in g) { ss += (x.Y - mean) * (x.Y - mean); meanV += x.V; within += x.Units * x.V; }
        }
        meanV /= movies; within /= movies;
        return new VarianceComponents(Math.Max(0, ss / df - meanV), within, units / (double)movies, movies, units);
    }
}
