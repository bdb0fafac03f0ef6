using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

public class PowerTests
{
    /// <summary>
    /// Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, 2nd ed., Table 2.4.1: two-sided alpha 0.05,
    /// power 0.80 needs n = 393, 64, 26 per group for d = 0.2, 0.5, 0.8. These three values are recalled from memory of
    /// the table; the exact noncentral-t answer for d = 0.2 is 394, so the check allows +-1.
    /// </summary>
    [Theory]
    [InlineData(0.2, 393)]
    [InlineData(0.5, 64)]
    [InlineData(0.8, 26)]
    public void SampleSize_CohenTable_WithinOne(double d, int cohen)
    {
        Assert.InRange(Power.SampleSize(d), cohen - 1, cohen + 1);
    }

    [Fact]
    public void NoncentralT_ZeroDelta_EqualsCentralT()
    {
        // With delta = 0 the noncentral t is Student's t (reference library: MathNet.Numerics StudentT).
        foreach (var (t, df) in new[] { (-2.1, 5.0), (0.3, 12.0), (1.7, 40.0) })
            Assert.Equal(MathNet.Numerics.Distributions.StudentT.CDF(0, 1, df, t), Power.NoncentralTCdf(t, df, 0), 8);
    }

    [Fact]
    public void TwoSampleT_PowerMatchesSimulation()
    {
        // Monte Carlo of the two-sample t test (n = 20 per group, d = 0.7): 20000 replications, SE of the rate ~0.0035.
        var rng = new Random(3);
        int reject = 0, reps = 20000, n = 20;
        double crit = MathNet.Numerics.Distributions.StudentT.InvCDF(0, 1, 2 * n - 2, 0.975);
        var a = new double[n]; var b = new double[n];
        for (int r = 0; r < reps; r++)
        {
            for (int i = 0; i < n; i++) { a[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0.7, 1); b[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1); }
            double sp = Math.Sqrt((Descriptive.SampleVariance(a) + Descriptive.SampleVariance(b)) / 2);
            double t = (Descriptive.Mean(a) - Descriptive.Mean(b)) / (sp * Math.Sqrt(2.0 / n));
            if (Math.Abs(t) > crit) reject++;
        }
        Assert.InRange(Power.TwoSampleT(n, 0.7) - reject / (double)reps, -0.012, 0.012);
    }
}

public class RankCorrelationTests
{
    [Fact]
    public void Spearman_RandomDataWithTies_MatchesMathNet()
    {
        // Reference library: MathNet.Numerics Correlation.Spearman (average ranks for ties).
        var rng = new Random(4);
        for (int rep = 0; rep < 20; rep++)
        {
            var x = Enumerable.Range(0, 30).Select(_ => (double)rng.Next(12)).ToArray();
            var y = Enumerable.Range(0, 30).Select(_ => rng.NextDouble() + 0.1 * x[0]).ToArray();
            Assert.Equal(MathNet.Numerics.Statistics.Correlation.Spearman(x, y), RankCorrelation.Spearman(x, y), 12);
        }
    }

    [Fact]
    public void PermutationTest_PerfectlyMonotoneN8_MatchesExactRate()
    {
        // Exact permutation distribution: of the 8! orderings exactly one has rho = +1, so P(rho >= 1) = 1/8! (one-sided)
        // and 2/8! two-sided. 2,000,000 seeded permutations: expected one-sided hits 49.6 (Poisson sd 7); the reported
        // p = (hits + 1)/(B + 1) must lie within 3.5 Monte Carlo sd of 1/8!.
        double[] x = [1, 2, 3, 4, 5, 6, 7, 8], y = [0.1, 0.5, 0.9, 1.7, 2.0, 3.3, 4.1, 9.0];
        const int B = 2_000_000;
        double exact = 1.0 / 40320;
        var (rho, p) = RankCorrelation.PermutationTest(x, y, B, 5, RankCorrelation.Alternative.Greater);
        Assert.Equal(1.0, rho, 12);
        double sd = Math.Sqrt(exact * B) / B;
        Assert.InRange(p, exact - 3.5 * sd, exact + 3.5 * sd + 1.0 / B);
        var (_, p2) = RankCorrelation.PermutationTest(x, y, B, 6);
        double sd2 = Math.Sqrt(2 * exact * B) / B;
        Assert.InRange(p2, 2 * exact - 3.5 * sd2, 2 * exact + 3.5 * sd2 + 1.0 / B);
    }
}

public class NestedDesignTests
{
    /// <summary>Nested data: movie means ~ N(mu, sb^2), units ~ N(movie mean, sw^2), unbalanced sizes.</summary>
    private static List<double[]> Simulate(Random rng, int movies, double mu, double sb, double sw)
    {
        var groups = new List<double[]>();
        for (int i = 0; i < movies; i++)
        {
            double m = mu + sb * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
            int n = 30 + rng.Next(50);
            groups.Add(Enumerable.Range(0, n).Select(_ => m + sw * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1)).ToArray());
        }
        return groups;
    }

    [Fact]
    public void Anova_NestedData_IccWithin20PercentOverSeeds()
    {
        // Truth: sb^2 = 0.25, sw^2 = 1, ICC = 0.2. Mean of the estimate over 200 seeded data sets of 12 movies.
        double sum = 0;
        for (int s = 0; s < 200; s++) sum += VarianceComponents.Anova(Simulate(new Random(100 + s), 12, 0, 0.5, 1)).Icc;
        Assert.InRange(sum / 200 / 0.2, 0.8, 1.2);
    }

    [Fact]
    public void DesignEffect_KishFormula()
    {
        var vc = new VarianceComponents(0.25, 1.0, 50, 10, 500);
        Assert.Equal(1 + 49 * 0.2, vc.DesignEffect(50), 12);
    }

    [Fact]
    public void Intervals_NaivePoolingUndercoversHierarchicalBootstrapCovers()
    {
        // 200 replications of a condition with 20 movies (ICC 0.2). The naive 95 % interval treats every unit as
        // independent (mean +- 1.96 s / sqrt(N)); the hierarchical bootstrap resamples movies, then units.
        // (With 10 movies the percentile interval covers 89.5 %: few top-level units make any bootstrap a bit narrow;
        // docs/statistics.md says so.)
        int naiveHit = 0, hierHit = 0; const int reps = 200; const double mu = 3;
        for (int r = 0; r < reps; r++)
        {
            var g = Simulate(new Random(900 + r), 20, mu, 0.5, 1);
            var all = g.SelectMany(x => x).ToArray();
            double m = Descriptive.Mean(all), se = Descriptive.StandardDeviation(all) / Math.Sqrt(all.Length);
            if (Math.Abs(m - mu) <= 1.96 * se) naiveHit++;
            var e = HierarchicalBootstrap.Percentile(g.Select(x => x.Length).ToList(), w =>
            {
                double s = 0, n = 0;
                for (int i = 0; i < g.Count; i++) for (int k = 0; k < g[i].Length; k++) { s += w[i][k] * g[i][k]; n += w[i][k]; }
                return s / n;
            }, 300, r);
            if (e.Low <= mu && mu <= e.High) hierHit++;
        }
        Assert.True(naiveHit / (double)reps < 0.6, $"naive coverage {naiveHit / (double)reps}");
        Assert.InRange(hierHit / (double)reps, 0.90, 0.99);
    }
}
