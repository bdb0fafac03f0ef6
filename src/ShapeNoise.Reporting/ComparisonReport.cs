using System.Globalization;
using System.Text;
using ScottPlot;
using ShapeNoise.Comparison;
using ShapeNoise.Statistics;
using CsvHelper;
using CsvHelper.Configuration;
using Figure = ShapeNoise.Pipeline.Figure;

namespace ShapeNoise.Reporting;

/// <summary>The files of a comparison folder (comparison.csv, differences.csv, superplots, comparison.md, report.html) and
/// of a plan folder (plan.csv, plan.png, plan.md, report.html).</summary>
public static class ComparisonReport
{
    static readonly CultureInfo Ci = CultureInfo.InvariantCulture;

    static string F(double v) => double.IsFinite(v) ? v.ToString("G4", Ci) : "n/a";
    static string Csv(double v) => double.IsFinite(v) ? v.ToString("R", Ci) : "";

    /// <summary>The unit of a comparison measure ("ratio", the time unit, or length/time), from <see cref="Measures"/>.</summary>
    private static string UnitOf(string measure, ComparisonResult r)
        => (UnitScale.FromNames(r.LengthUnit, r.TimeUnit) ?? throw new ArgumentException($"units '{r.LengthUnit}'/'{r.TimeUnit}'")).Label(Measures.Get(measure).Kind);

    /// <summary>comparison.csv file name.</summary>
    public const string ComparisonCsv = "comparison.csv";
    /// <summary>differences.csv file name.</summary>
    public const string DifferencesCsv = "differences.csv";
    /// <summary>plan.csv file name.</summary>
    public const string PlanCsv = "plan.csv";

    /// <summary>Writes a CSV file through CsvHelper (RFC 4180 quoting: a field with a comma, quote or line break is quoted).</summary>
    internal static void WriteCsv(string path, string[] header, IEnumerable<string[]> rows)
    {
        using var w = new StreamWriter(path, false, new UTF8Encoding(false));
        using var csv = new CsvWriter(w, new CsvConfiguration(Ci) { NewLine = "\n" });
        foreach (var h in header) csv.WriteField(h);
        csv.NextRecord();
        foreach (var row in rows)
        {
            foreach (var f in row) csv.WriteField(f);
            csv.NextRecord();
        }
    }

    static string I(int v) => v.ToString(Ci);

    /// <summary>Writes comparison.csv, differences.csv, the superplots, comparison.md and report.html into <paramref name="dir"/>.</summary>
    public static void Write(ComparisonResult r, string dir)
    {
        WriteCsv(Path.Combine(dir, ComparisonCsv), ["condition", "measure", "unit", "movies", "units", "value", "ci95_low", "ci95_high", "n", "status", "reason"],
            r.Conditions.Select(m => new[] { m.Condition, m.Measure, UnitOf(m.Measure, r), I(m.Movies), I(m.Units),
                m.Value.IsOk ? Csv(m.Value.Value) : "", m.Value.IsOk ? Csv(m.Value.Low) : "", m.Value.IsOk ? Csv(m.Value.High) : "",
                I(m.Value.N), Summary.StatusName(m.Value.Status), m.Value.IsOk ? "" : m.Value.Reason ?? "" }));
        WriteCsv(Path.Combine(dir, DifferencesCsv), ["measure", "condition_a", "condition_b", "difference", "ci95_low", "ci95_high", "ratio", "ratio_ci95_low", "ratio_ci95_high", "p_value", "movies_a", "movies_b", "status", "movie_effect", "movie_effect_ci95_low", "movie_effect_ci95_high", "scale", "p_holm", "primary"],
            r.Differences.Select(x => new[] { x.Measure, x.A, x.B, Csv(x.Difference.Value), Csv(x.Difference.Low), Csv(x.Difference.High), Csv(x.Ratio.Value), Csv(x.Ratio.Low), Csv(x.Ratio.High), Csv(x.PValue), I(x.MoviesA), I(x.MoviesB),
                Summary.StatusName(x.Status), x.Effect.IsOk ? Csv(x.Effect.Value) : "", x.Effect.IsOk ? Csv(x.Effect.Low) : "", x.Effect.IsOk ? Csv(x.Effect.High) : "",
                x.LogScale ? "ratio" : "difference", Csv(x.HolmPValue), x.IsPrimary ? "true" : "false" }));
        // Each plot is disposed once its PNG bytes are taken (Plot is IDisposable in ScottPlot 5; the bytes are a copy).
        using var superAnisotropy = SuperPlot(r, Measures.Anisotropy.Name);
        using var superContour = SuperPlot(r, Measures.AnisotropyContour.Name);
        var figures = new List<Figure>
        {
            new("superplot-anisotropy.png", "Every track (small points, coloured by replicate), every replicate's value (large markers) and each condition's value with its 95% hierarchical-bootstrap interval (black bar), for var_L / var_W on a log scale.",
                Figures.Png(superAnisotropy, 720, 520)),
            new("superplot-anisotropy_contour.png", "The same for the floor-corrected contour ratio var_along / var_across.", Figures.Png(superContour, 720, 520)),
        };
        var panels = ConditionComparison.MovieLevelMeasures.Select(m => MoviePlot(r, m)).ToList();
        try
        {
            figures.Add(new("superplot-motion.png", "Collective motion and nematic order: each replicate's value (large markers, coloured by replicate) and each condition's value with its 95% bootstrap interval over movies (black bar); measures without an ok value in a movie show no marker for it.",
                Figures.Grid(panels, 3, 420, 320)));
        }
        finally { foreach (var p in panels) p.Dispose(); }
        Figures.Save(figures, dir);
        string narrative = Narrative(r);
        File.WriteAllText(Path.Combine(dir, "comparison.md"), narrative);
        File.WriteAllText(Path.Combine(dir, AnalysisFolder.Report), HtmlReport.FromMarkdown("ShapeNoise comparison", narrative, figures));
    }

    /// <summary>Every track a small point coloured by replicate, each replicate's value a large marker, the condition value and 95% interval a bar.</summary>
    public static Plot SuperPlot(ComparisonResult r, string measure)
    {
        var plt = new Plot();
        var conditions = r.Conditions.Select(x => x.Condition).Distinct().ToList();
        var rng = new Random(1);
        var palette = new ScottPlot.Palettes.Category10();
        for (int ci = 0; ci < conditions.Count; ci++)
        {
            var movies = r.Movies.Where(m => m.Condition == conditions[ci]).ToList();
            for (int mi = 0; mi < movies.Count; mi++)
            {
                var color = palette.GetColor(mi);
                var ys = movies[mi].Tracks.Select(t => measure == Measures.Anisotropy.Name ? t.VarL / t.VarW : t.VarAlong / t.VarAcross).Where(v => v > 0 && double.IsFinite(v)).Select(Math.Log10).ToArray();
                var xs = ys.Select(_ => ci + (rng.NextDouble() - 0.5) * 0.5).ToArray();
                var pts = plt.Add.ScatterPoints(xs, ys); pts.Color = color.WithAlpha(0.35); pts.MarkerSize = 3;
                double movieValue = ConditionComparison.Statistic(measure, [movies[mi]], [1], null);
                if (movieValue > 0)
                {
                    var big = plt.Add.Marker(ci + (mi - (movies.Count - 1) / 2.0) * 0.08, Math.Log10(movieValue)); big.Color = color; big.Size = 14;
                    if (ci == 0) big.LegendText = $"replicate {mi + 1}";
                }
            }
            var cm = r.Conditions.First(x => x.Condition == conditions[ci] && x.Measure == measure).Value;
            if (cm.Value > 0 && cm.Low > 0)
            {
                var bar = plt.Add.Line(ci + 0.35, Math.Log10(cm.Low), ci + 0.35, Math.Log10(cm.High)); bar.Color = Colors.Black; bar.LineWidth = 3;
                var mid = plt.Add.Marker(ci + 0.35, Math.Log10(cm.Value)); mid.Color = Colors.Black; mid.Size = 10; mid.Shape = MarkerShape.FilledSquare;
                if (ci == 0) mid.LegendText = "condition value, 95% CI (hierarchical bootstrap)";
            }
        }
        plt.Axes.Bottom.TickGenerator = new ScottPlot.TickGenerators.NumericManual(Enumerable.Range(0, conditions.Count).Select(i => (double)i).ToArray(), conditions.ToArray());
        plt.Axes.Left.TickGenerator = new ScottPlot.TickGenerators.NumericAutomatic { LabelFormatter = y => Math.Pow(10, y).ToString("G3", Ci) };
        plt.Title($"{Measures.Get(measure).Statistic} per track (small), per replicate (large)");
        plt.YLabel($"{measure} (log scale)");
        plt.ShowLegend(Alignment.UpperRight);
        return plt;
    }

    /// <summary>A movie-level measure (docs/motion.md#comparing-conditions): one marker per replicate, the condition's value
    /// and 95% interval as a bar.</summary>
    public static Plot MoviePlot(ComparisonResult r, string measure)
    {
        var plt = new Plot();
        var conditions = r.Conditions.Select(x => x.Condition).Distinct().ToList();
        var palette = new ScottPlot.Palettes.Category10();
        for (int ci = 0; ci < conditions.Count; ci++)
        {
            var movies = r.Movies.Where(m => m.Condition == conditions[ci]).ToList();
            for (int mi = 0; mi < movies.Count; mi++)
            {
                double v = ConditionComparison.Statistic(measure, [movies[mi]], [1], null);
                if (!double.IsFinite(v)) continue;
                var big = plt.Add.Marker(ci + (mi - (movies.Count - 1) / 2.0) * 0.08, v); big.Color = palette.GetColor(mi); big.Size = 11;
            }
            var cm = r.Conditions.First(x => x.Condition == conditions[ci] && x.Measure == measure).Value;
            if (cm.IsOk)
            {
                var bar = plt.Add.Line(ci + 0.3, cm.Low, ci + 0.3, cm.High); bar.Color = Colors.Black; bar.LineWidth = 3;
                var mid = plt.Add.Marker(ci + 0.3, cm.Value); mid.Color = Colors.Black; mid.Size = 9; mid.Shape = MarkerShape.FilledSquare;
            }
        }
        plt.Axes.Bottom.TickGenerator = new ScottPlot.TickGenerators.NumericManual(Enumerable.Range(0, conditions.Count).Select(i => (double)i).ToArray(), conditions.ToArray());
        string unit = Measures.Get(measure).Kind == UnitKind.Ratio ? "" : $" ({UnitOf(measure, r)})";
        plt.Title(measure);
        plt.YLabel($"{measure}{unit}");
        return plt;
    }

    /// <summary>Plain-language summary that states each result with its uncertainty and no more.</summary>
    public static string Narrative(ComparisonResult r)
    {
        var sb = new StringBuilder("# Comparison of conditions\n\n");
        var conditions = r.Conditions.Select(x => x.Condition).Distinct().ToList();
        sb.Append(Ci, $"Movies: {string.Join(", ", conditions.Select(c => $"{c} {r.Conditions.First(x => x.Condition == c).Movies}"))}. ");
        sb.Append(Ci, $"Movies, not cells, are the replicates: each movie gives one value per measure (ln of its pooled variance ratio, ln tau_q, or its time-weighted mean defect speed) and conditions are compared by Student's two-sample t test on those values, with at least {ConditionComparison.MinMovies} movies per condition. The primary measure is **{ConditionComparison.Primary}** (p unadjusted); the other measures carry Holm-adjusted p-values (Holm 1979).\n\n");
        foreach (var x in r.Differences)
        {
            var a = r.Conditions.First(c => c.Condition == x.A && c.Measure == x.Measure); var b = r.Conditions.First(c => c.Condition == x.B && c.Measure == x.Measure);
            string unit = Measures.Get(x.Measure).Kind == UnitKind.Ratio ? "" : $" {UnitOf(x.Measure, r)}";
            if (x.Status == EstimateStatus.NotApplicable) { sb.Append(Ci, $"- **{x.Measure}**: not applicable: {x.Effect.Reason}; not compared.\n"); continue; }
            sb.Append(Ci, $"- **{x.Measure}**{(x.IsPrimary ? " (primary)" : "")}: {x.A} {Described(a.Value, unit)} vs {x.B} {Described(b.Value, unit)}. ");
            sb.Append(Sentence(x, unit)).Append('\n');
        }
        sb.Append("\n## Anisotropy and defect motion\n\n");
        foreach (var s in r.OrderStatements) sb.Append("- ").Append(s).Append('\n');
        sb.Append("\nThis is a research comparison; it depends on segmentation quality and on the movies being comparable.\n");
        return sb.ToString();
    }

    /// <summary>A condition's value as comparison.md shows it: the number when it has one (its interval is descriptive,
    /// in comparison.csv), else the status phrase ("not applicable: …").</summary>
    static string Described(Estimate e, string unit)
        => e.IsOk || (e.Status == EstimateStatus.TooFew && double.IsFinite(e.Value)) ? $"{F(e.Value)}{unit}" : $"({EstimateText.Phrase(e, unit.Trim())})";

    /// <summary>The plain-language sentence for one difference, generated from its status and movie-level interval only: a direction ("more"/"less") only when the interval excludes no effect (1 for ratios, 0 for differences).</summary>
    public static string Sentence(MeasureDifference x, string unit = "")
    {
        if (x.Status == EstimateStatus.NotApplicable) return $"{x.A} vs {x.B}: not applicable: {x.Effect.Reason}; not compared.";
        if (x.Status != EstimateStatus.Ok) return $"{x.A} vs {x.B}: {x.Effect.Reason ?? "no movie-level test"}; described only, no p-value and no interval on the difference.";
        var e = x.Effect;
        string p = x.IsPrimary || !double.IsFinite(x.HolmPValue) ? $"p = {F(x.PValue)}" : $"p = {F(x.PValue)}, Holm-adjusted p = {F(x.HolmPValue)}";
        string size = x.LogScale ? $"×{F(e.Value)}, 95% CI {F(e.Low)}–{F(e.High)}" : $"difference {F(e.Value)}{unit}, 95% CI {F(e.Low)} to {F(e.High)}{unit}";
        bool clear = e.Excludes(x.LogScale ? 1 : 0);
        if (!clear) return $"{x.A} vs {x.B}: no difference shown (which is not evidence of none) ({size}; {p}).";
        bool less = x.LogScale ? e.Value < 1 : e.Value < 0;
        string word = less ? "less" : "more";
        string claim = x.Measure.StartsWith("anisotropy", StringComparison.Ordinal)
            ? $"{x.A} is {word} anisotropic than {x.B}{(x.Measure == "anisotropy_contour" ? " by the contour ratio" : "")}"
            : $"{x.A}'s {x.Measure} is {(less ? "less" : "more")} than {x.B}'s";
        return $"{claim} ({size}; {p}).";
    }

    /// <summary>plan.json file name.</summary>
    public const string PlanJson = "plan.json";

    /// <summary>The test a plan is for, in words (plan.md and plan.json).</summary>
    public const string PlanTest = "the same Student t test on per-movie ln pooled ratio that compare runs";

    /// <summary>The test a plan of <paramref name="measure"/> is for, in words: <see cref="PlanTest"/> for the anisotropies,
    /// the movie-level value's test otherwise (docs/motion.md#comparing-conditions).</summary>
    public static string PlanTestOf(string measure) => !ConditionComparison.MovieLevelMeasures.Contains(measure) ? PlanTest
        : $"the same Student t test on per-movie {(ConditionComparison.IsLogScale(measure) ? "ln " : "")}{measure} that compare runs";

    /// <summary>What one movie contributes to the plan's test, in words.</summary>
    private static string MovieQuantityText(string measure) => !ConditionComparison.MovieLevelMeasures.Contains(measure)
        ? $"ln({Measures.Get(measure).Statistic}) pooled over the movie's tracks, frame-weighted"
        : $"{(ConditionComparison.IsLogScale(measure) ? "ln of " : "")}the movie's {measure} (summary.json), its sampling variance from the movie's own 95% interval";

    /// <summary>Writes plan.csv (power of every design with its 95% interval), plan.json (components, ICC, smallest design, assumptions),
    /// plan.png, plan.md and report.html into <paramref name="dir"/>.</summary>
    public static void WritePlan(PlanResult plan, string dir)
    {
        WriteCsv(Path.Combine(dir, PlanCsv), ["movies_per_condition", "cells_per_movie", "power", "power_ci95_low", "power_ci95_high", "status"],
            plan.Designs.Select(d => new[] { I(d.MoviesPerCondition), I(d.CellsPerMovie), d.Power.ToString("R", Ci),
                d.Interval.IsOk ? Csv(d.Interval.Low) : "", d.Interval.IsOk ? Csv(d.Interval.High) : "", Summary.StatusName(d.Interval.Status) }));
        File.WriteAllText(Path.Combine(dir, PlanJson), PlanToJson(plan).ToJsonString(Summary.Indented));
        using var planPlot = PlanPlot(plan);
        var figure = new Figure("plan.png", "Power of the two-sided Student t test on per-movie ln pooled ratio (the test compare runs) against movies per condition, one curve per number of cells per movie; the dashed line is power 0.8.",
            Figures.Png(planPlot, 720, 480));
        Figures.Save([figure], dir);
        string narrative = PlanNarrative(plan);
        File.WriteAllText(Path.Combine(dir, "plan.md"), narrative);
        File.WriteAllText(Path.Combine(dir, AnalysisFolder.Report), HtmlReport.FromMarkdown("ShapeNoise experiment plan", narrative, [figure]));
    }

    /// <summary>plan.json: the test, the effect, the movie-level variance components, the ICC and the smallest design's power as
    /// estimate objects (<see cref="Summary.Interval"/>, units movies), the assumptions (tracks per movie, frames per track) and the pilots.</summary>
    public static System.Text.Json.Nodes.JsonObject PlanToJson(PlanResult p)
    {
        static System.Text.Json.Nodes.JsonNode? N(double v) => double.IsFinite(v) ? System.Text.Json.Nodes.JsonValue.Create(v) : null;
        var vc = p.Components;
        return new System.Text.Json.Nodes.JsonObject
        {
            ["test"] = PlanTestOf(p.Measure),
            ["measure"] = p.Measure,
            ["movie_quantity"] = MovieQuantityText(p.Measure),
            ["relative_effect"] = p.RelativeEffect,
            ["log_effect"] = p.LogEffect,
            ["alpha"] = p.Alpha,
            ["target_power"] = p.Target,
            ["pilot_movies"] = p.PilotMovies,
            ["pilot_tracks"] = p.PilotTracks,
            ["sigma_b2"] = N(vc.Between),
            ["sigma_w2_per_track"] = N(vc.Within),
            ["icc"] = Summary.Interval(p.Icc),
            ["smallest_design"] = p.Smallest is { } b
                ? new System.Text.Json.Nodes.JsonObject { ["movies_per_condition"] = b.MoviesPerCondition, ["cells_per_movie"] = b.CellsPerMovie, ["power"] = Summary.Interval(p.SmallestPower) }
                : null,
            ["assumptions"] = new System.Text.Json.Nodes.JsonObject
            {
                ["tracks_per_movie"] = N(p.MedianTracksPerMovie),
                ["tracks_per_movie_source"] = "median of the pilot movies",
                ["frames_per_track"] = N(p.MedianFramesPerTrack),
                ["frames_per_track_source"] = "median over the pilot tracks; sigma_w2_per_track is for tracks of about this length",
            },
            ["bootstrap"] = new System.Text.Json.Nodes.JsonObject { ["track_resamples"] = ExperimentPlan.TrackResamples, ["movie_resamples"] = p.Resamples, ["seed"] = p.Seed },
            ["pilots"] = new System.Text.Json.Nodes.JsonArray(p.Pilots.Select(m => (System.Text.Json.Nodes.JsonNode?)new System.Text.Json.Nodes.JsonObject
            {
                ["condition"] = m.Condition, ["replicate"] = m.Replicate, ["y"] = N(m.Y), ["v"] = N(m.V), ["tracks"] = m.Tracks, ["median_frames"] = N(m.MedianFrames),
            }).ToArray()),
        };
    }

    /// <summary>Power of the two-sided Student t test on per-movie ln pooled ratio (alpha 0.05) against movies per condition, one line per cells-per-movie design, with power 0.8 dashed.</summary>
    public static Plot PlanPlot(PlanResult p)
    {
        var plt = new Plot();
        var palette = new ScottPlot.Palettes.Category10();
        int i = 0;
        foreach (var g in p.Designs.GroupBy(d => d.CellsPerMovie))
        {
            var s = plt.Add.ScatterLine(g.Select(d => (double)d.MoviesPerCondition).ToArray(), g.Select(d => d.Power).ToArray());
            s.LegendText = ConditionComparison.MovieLevelMeasures.Contains(p.Measure) ? "movies of the pilots' size" : $"{g.Key} cells per movie"; s.Color = palette.GetColor(i++); s.LineWidth = 2;
        }
        var t = plt.Add.HorizontalLine(0.8); t.LinePattern = LinePattern.Dashed; t.LegendText = "power 0.8";
        plt.Axes.SetLimitsY(0, 1.02);
        plt.Title($"Power to detect a {p.RelativeEffect * 100:G3}% change in {p.Measure} (alpha 0.05, two-sided)");
        plt.XLabel("movies per condition");
        plt.YLabel("power");
        plt.ShowLegend(Alignment.LowerRight);
        return plt;
    }

    /// <summary>plan.md for a movie-level measure: one value per movie of the pilots' size, so the design is movies per
    /// condition only; var(y) = sigma_b^2 + the mean within-movie variance of the pilots.</summary>
    private static string MovieLevelNarrative(PlanResult p, StringBuilder sb, Func<Estimate, string> est)
    {
        var vc = p.Components;
        string scale = ConditionComparison.IsLogScale(p.Measure) ? "ln-scale" : "absolute";
        sb.Append(Ci, $"This plan is for {PlanTestOf(p.Measure)}: one value per movie ({MovieQuantityText(p.Measure)}), compared between two conditions by the two-sided pooled-variance Student t test at alpha {F(p.Alpha)} (movies are the replicates).\n\n");
        sb.Append(Ci, $"Pilot: {p.PilotMovies} movies with an ok value. Between-movie variance σ_b² = {F(vc.Between)}, mean within-movie variance {F(vc.Within)} (method of moments, Searle, Casella and McCulloch 1992); intraclass correlation {est(p.Icc)}.\n\n");
        sb.Append(Ci, $"Assumptions: new movies like the pilots (same size, length and frame interval): their within-movie variance is the pilots'. Longer or larger movies would lower it; only more movies lower σ_b².\n\n");
        sb.Append(Ci, $"Target: a {p.RelativeEffect * 100:G3}% change in {p.Measure} ({scale} effect {F(p.LogEffect)}), power {F(p.Target)}.\n\n");
        sb.Append(p.Smallest is { } b
            ? string.Format(Ci, "Smallest design reaching power {2}: **{0} movies per condition** (power {1}).\n", b.MoviesPerCondition, est(p.SmallestPower), F(p.Target))
            : $"No design with up to {ExperimentPlan.MaxMovies} movies per condition reaches power {F(p.Target)} for this effect.\n");
        sb.Append(Ci, $"\nThe intervals come from resampling the pilot movies within conditions ({p.Resamples} resamples, seed {p.Seed}); with few pilot movies they are wide, and the plan is a guide.\n");
        return sb.ToString();
    }

    /// <summary>plan.md's Markdown: which test the plan is for, the pilot's movie-level variance components and ICC with its
    /// interval, the assumptions (tracks per movie, frames per track), the target effect and the smallest design reaching the
    /// target power with its interval.</summary>
    public static string PlanNarrative(PlanResult p)
    {
        var vc = p.Components;
        string Est(Estimate e) => e.IsOk ? $"{F(e.Value)} (95% CI {F(e.Low)}–{F(e.High)}, n = {e.N} {e.UnitName})" : $"{F(e.Value)} (no interval: {e.Reason ?? "too few"})";
        var sb = new StringBuilder("# Experiment plan\n\n");
        if (ConditionComparison.MovieLevelMeasures.Contains(p.Measure)) return MovieLevelNarrative(p, sb, Est);
        sb.Append(Ci, $"This plan is for {PlanTest}: one value per movie, y = ln of the movie's frame-weighted pooled {Measures.Get(p.Measure).Statistic}, compared between two conditions by the two-sided pooled-variance Student t test at alpha {F(p.Alpha)} (movies are the replicates).\n\n");
        sb.Append(Ci, $"Pilot: {p.PilotMovies} movies, {p.PilotTracks} tracks. Each movie's sampling variance comes from a bootstrap over its tracks ({ExperimentPlan.TrackResamples} resamples). ");
        sb.Append(Ci, $"Between-movie variance σ_b² = {F(vc.Between)}, within-movie variance per track σ_w² = {F(vc.Within)} (method of moments, Searle, Casella and McCulloch 1992), so a movie of m tracks has var(y) = σ_b² + σ_w²/m. ");
        sb.Append(Ci, $"Intraclass correlation {Est(p.Icc)}: averaging m cells in a movie is worth m / (1 + (m − 1) ICC) independent cells (Kish 1965); with {p.MedianTracksPerMovie:G3} cells per movie the design effect is {F(vc.DesignEffect(p.MedianTracksPerMovie))}.\n\n");
        sb.Append(Ci, $"Assumptions: tracks per movie {p.MedianTracksPerMovie:G3} (median of the pilots; the grid evaluates 25–400), track length {p.MedianFramesPerTrack:G3} frames (median of the pilot tracks). σ_w² holds for tracks of about that length; longer tracks would lower it.\n\n");
        sb.Append(Ci, $"Target: a {p.RelativeEffect * 100:G3}% change in {p.Measure} (ln-scale effect {F(p.LogEffect)}), power {F(p.Target)}.\n\n");
        sb.Append(p.Smallest is { } b
            ? string.Format(Ci, "Smallest design reaching power {3}: **{0} movies per condition** with {1} cells per movie (power {2}). More cells per movie help only while the within-movie part dominates; the between-movie variance sets a floor that only more movies lower.\n",
                b.MoviesPerCondition, b.CellsPerMovie, Est(p.SmallestPower), F(p.Target))
            : $"No design with up to {ExperimentPlan.MaxMovies} movies per condition reaches power {F(p.Target)} for this effect: consider a larger effect, a less variable measure, or more movies.\n");
        sb.Append(Ci, $"\nThe intervals come from resampling the pilot movies within conditions ({p.Resamples} resamples, seed {p.Seed}) and re-estimating the components; with few pilot movies they are wide, and the plan is a guide.\n");
        return sb.ToString();
    }
}
