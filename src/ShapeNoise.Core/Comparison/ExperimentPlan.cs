using ShapeNoise.Statistics;

namespace ShapeNoise.Comparison;

/// <summary>One design of the planning grid.</summary>
public readonly record struct DesignPower(int MoviesPerCondition, int CellsPerMovie, double Power);

/// <summary>The planning result: variance components of the track-level measure and the power of each design.</summary>
public sealed record PlanResult(string Measure, double RelativeEffect, double LogEffect, VarianceComponents Components,
    IReadOnlyList<DesignPower> Designs, DesignPower? Smallest, int PilotMovies, int PilotTracks, double MedianTracksPerMovie);

/// <summary>
/// How many movies a comparison needs. The track-level measure y = ln(var_L / var_W) (or ln(var_along / var_across))
/// is split into between-movie and within-movie variance by one-way random-effects ANOVA on the pilot movies; a design
/// of n movies per condition with m cells each compares movie means whose variance is sigma_b^2 + sigma_w^2 / m, so a
/// relative change r in the measure is d = ln(1 + r) / sqrt(sigma_b^2 + sigma_w^2 / m) standard units, and the power of
/// the two-sided two-sample t test on movie means follows from the noncentral t (<see cref="Power"/>).
/// </summary>
/// <remarks>Searle, Casella and McCulloch (1992) for the variance components; Kish (1965) for the design effect
/// 1 + (m - 1) ICC, which is the same inflation written per cell; Cohen (1988) for power.</remarks>
public static class ExperimentPlan
{
    /// <summary>Cells per movie m at which the plan evaluates power.</summary>
    internal static readonly int[] CellsChoices = [25, 50, 100, 200, 400];

    /// <summary>Track-level values of the measure per movie (natural log of the per-track variance ratio).</summary>
    public static double[] TrackValues(MovieData m, string measure) => m.Tracks
        .Select(t => measure == "anisotropy_contour" ? (t.VarAlong, t.VarAcross) : (t.VarL, t.VarW))
        .Where(p => p.Item1 > 0 && p.Item2 > 0 && double.IsFinite(p.Item1) && double.IsFinite(p.Item2))
        .Select(p => Math.Log(p.Item1 / p.Item2)).ToArray();

    /// <summary>
    /// Pilot movies grouped by condition (each group's ANOVA estimates sigma_b^2 and sigma_w^2 within the condition, so a
    /// difference between conditions is not counted as movie-to-movie variation); the components are pooled over
    /// conditions, weighted by their degrees of freedom. With one movie per condition, the groups are pooled as one.
    /// </summary>
    public static PlanResult Run(IReadOnlyList<MovieData> pilots, double relativeEffect, string measure = "anisotropy", double alpha = 0.05, double target = 0.8)
    {
        if (!(relativeEffect > 0)) throw new ArgumentException($"--effect must be a positive relative change such as 0.2 (got {relativeEffect})");
        var groups = pilots.GroupBy(p => p.Condition).Select(g => g.Select(m => TrackValues(m, measure)).Where(v => v.Length > 1).ToList()).ToList();
        VarianceComponents vc;
        if (groups.All(g => g.Count >= 2))
        {
            var parts = groups.Select(VarianceComponents.Anova).ToList();
            double dfb = parts.Sum(p => p.Movies - 1.0), dfw = parts.Sum(p => (double)(p.Units - p.Movies));
            vc = new VarianceComponents(parts.Sum(p => (p.Movies - 1.0) * p.Between) / dfb, parts.Sum(p => (p.Units - (double)p.Movies) * p.Within) / dfw,
                parts.Average(p => p.N0), parts.Sum(p => p.Movies), parts.Sum(p => p.Units));
        }
        else vc = VarianceComponents.Anova(groups.SelectMany(g => g).ToList());
        if (!double.IsFinite(vc.Within)) throw new Reading.InputException(pilots[0].Folder, "pilot data are too few to estimate variance components (need at least 2 movies with 2 or more tracks)");
        double delta = Math.Log(1 + relativeEffect);
        var designs = new List<DesignPower>();
        var tracksPerMovie = pilots.Select(p => TrackValues(p, measure).Length).OrderBy(x => x).ToArray();
        double median = tracksPerMovie[tracksPerMovie.Length / 2];
        foreach (int m in CellsChoices)
            for (int n = 2; n <= 30; n++)
            {
                double sd = Math.Sqrt(vc.Between + vc.Within / m);
                designs.Add(new DesignPower(n, m, Power.TwoSampleT(n, delta / sd, alpha)));
            }
        DesignPower? best = designs.Where(d => d.Power >= target).OrderBy(d => d.MoviesPerCondition).ThenBy(d => d.CellsPerMovie).Cast<DesignPower?>().FirstOrDefault();
        return new PlanResult(measure, relativeEffect, delta, vc, designs, best, pilots.Count, pilots.Sum(p => TrackValues(p, measure).Length), median);
    }
}
