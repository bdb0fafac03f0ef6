using System.Diagnostics;
using MathNet.Numerics.Distributions;
using ShapeNoise.Comparison;
using ShapeNoise.Statistics;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Comparison;

/// <summary>
/// The plan against the test compare runs, on invented nested data (recovery tests): track var_W = 1,
/// var_L = exp(mu + b_movie + e_track), b ~ N(0, sb^2), e ~ N(0, sw^2), equal frames. Then y_m = ln(pooled ratio) =
/// mu + b + ln(mean_track exp(e)), so the movie-level variance is sb^2 plus the sampling variance of ln(mean exp(e)).
/// </summary>
public class ExperimentPlanTests(ITestOutputHelper log)
{
    private static MovieData Movie(Random rng, string condition, int index, double mu, double sb, double sw, int tracks)
    {
        double b = sb * Normal.Sample(rng, 0, 1);
        var t = new TrackUnit[tracks];
        for (int i = 0; i < tracks; i++)
        {
            double varL = Math.Exp(mu + b + sw * Normal.Sample(rng, 0, 1));
            t[i] = new TrackUnit(30, varL, 1, varL, 1);
        }
        return new MovieData(condition, $"{index + 1}", $"{condition}-{index + 1}", "px", "frame", t, double.NaN, [], []);
    }

    /// <summary>Pilot: <paramref name="perCondition"/> movies in "a" (mu = 0) and in "b" (mu = logEffect), track counts drawn in [minTracks, maxTracks].</summary>
    private static List<MovieData> Pilot(int seed, int perCondition, double sb, double sw, double logEffect, int minTracks, int maxTracks)
    {
        var rng = new Random(seed);
        var list = new List<MovieData>();
        for (int i = 0; i < perCondition; i++) list.Add(Movie(rng, "a", i, 0, sb, sw, rng.Next(minTracks, maxTracks + 1)));
        for (int i = 0; i < perCondition; i++) list.Add(Movie(rng, "b", i, logEffect, sb, sw, rng.Next(minTracks, maxTracks + 1)));
        return list;
    }

    [Theory]
    [InlineData(12, 20)]    // inside the pilots' 15-45 tracks per movie
    [InlineData(6, 200)]    // extrapolated to 5-10 times the pilots' tracks: tests the sigma_w^2 / m scaling
    public void PowerOf_PlanEstimatedComponents_MatchesCompareRejectionRate(int n, int m)
    {
        // sb = 0.3 (sigma_b^2 = 0.09), sw = 0.6, r = 0.4. Per-track within variance of the pooled ratio to first order
        // (delta method): exp(sw^2) - 1 = 0.433, so for n = 12, m = 20: var(y) = 0.09 + 0.433 / 20 = 0.112,
        // d = ln 1.4 / 0.334 = 1.01, power about 0.65; for n = 6, m = 200: var(y) = 0.092, power about 0.41 (Cohen 1988, ch. 2).
        const double sb = 0.3, sw = 0.6, r = 0.4;
        const int reps = 2000;
        double delta = Math.Log(1 + r);
        var clock = Stopwatch.StartNew();
        // A large pilot (150 movies per condition, 15-45 tracks each) so that the plan's own estimation error in the
        // components moves the predicted power by about 2 points (SE of s_p^2 is var(y) sqrt(2 / 298) = 0.009; over 8
        // pilot seeds the predicted power for n = 12, m = 20 ranged 0.638-0.704 against a rate of 0.647).
        var plan = ExperimentPlan.Run(Pilot(11, 150, sb, sw, delta, 15, 45), r, resamples: 1000, seed: 3);
        log.WriteLine($"plan: {clock.ElapsedMilliseconds} ms; sigma_b^2 {plan.Components.Between:F4}, sigma_w^2 {plan.Components.Within:F4}, ICC {plan.Icc.Value:F4} [{plan.Icc.Low:F4}, {plan.Icc.High:F4}]");
        double predicted = ExperimentPlan.PowerOf(plan.Components.Between, plan.Components.Within, n, m, delta, 0.05);

        // compare's own test on the design, replicated: MovieQuantity per movie, MovieTest p < 0.05.
        clock.Restart();
        int reject = 0;
        for (int rep = 0; rep < reps; rep++)
        {
            var rng = new Random(5000 + rep);
            var a = Enumerable.Range(0, n).Select(i => ConditionComparison.MovieQuantity("anisotropy", Movie(rng, "a", i, 0, sb, sw, m))).ToArray();
            var b = Enumerable.Range(0, n).Select(i => ConditionComparison.MovieQuantity("anisotropy", Movie(rng, "b", i, delta, sb, sw, m))).ToArray();
            if (ConditionComparison.MovieTest(a, b) is { PValue: < 0.05 }) reject++;
        }
        double rate = reject / (double)reps;
        log.WriteLine($"replications: {clock.ElapsedMilliseconds} ms; n {n}, m {m}: predicted power {predicted:F4}, rejection rate {rate:F4} over {reps}");
        Assert.InRange(predicted, 0.35, 0.8);   // the designs sit where power is sensitive to the variance
        // 5 points: Monte Carlo SE of the rate sqrt(0.65 * 0.35 / 2000) = 0.011, plus about 0.02 from the pilot's
        // estimation error. (2000 replications rather than 200: with 200 the Monte Carlo SE alone would be 0.034.)
        Assert.InRange(predicted - rate, -0.05, 0.05);
        // sigma_b^2 recovers sb^2 = 0.09 within 0.03: about 3 SE of s_p^2 (0.009) plus the error of mean V_m.
        Assert.InRange(plan.Components.Between, 0.09 - 0.03, 0.09 + 0.03);
    }

    [Fact]
    public void Run_TwoPilotMovies_IntervalsTooFew()
    {
        var plan = ExperimentPlan.Run(Pilot(21, 1, 0.5, 0.6, 0, 20, 30), 1.0, resamples: 200);   // one movie per condition
        Assert.Equal(2, plan.PilotMovies);
        Assert.Equal(EstimateStatus.TooFew, plan.Icc.Status);
        Assert.Equal(2, plan.Icc.N);
        Assert.Equal("movies", plan.Icc.UnitName);
        Assert.All(plan.Designs, d => Assert.Equal(EstimateStatus.TooFew, d.Interval.Status));
        Assert.Equal(EstimateStatus.TooFew, plan.SmallestPower.Status);
    }

    [Fact]
    public void Run_TenPilotMovies_IntervalsOkAndContainPoint()
    {
        // sb = 0.5 makes sigma_b^2 > 0 in nearly every resample, so the ICC interval has width; r = 1 (a doubling)
        // has an adequate design within the grid.
        var plan = ExperimentPlan.Run(Pilot(31, 5, 0.5, 0.6, 0, 20, 30), 1.0, resamples: 500, seed: 4);
        log.WriteLine($"ICC {plan.Icc.Value:F4} [{plan.Icc.Low:F4}, {plan.Icc.High:F4}] {plan.Icc.Status}; smallest {plan.Smallest}; power [{plan.SmallestPower.Low:F3}, {plan.SmallestPower.High:F3}] {plan.SmallestPower.Status}");
        Assert.Equal(10, plan.PilotMovies);
        foreach (var e in new[] { plan.Icc, plan.SmallestPower })
        {
            Assert.Equal(EstimateStatus.Ok, e.Status);
            Assert.Equal(10, e.N);
            Assert.Equal("movies", e.UnitName);
            Assert.InRange(e.Value, e.Low, e.High);
            Assert.True(e.High > e.Low);
        }
        Assert.NotNull(plan.Smallest);
        Assert.Equal(plan.Smallest!.Value.Power, plan.SmallestPower.Value);
        // The grid's intervals take the percentiles at two order statistics of var(y) only, which is exact because the
        // t test's power rises monotonically with the standardized effect (noncentral t, Cohen 1988, ch. 2): they must
        // equal the smallest design's interval, formed from the power at every resample.
        Assert.Equal(plan.SmallestPower.Low, plan.Smallest.Value.Interval.Low, 9);
        Assert.Equal(plan.SmallestPower.High, plan.Smallest.Value.Interval.High, 9);
    }

    [Fact]
    public void Run_NoMovieVariation_IccIntervalNotOk()
    {
        // sb = 0: s_p^2 falls below mean V_m in most resamples, so sigma_b^2 = 0 (truncated)
        // in most of them; the ICC interval is then [0, small] or of zero width, and a zero-width one must not be ok.
        var plan = ExperimentPlan.Run(Pilot(41, 5, 0, 0.6, 0, 20, 30), 1.0, resamples: 300, seed: 5);
        log.WriteLine($"ICC {plan.Icc.Value:F4} [{plan.Icc.Low:F4}, {plan.Icc.High:F4}] {plan.Icc.Status}");
        Assert.Equal(0, plan.Icc.Low);
        if (!(plan.Icc.High > plan.Icc.Low))
        {
            Assert.Equal(EstimateStatus.TooFew, plan.Icc.Status);
            Assert.Contains("zero width", plan.Icc.Reason);
        }
        else Assert.Equal(EstimateStatus.Ok, plan.Icc.Status);
    }

    [Fact]
    public void Run_SameSeed_SameNumbers()
    {
        var pilots = Pilot(51, 4, 0.4, 0.6, 0.1, 20, 30);
        var a = ExperimentPlan.Run(pilots, 0.5, resamples: 200, seed: 9);
        var b = ExperimentPlan.Run(pilots, 0.5, resamples: 200, seed: 9);
        Assert.Equal(a.Icc, b.Icc);
        Assert.Equal(a.Components, b.Components);
        Assert.Equal(a.SmallestPower, b.SmallestPower);
    }

    [Fact]
    public void PowerOf_ZeroBetweenVariance_EqualsTwoSampleTOnSamplingSd()
    {
        // With sigma_b^2 = 0 a design of m tracks has sd sqrt(sigma_w^2 / m): for sigma_w^2 = 1, m = 25, d = 0.2 / 0.2 = 1,
        // and n = 17 per group gives power 0.8 (Cohen 1988, Table 2.4.1, d = 1.0: n = 17, from memory).
        Assert.InRange(ExperimentPlan.PowerOf(0, 1, 17, 25, 0.2, 0.05), 0.79, 0.83);
        Assert.True(ExperimentPlan.PowerOf(0.05, 1, 17, 25, 0.2, 0.05) < ExperimentPlan.PowerOf(0, 1, 17, 25, 0.2, 0.05));
    }
}
