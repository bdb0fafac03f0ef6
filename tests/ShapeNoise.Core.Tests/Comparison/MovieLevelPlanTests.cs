using ShapeNoise.Comparison;
using ShapeNoise.Statistics;

namespace ShapeNoise.Core.Tests.Comparison;

/// <summary>Planning on a movie-level measure (docs/motion.md#comparing-conditions): one value per movie with its own 95%
/// interval; components by the method of moments (Searle, Casella and McCulloch 1992) computed here by hand.</summary>
public class MovieLevelPlanTests
{
    private static MovieData Movie(string condition, int replicate, double polarOrder) => new(condition, replicate.ToString(), "memory", "um", "min", [], double.NaN, [], [])
    {
        MovieLevel = new Dictionary<string, MovieValue> { ["polar_order"] = new(polarOrder, "ok", null) { Low = polarOrder - 0.02, High = polarOrder + 0.02 } },
    };

    [Fact]
    public void Run_PolarOrderPilots_ComponentsByHandAndSmallestDesign()
    {
        double[] a = [0.50, 0.55, 0.45, 0.52], b = [0.20, 0.25, 0.18, 0.22];
        var pilots = a.Select((y, i) => Movie("a", i + 1, y)).Concat(b.Select((y, i) => Movie("b", i + 1, y))).ToList();
        var plan = ExperimentPlan.Run(pilots, 0.2, "polar_order", resamples: 200);
        // By hand: within-condition sums of squares 0.0053 + 0.002675 over df 6 -> s_p^2 = 0.00132917; each movie's
        // V = (0.04 / (2 x 1.96))^2 = 1.04123e-4 (a 95% half-width is 1.96 SE: common practice); sigma_b^2 = s_p^2 - V.
        double v = Math.Pow(0.04 / (2 * 1.959963984540054), 2), sp2 = (0.0053 + 0.002675) / 6;
        Assert.Equal(v, plan.Components.Within, 12);
        Assert.Equal(sp2 - v, plan.Components.Between, 9);
        // Linear scale (polar order is bounded): the effect is 20 % of the pilots' mean, 0.2 x 0.35875.
        Assert.Equal(0.2 * 0.35875, plan.LogEffect, 12);
        Assert.All(plan.Designs, d => Assert.Equal(1, d.CellsPerMovie));
        var s = plan.Smallest!.Value;
        double d = plan.LogEffect / Math.Sqrt(sp2);
        Assert.True(Power.TwoSampleT(s.MoviesPerCondition, d, 0.05) >= 0.8);
        Assert.True(s.MoviesPerCondition == ConditionComparison.MinMovies || Power.TwoSampleT(s.MoviesPerCondition - 1, d, 0.05) < 0.8);
    }

    [Fact]
    public void MovieLevelPilot_LogScaleMeasure_VarianceFromLogInterval()
    {
        // rms_speed is compared on the ln scale: V = ((ln U - ln L) / 3.92)^2.
        var m = new MovieData("a", "1", "memory", "um", "min", [], double.NaN, [], [])
        {
            MovieLevel = new Dictionary<string, MovieValue> { ["rms_speed"] = new(0.1, "ok", null) { Low = 0.08, High = 0.125 } },
        };
        var p = ExperimentPlan.MovieLevelPilot(m, "rms_speed");
        Assert.Equal(Math.Log(0.1), p.Y, 12);
        Assert.Equal(Math.Pow(Math.Log(0.125 / 0.08) / (2 * 1.959963984540054), 2), p.V, 12);
    }
}
