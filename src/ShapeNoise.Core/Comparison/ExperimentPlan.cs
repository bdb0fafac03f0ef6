using ShapeNoise.Statistics;

namespace ShapeNoise.Comparison;

/// <summary>One design of the planning grid: its power at the pilot's components, and that power's 95% interval over
/// the movie bootstrap of the pilot (<see cref="Estimate"/>, units movies).</summary>
public readonly record struct DesignPower(int MoviesPerCondition, int CellsPerMovie, double Power)
{
    /// <summary>The power with its 95% interval from re-estimating the components on resampled pilot movies.</summary>
    public Estimate Interval { get; init; } = Estimate.NaN;
}

/// <summary>One pilot movie as the plan uses it: the movie-level quantity y = <see cref="ConditionComparison.MovieQuantity"/>,
/// its within-movie sampling variance V (bootstrap over the movie's tracks) and its number of usable tracks.</summary>
public readonly record struct PilotMovie(string Condition, string Replicate, double Y, double V, int Tracks, double MedianFrames);

/// <summary>
/// The planning result: the movie-level variance components, the ICC and the power of each design (with intervals), the
/// smallest adequate design, and the assumptions: tracks per movie and frames per track of the pilots (medians).
/// </summary>
public sealed record PlanResult(string Measure, double RelativeEffect, double LogEffect, VarianceComponents Components,
    IReadOnlyList<DesignPower> Designs, DesignPower? Smallest, int PilotMovies, int PilotTracks, double MedianTracksPerMovie)
{
    /// <summary>ICC = sigma_b^2 / (sigma_b^2 + sigma_w^2) with its 95% movie-bootstrap interval (N = pilot movies).</summary>
    public Estimate Icc { get; init; } = Estimate.NaN;
    /// <summary>Power of <see cref="Smallest"/> with its 95% movie-bootstrap interval (too_few when there is no adequate design).</summary>
    public Estimate SmallestPower { get; init; } = Estimate.NaN;
    /// <summary>Assumed track length: median frames per track over the pilots' usable tracks (sigma_w^2 is per track of about this length).</summary>
    public double MedianFramesPerTrack { get; init; } = double.NaN;
    /// <summary>The pilot movies with y, V and track counts.</summary>
    public IReadOnlyList<PilotMovie> Pilots { get; init; } = [];
    /// <summary>Movie-bootstrap resamples behind the intervals, and their seed.</summary>
    public int Resamples { get; init; }
    /// <summary>Seed of the track and movie bootstraps.</summary>
    public int Seed { get; init; }
    /// <summary>Two-sided level of the planned test.</summary>
    public double Alpha { get; init; } = 0.05;
    /// <summary>Target power.</summary>
    public double Target { get; init; } = 0.8;
}

/// <summary>
/// How many movies a comparison needs, for the test compare runs: one movie-level value per movie,
/// y_m = <see cref="ConditionComparison.MovieQuantity"/> (ln of the movie's frame-weighted pooled ratio
/// sum(F var_L) / sum(F var_W), or along/across), compared by the pooled-variance Student t test
/// (<see cref="ConditionComparison.MovieTest"/>). Each pilot movie's sampling variance V_m comes from a seeded bootstrap
/// over its tracks; sigma_w^2 = mean_m (m_m V_m) per track and sigma_b^2 = max(0, s_p^2(y) - mean V_m) with s_p^2 pooled
/// within conditions (<see cref="VarianceComponents.MovieLevel"/>). A design of n movies per condition with m tracks each
/// has var(y) = sigma_b^2 + sigma_w^2 / m, standardized effect d = ln(1 + r) / sqrt(var(y)) and power
/// <see cref="Power.TwoSampleT"/>(n, d) (docs/statistics.md#planning).
/// </summary>
/// <remarks>Searle, Casella and McCulloch (1992), Variance Components, Wiley, for the method-of-moments components;
/// Efron and Tibshirani (1993), An Introduction to the Bootstrap, Chapman and Hall, for the bootstrap variance and the
/// percentile intervals; Cohen (1988) for power.</remarks>
public static class ExperimentPlan
{
    /// <summary>Cells per movie m at which the plan evaluates power.</summary>
    internal static readonly int[] CellsChoices = [25, 50, 100, 200, 400];

    /// <summary>Largest movies per condition in the design grid (the grid is 2..MaxMovies).</summary>
    public const int MaxMovies = 30;

    /// <summary>Track bootstrap resamples behind each pilot movie's V_m.</summary>
    public const int TrackResamples = 200;

    /// <summary>
    /// Power of the two-sided pooled Student t test on movie-level values with <paramref name="movies"/> per condition and
    /// <paramref name="tracksPerMovie"/> tracks each: Power.TwoSampleT(n, |logEffect| / sqrt(sigma_b^2 + sigma_w^2 / m), alpha).
    /// NaN for non-finite or negative components; 1 when the variance is 0 and the effect is not.
    /// </summary>
    /// <remarks>The variance of a movie's value is the between-movie variance plus its sampling variance, which for a
    /// pooled ratio of m tracks is sigma_w^2 / m to first order (delta method); Cohen (1988), ch. 2, for the power.</remarks>
    public static double PowerOf(double sigmaB2, double sigmaW2, int movies, int tracksPerMovie, double logEffect, double alpha)
    {
        if (!(sigmaB2 >= 0) || !(sigmaW2 >= 0) || !double.IsFinite(sigmaB2 + sigmaW2) || tracksPerMovie < 1 || !double.IsFinite(logEffect)) return double.NaN;
        double var = sigmaB2 + sigmaW2 / tracksPerMovie;
        if (!(var > 0)) return logEffect != 0 && movies >= 2 ? 1 : double.NaN;
        return Power.TwoSampleT(movies, Math.Abs(logEffect) / Math.Sqrt(var), alpha);
    }

    /// <summary>Whether a track carries weight in the pooled ratio of <paramref name="measure"/> as compare computes it
    /// (<see cref="ConditionComparison.Statistic"/>: finite variances; here also positive, finite frames).</summary>
    private static bool Usable(TrackUnit t, string measure)
    {
        var (a, b) = measure == "anisotropy_contour" ? (t.VarAlong, t.VarAcross) : (t.VarL, t.VarW);
        return double.IsFinite(a) && double.IsFinite(b) && t.Frames > 0 && double.IsFinite(t.Frames);
    }

    /// <summary>
    /// One pilot movie: y = MovieQuantity(measure, movie) on its usable tracks, and V = sample variance of the same
    /// quantity over <paramref name="resamples"/> resamples of those tracks drawn with replacement (seeded).
    /// NaN V with fewer than 2 usable tracks.
    /// </summary>
    public static PilotMovie Pilot(MovieData movie, string measure, int resamples, int seed)
    {
        if (ConditionComparison.MovieLevelMeasures.Contains(measure)) return MovieLevelPilot(movie, measure);
        var tracks = movie.Tracks.Where(t => Usable(t, measure)).ToArray();
        var m = movie with { Tracks = tracks };
        double y = ConditionComparison.MovieQuantity(measure, m);
        double frames = tracks.Length > 0 ? Descriptive.Median(tracks.Select(t => t.Frames).ToArray()) : double.NaN;
        if (tracks.Length < 2 || !double.IsFinite(y)) return new PilotMovie(movie.Condition, movie.Replicate, y, double.NaN, tracks.Length, frames);
        var boot = new List<double>(resamples);
        foreach (var counts in Bootstrap.Draws(tracks.Length, resamples, seed))
        {
            double v = ConditionComparison.Statistic(measure, [m], [1], [counts]);
            if (v > 0 && double.IsFinite(v)) boot.Add(Math.Log(v));
        }
        double var = boot.Count >= 2 ? Descriptive.SampleVariance(boot.ToArray()) : double.NaN;
        return new PilotMovie(movie.Condition, movie.Replicate, y, var, tracks.Length, frames);
    }

    /// <summary>
    /// A pilot movie of a movie-level measure (docs/motion.md#comparing-conditions): y = MovieQuantity (ln of the value for
    /// log-scale measures), and V = ((U - L) / (2 x 1.96))^2 from the movie's own 95% interval [L, U] on the same scale (its
    /// moving-block bootstrap over time, or its Poisson or Kaplan-Meier interval), one unit per movie. NaN V without an interval.
    /// </summary>
    /// <remarks>The half-width of a 95% interval is 1.96 standard errors for a normal sampling distribution (common practice).</remarks>
    public static PilotMovie MovieLevelPilot(MovieData movie, string measure)
    {
        double y = ConditionComparison.MovieQuantity(measure, movie);
        var mv = movie.MovieLevel.TryGetValue(measure, out var x) ? x : new MovieValue(double.NaN, "not_applicable", null);
        bool log = ConditionComparison.IsLogScale(measure);
        double lo = log ? (mv.Low > 0 ? Math.Log(mv.Low) : double.NaN) : mv.Low, hi = log ? (mv.High > 0 ? Math.Log(mv.High) : double.NaN) : mv.High;
        double se = (hi - lo) / (2 * 1.959963984540054);
        return new PilotMovie(movie.Condition, movie.Replicate, y, double.IsFinite(se) ? se * se : double.NaN, 1, double.NaN);
    }

    /// <summary>The components of pilots grouped by condition (<see cref="VarianceComponents.MovieLevel"/>); when no
    /// condition has two movies, all pilots are pooled as one group (the condition difference then counts as movie variation).</summary>
    public static VarianceComponents Components(IReadOnlyList<PilotMovie> pilots)
    {
        var groups = pilots.GroupBy(p => p.Condition).Select(g => (IReadOnlyList<(double, double, int)>)g.Select(p => (p.Y, p.V, p.Tracks)).ToList()).ToList();
        if (groups.All(g => g.Count < 2)) groups = [groups.SelectMany(g => g).ToList()];
        return VarianceComponents.MovieLevel(groups);
    }

    /// <summary>
    /// The <paramref name="p"/> percentile (type 7, as <see cref="Bootstrap.PercentileBounds"/>) of the design's power over
    /// the resampled components. Power rises with var(y)^(-1/2), so the resamples are ordered by var(y) once and the power
    /// is evaluated only at the two order statistics the percentile interpolates between: the same number as the
    /// percentile of all resampled powers, at four power evaluations per design instead of one per resample.
    /// </summary>
    private static double PowerPercentile(IReadOnlyList<VarianceComponents> boot, int movies, int tracks, double logEffect, double alpha, double p)
    {
        var v = boot.Select(c => c.Between + c.Within / tracks).Where(double.IsFinite).OrderByDescending(x => x).ToArray();
        if (v.Length < 2) return double.NaN;
        double h = (v.Length - 1) * p;
        int lo = (int)Math.Floor(h), hi = Math.Min(lo + 1, v.Length - 1);
        double PowerAt(double var) => PowerOf(var, 0, movies, 1, logEffect, alpha);
        double a = PowerAt(v[lo]);
        return hi == lo ? a : a + (h - lo) * (PowerAt(v[hi]) - a);
    }

    /// <summary>
    /// Plans for <paramref name="relativeEffect"/> r on <paramref name="measure"/>: pilot movies (y, V by a
    /// <see cref="TrackResamples"/>-resample track bootstrap each), the components, the power of every design of the grid
    /// (2..<see cref="MaxMovies"/> movies per condition x <see cref="CellsChoices"/> tracks per movie) and the smallest
    /// reaching <paramref name="target"/> (fewest movies, then fewest tracks) among those with at least
    /// <see cref="ConditionComparison.MinMovies"/> movies per condition, the fewest compare tests. Intervals on the ICC and on every design's
    /// power: percentiles of <paramref name="resamples"/> re-estimates on pilot movies resampled within conditions
    /// (one stream seeded by <paramref name="seed"/>), judged with N = pilot movies and at least
    /// <see cref="ConditionComparison.MinMovies"/> of them (else too_few; a zero-width interval is too_few too).
    /// </summary>
    public static PlanResult Run(IReadOnlyList<MovieData> pilots, double relativeEffect, string measure = "anisotropy", double alpha = 0.05, double target = 0.8,
        int resamples = 1000, int seed = 1)
    {
        if (!(relativeEffect > 0)) throw new ArgumentException($"--effect must be a positive relative change such as 0.2 (got {relativeEffect})");
        if (pilots.Count == 0) throw new ArgumentException("no pilot movies");
        var movies = pilots.Select((p, i) => Pilot(p, measure, TrackResamples, seed + 7919 * (i + 1))).Where(p => double.IsFinite(p.Y) && double.IsFinite(p.V)).ToList();
        var vc = Components(movies);
        if (!double.IsFinite(vc.Within) || !double.IsFinite(vc.Between))
            throw new Reading.InputException(pilots[0].Folder, ConditionComparison.MovieLevelMeasures.Contains(measure)
                ? $"pilot data are too few to estimate variance components (need at least 2 movies of one condition with an ok {measure} and its interval)"
                : "pilot data are too few to estimate variance components (need at least 2 movies of one condition, each with 2 or more tracks)");
        // The effect on the test's scale: ln(1 + r) for log-scale measures, r x |mean y| for the linear movie-level ones.
        bool movieLevel = ConditionComparison.MovieLevelMeasures.Contains(measure);
        double delta = ConditionComparison.IsLogScale(measure) ? Math.Log(1 + relativeEffect) : relativeEffect * Math.Abs(movies.Average(p => p.Y));
        int[] cellsChoices = movieLevel ? [1] : CellsChoices;   // a movie-level value has one unit per movie of the pilots' size
        int n = movies.Count;

        // Movie bootstrap within conditions: re-estimate the components on each resample.
        var byCondition = movies.GroupBy(p => p.Condition).Select(g => g.ToArray()).ToList();
        var rng = new Random(seed);
        var boot = new List<VarianceComponents>(resamples);
        if (n >= ConditionComparison.MinMovies)
            for (int b = 0; b < resamples; b++)
            {
                var draw = new List<PilotMovie>(n);
                foreach (var g in byCondition) for (int i = 0; i < g.Length; i++) draw.Add(g[rng.Next(g.Length)]);
                var c = Components(draw);
                if (double.IsFinite(c.Between) && double.IsFinite(c.Within)) boot.Add(c);
            }
        Estimate Judge(double value, Func<VarianceComponents, double> f)
        {
            if (n < ConditionComparison.MinMovies)
                return Estimate.TooFewUnits(n, "movies", $"n = {n} pilot movies, fewer than {ConditionComparison.MinMovies}") with { Value = value };
            var (lo, hi) = Bootstrap.PercentileBounds(boot.Select(f));
            return Estimate.Judged(value, lo, hi, n, "movies", ConditionComparison.MinMovies);
        }
        static double Icc(VarianceComponents c) => c.Between + c.Within > 0 ? c.Between / (c.Between + c.Within) : double.NaN;

        var designs = new List<DesignPower>();
        foreach (int m in cellsChoices)
            for (int k = 2; k <= MaxMovies; k++)
            {
                double pw = PowerOf(vc.Between, vc.Within, k, m, delta, alpha);
                designs.Add(new DesignPower(k, m, pw) { Interval = n < ConditionComparison.MinMovies ? Judge(pw, _ => double.NaN)
                    : Estimate.Judged(pw, PowerPercentile(boot, k, m, delta, alpha, 0.025), PowerPercentile(boot, k, m, delta, alpha, 0.975), n, "movies", ConditionComparison.MinMovies) });
            }
        // compare tests only with at least MinMovies movies per condition, so a smaller design cannot be the answer.
        DesignPower? best = designs.Where(d => d.Power >= target && d.MoviesPerCondition >= ConditionComparison.MinMovies).OrderBy(d => d.MoviesPerCondition).ThenBy(d => d.CellsPerMovie).Cast<DesignPower?>().FirstOrDefault();
        var counts = movies.Select(p => (double)p.Tracks).ToArray();
        var frames = pilots.SelectMany(p => p.Tracks.Where(t => Usable(t, measure)).Select(t => t.Frames)).ToArray();
        return new PlanResult(measure, relativeEffect, delta, vc, designs, best, n, movies.Sum(p => p.Tracks), Descriptive.Median(counts))
        {
            Icc = Judge(Icc(vc), Icc),
            // The smallest design's interval straight from the definition: the percentiles of the power at every resample.
            SmallestPower = best is { } s ? Judge(s.Power, c => PowerOf(c.Between, c.Within, s.MoviesPerCondition, s.CellsPerMovie, delta, alpha)) : Estimate.TooFewUnits(n, "movies", $"no design with up to {MaxMovies} movies per condition reaches power {target}"),
            MedianFramesPerTrack = frames.Length > 0 ? Descriptive.Median(frames) : double.NaN,
            Pilots = movies, Resamples = resamples, Seed = seed, Alpha = alpha, Target = target,
        };
    }
}
