using System.Globalization;
using System.Text;
using System.Text.Json.Nodes;
using ScottPlot;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;
using ShapeNoise.Statistics;

namespace ShapeNoise.Comparison;

/// <summary>The <c>compare</c> and <c>plan</c> jobs: read or produce per-movie analyses, compute, write the folder atomically.</summary>
public static class ComparisonJobs
{
    static readonly CultureInfo Ci = CultureInfo.InvariantCulture;

    /// <summary>Loads the movies listed in conditions.csv; a path that is not an analysis folder is analysed first
    /// (into <paramref name="analysisDir"/>) with <paramref name="options"/>.</summary>
    public static List<MovieData> LoadConditions(string conditionsCsv, string analysisDir, AnalysisOptions options, Func<string, ILabelMovie> open,
        IFrameFigures? figures, List<string> inputs)
    {
        var rows = ConditionTable.Read(conditionsCsv);
        inputs.Add(conditionsCsv);
        foreach (var r in rows)
            if (!File.Exists(Path.Combine(r.Path, "summary.json")) && !File.Exists(r.Path) && !Directory.Exists(r.Path))
                throw new InputException(r.Path, $"listed in {Path.GetFileName(conditionsCsv)} does not exist");
        RefuseRepeatedData(conditionsCsv, rows);
        var movies = new List<MovieData>();
        foreach (var r in rows)
        {
            string folder = r.Path;
            if (!File.Exists(Path.Combine(folder, "summary.json")))
            {
                folder = Path.Combine(analysisDir, Safe($"{r.Condition}-{r.Replicate}"));
                try { AnalyzeJob.Run(r.Path, folder, options, open, null, null, figures); }
                catch (InputException e) when (e.Problem.Contains("give --", StringComparison.Ordinal))
                {
                    // compare opens movies without plane options: say how to pick the plane instead.
                    throw new InputException(e.PathName, $"{e.Problem} — compare cannot pick a plane itself: run analyze on this movie with that option and list its analysis folder in {Path.GetFileName(conditionsCsv)}");
                }
            }
            inputs.Add(Path.Combine(folder, "summary.json")); inputs.Add(Path.Combine(folder, "tracks.csv")); inputs.Add(Path.Combine(folder, "defects.csv"));
            movies.Add(MovieData.Load(r.Condition, r.Replicate, folder));
        }
        return movies;
    }

    /// <summary>conditions.csv and every path it lists (when it can be read): the inputs an output folder must not hold.</summary>
    public static IReadOnlyList<string> ListedInputs(string conditionsCsv)
    {
        var all = new List<string> { conditionsCsv };
        if (File.Exists(conditionsCsv)) foreach (var r in ConditionTable.Read(conditionsCsv)) all.Add(r.Path);
        return all;
    }

    /// <summary>
    /// Refuses a conditions table that lists the same data twice (pseudo-replication: one movie counted as two
    /// replicates): the same path (after <see cref="Path.GetFullPath(string)"/> and resolving symbolic links in every
    /// component), or two rows whose data share a SHA-256 (an analysis folder's run.json inputs, the noise floor
    /// excepted; a movie file; the files of a folder of frames). One <see cref="InputException"/> naming both rows.
    /// </summary>
    public static void RefuseRepeatedData(string conditionsCsv, IReadOnlyList<ConditionRow> rows)
    {
        var byPath = new Dictionary<string, ConditionRow>(StringComparer.Ordinal);
        var byHash = new Dictionary<string, (ConditionRow Row, string Name)>(StringComparer.Ordinal);
        foreach (var r in rows)
        {
            string real = RealPath(r.Path);
            if (byPath.TryGetValue(real, out var first))
                throw new InputException(conditionsCsv, $"{first.Describe()} and {r.Describe()} are the same {(File.Exists(Path.Combine(real, "summary.json")) ? "analysis folder" : "movie")} ({real}); list each movie once");
            byPath[real] = r;
            foreach (var (name, sha) in DataHashes(real).DistinctBy(x => x.Sha))   // a movie may repeat a frame within itself
            {
                if (byHash.TryGetValue(sha, out var seen))
                    throw new InputException(conditionsCsv, $"{seen.Row.Describe()} and {r.Describe()} hold the same data ({seen.Name} and {name} have the same SHA-256 {sha[..12]}…); list each movie once");
                byHash[sha] = (r, name);
            }
        }
    }

    /// <summary>SHA-256 of the data behind a row: an analysis folder's run.json inputs (floor.json excepted), or the movie file(s).</summary>
    private static IEnumerable<(string Name, string Sha)> DataHashes(string path)
    {
        string run = Path.Combine(path, "run.json");
        if (File.Exists(Path.Combine(path, "summary.json")))
        {
            if (!File.Exists(run)) yield break;   // an analysis folder without provenance: only its path can be compared
            JsonNode? doc;
            try { doc = JsonNode.Parse(File.ReadAllText(run)); }
            catch (System.Text.Json.JsonException e) { throw new InputException(run, $"is not valid JSON ({e.Message})"); }
            if (doc?["inputs"] is not JsonArray arr) yield break;
            foreach (var i in arr)
            {
                string? name = i?["name"]?.GetValue<string>(), sha = i?["sha256"]?.GetValue<string>();
                if (name is null || sha is null || name == "floor.json") continue;
                yield return ($"{Path.GetFileName(path)}/run.json input {name}", sha);
            }
        }
        else if (File.Exists(path)) yield return (Path.GetFileName(path), Provenance.Sha256(path));
        else if (Directory.Exists(path))
        {
            var files = Directory.GetFiles(path); Array.Sort(files, StringComparer.Ordinal);
            foreach (var f in files) yield return ($"{Path.GetFileName(path)}/{Path.GetFileName(f)}", Provenance.Sha256(f));
        }
    }

    /// <summary>The absolute path with every symbolic link along it resolved (as realpath(3) does).</summary>
    public static string RealPath(string path)
    {
        string full = Path.GetFullPath(path);
        string root = Path.GetPathRoot(full)!;
        string current = root;
        var parts = full[root.Length..].Split(Path.DirectorySeparatorChar, StringSplitOptions.RemoveEmptyEntries);
        for (int i = 0; i < parts.Length; i++)
        {
            current = Path.Combine(current, parts[i]);
            FileSystemInfo info = Directory.Exists(current) ? new DirectoryInfo(current) : new FileInfo(current);
            if (info.LinkTarget is not null && info.ResolveLinkTarget(returnFinalTarget: true) is { } target)
                current = RealPath(target.FullName);   // a link's target may itself pass through links
        }
        return Path.TrimEndingDirectorySeparator(current);
    }

    private static string Safe(string s) => string.Concat(s.Select(c => char.IsLetterOrDigit(c) || c is '-' or '_' or '.' ? c : '_'));

    public static ComparisonResult Compare(string conditionsCsv, OutputTarget outDir, AnalysisOptions options, Func<string, ILabelMovie> open,
        IFrameFigures? figures = null, IEnumerable<string>? commandLine = null)
    {
        OutputFolder.Check(outDir);
        ComparisonResult? result = null;
        OutputFolder.Write(outDir, dir =>
        {
            var inputs = new List<string>();
            var movies = LoadConditions(conditionsCsv, Path.Combine(dir, "movies"), options, open, figures, inputs);
            result = ConditionComparison.Run(movies, options.BootstrapResamples, options.Seed);
            WriteComparison(result, dir);
            var prov = Provenance.Describe("compare", inputs, new JsonObject { ["bootstrap"] = options.BootstrapResamples, ["seed"] = options.Seed }, commandLine);
            File.WriteAllText(Path.Combine(dir, "run.json"), prov.ToJsonString(Summary.Indented));
        });
        return result!;
    }

    static string F(double v) => double.IsFinite(v) ? v.ToString("G4", Ci) : "n/a";
    static string Csv(double v) => double.IsFinite(v) ? v.ToString("R", Ci) : "";

    private static string UnitOf(string measure, ComparisonResult r) => measure switch
    {
        "tau_q" => r.TimeUnit,
        "defect_headward_speed" or "flow_headward_speed" => $"{r.LengthUnit}/{r.TimeUnit}",
        _ => "ratio",
    };

    public static void WriteComparison(ComparisonResult r, string dir)
    {
        var c = new StringBuilder("condition,measure,unit,movies,units,value,ci95_low,ci95_high\n");
        foreach (var m in r.Conditions)
            c.Append(Ci, $"{m.Condition},{m.Measure},{UnitOf(m.Measure, r)},{m.Movies},{m.Units},{Csv(m.Value.Value)},{Csv(m.Value.Low)},{Csv(m.Value.High)}\n");
        File.WriteAllText(Path.Combine(dir, "comparison.csv"), c.ToString());
        var d = new StringBuilder("measure,condition_a,condition_b,difference,ci95_low,ci95_high,ratio,ratio_ci95_low,ratio_ci95_high,p_value,movies_a,movies_b\n");
        foreach (var x in r.Differences)
            d.Append(Ci, $"{x.Measure},{x.A},{x.B},{Csv(x.Difference.Value)},{Csv(x.Difference.Low)},{Csv(x.Difference.High)},{Csv(x.Ratio.Value)},{Csv(x.Ratio.Low)},{Csv(x.Ratio.High)},{Csv(x.PValue)},{x.MoviesA},{x.MoviesB}\n");
        File.WriteAllText(Path.Combine(dir, "differences.csv"), d.ToString());
        foreach (var measure in new[] { "anisotropy", "anisotropy_contour" }) SuperPlot(r, measure).SavePng(Path.Combine(dir, $"superplot-{measure}.png"), 720, 520);
        string narrative = Narrative(r);
        File.WriteAllText(Path.Combine(dir, "comparison.md"), narrative);
        File.WriteAllText(Path.Combine(dir, "report.html"), HtmlReport.FromMarkdown("ShapeNoise comparison", narrative,
        [
            (Path.Combine(dir, "superplot-anisotropy.png"), "Every track (small points, coloured by replicate), every replicate's value (large markers) and each condition's value with its 95% hierarchical-bootstrap interval (black bar), for var_L / var_W on a log scale."),
            (Path.Combine(dir, "superplot-anisotropy_contour.png"), "The same for the floor-corrected contour ratio var_along / var_across."),
        ]));
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
                var ys = movies[mi].Tracks.Select(t => measure == "anisotropy" ? t.VarL / t.VarW : t.VarAlong / t.VarAcross).Where(v => v > 0 && double.IsFinite(v)).Select(Math.Log10).ToArray();
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
        plt.Title(measure == "anisotropy" ? "var_L / var_W per track (small), per replicate (large)" : "var_along / var_across per track (small), per replicate (large)");
        plt.YLabel($"{measure} (log scale)");
        plt.ShowLegend(Alignment.UpperRight);
        return plt;
    }

    /// <summary>Plain-language summary that states each result with its uncertainty and no more.</summary>
    public static string Narrative(ComparisonResult r)
    {
        var sb = new StringBuilder("# Comparison of conditions\n\n");
        var conditions = r.Conditions.Select(x => x.Condition).Distinct().ToList();
        sb.Append(Ci, $"Movies: {string.Join(", ", conditions.Select(c => $"{c} {r.Conditions.First(x => x.Condition == c).Movies}"))}. ");
        sb.Append("Every interval is a 95% hierarchical-bootstrap interval (movies, then tracks within movies), so movies, not cells, are the replicates; p-values are from Welch's t test on the movie-level values.\n\n");
        int fewest = r.Conditions.Min(c => c.Movies);
        if (fewest < 5)
            sb.Append(Ci, $"With {fewest} movies in a condition, bootstrap intervals are too narrow (a resample can only recombine those few movies); where an interval excludes 0 but the movie-level test does not reach p < 0.05, the difference is not confirmed.\n\n");
        foreach (var x in r.Differences)
        {
            var a = r.Conditions.First(c => c.Condition == x.A && c.Measure == x.Measure); var b = r.Conditions.First(c => c.Condition == x.B && c.Measure == x.Measure);
            string unit = UnitOf(x.Measure, r) == "ratio" ? "" : $" {UnitOf(x.Measure, r)}";
            sb.Append(Ci, $"- **{x.Measure}**: {x.A} {F(a.Value.Value)}{unit} (95% CI {F(a.Value.Low)} to {F(a.Value.High)}) vs {x.B} {F(b.Value.Value)}{unit} ({F(b.Value.Low)} to {F(b.Value.High)}). ");
            if (!double.IsFinite(x.Difference.Value)) { sb.Append("Not defined in at least one condition.\n"); continue; }
            sb.Append(Ci, $"Difference {x.A} − {x.B} = {F(x.Difference.Value)}{unit} (95% CI {F(x.Difference.Low)} to {F(x.Difference.High)})");
            if (double.IsFinite(x.PValue)) sb.Append(Ci, $", Welch p = {F(x.PValue)}");
            bool excl = x.Difference.Low > 0 || x.Difference.High < 0;
            bool testAgrees = !double.IsFinite(x.PValue) || x.PValue < 0.05;
            sb.Append(!excl ? ". The interval includes 0: these data do not show a difference (which is not evidence that there is none).\n"
                : testAgrees ? ". The interval excludes 0: the data show a difference in this measure.\n"
                : ". The bootstrap interval excludes 0 but the movie-level test does not reach p < 0.05: the difference is not confirmed with this many movies.\n");
        }
        sb.Append("\n## Anisotropy and defect motion\n\n");
        foreach (var s in r.OrderStatements) sb.Append("- ").Append(s).Append('\n');
        sb.Append("\nThis is a research comparison; it depends on segmentation quality and on the movies being comparable.\n");
        return sb.ToString();
    }

    /// <summary>The <c>plan</c> job: pilot analysis folders in, plan.csv, plan.png and plan.md out.</summary>
    public static PlanResult Plan(IReadOnlyList<string> pilotFolders, double effect, string measure, OutputTarget outDir, IEnumerable<string>? commandLine = null)
    {
        if (measure is not ("anisotropy" or "anisotropy_contour")) throw new ArgumentException($"--measure must be anisotropy or anisotropy_contour (got '{measure}')");
        OutputFolder.Check(outDir);
        var inputs = new List<string>();
        var pilots = new List<MovieData>();
        foreach (var p in pilotFolders)
        {
            // A pilot folder is one analysis folder, or a folder of analysis folders (one condition's movies).
            var folders = File.Exists(Path.Combine(p, "summary.json")) ? [p]
                : Directory.Exists(p) ? Directory.GetDirectories(p).Where(d => File.Exists(Path.Combine(d, "summary.json"))).OrderBy(d => d, StringComparer.Ordinal).ToList()
                : throw new InputException(p, "no such folder");
            if (folders.Count == 0) throw new InputException(p, "holds no shapenoise analysis folder (no summary.json)");
            foreach (var f in folders)
            {
                pilots.Add(MovieData.Load(Path.GetFileName(p.TrimEnd('/')), Path.GetFileName(f), f));
                inputs.Add(Path.Combine(f, "tracks.csv"));
            }
        }
        var plan = ExperimentPlan.Run(pilots, effect, measure);
        OutputFolder.Write(outDir, dir =>
        {
            var sb = new StringBuilder("movies_per_condition,cells_per_movie,power\n");
            foreach (var d in plan.Designs) sb.Append(Ci, $"{d.MoviesPerCondition},{d.CellsPerMovie},{d.Power.ToString("R", Ci)}\n");
            File.WriteAllText(Path.Combine(dir, "plan.csv"), sb.ToString());
            PlanPlot(plan).SavePng(Path.Combine(dir, "plan.png"), 720, 480);
            string narrative = PlanNarrative(plan);
            File.WriteAllText(Path.Combine(dir, "plan.md"), narrative);
            File.WriteAllText(Path.Combine(dir, "report.html"), HtmlReport.FromMarkdown("ShapeNoise experiment plan", narrative,
                [(Path.Combine(dir, "plan.png"), "Power of the two-sided t test on movie means against movies per condition, one curve per number of cells per movie; the dashed line is power 0.8.")]));
            var prov = Provenance.Describe("plan", inputs, new JsonObject { ["effect"] = effect, ["measure"] = measure }, commandLine);
            File.WriteAllText(Path.Combine(dir, "run.json"), prov.ToJsonString(Summary.Indented));
        });
        return plan;
    }

    public static Plot PlanPlot(PlanResult p)
    {
        var plt = new Plot();
        var palette = new ScottPlot.Palettes.Category10();
        int i = 0;
        foreach (var g in p.Designs.GroupBy(d => d.CellsPerMovie))
        {
            var s = plt.Add.ScatterLine(g.Select(d => (double)d.MoviesPerCondition).ToArray(), g.Select(d => d.Power).ToArray());
            s.LegendText = $"{g.Key} cells per movie"; s.Color = palette.GetColor(i++); s.LineWidth = 2;
        }
        var t = plt.Add.HorizontalLine(0.8); t.LinePattern = LinePattern.Dashed; t.LegendText = "power 0.8";
        plt.Axes.SetLimitsY(0, 1.02);
        plt.Title($"Power to detect a {p.RelativeEffect * 100:G3}% change in {p.Measure} (alpha 0.05, two-sided)");
        plt.XLabel("movies per condition");
        plt.YLabel("power");
        plt.ShowLegend(Alignment.LowerRight);
        return plt;
    }

    public static string PlanNarrative(PlanResult p)
    {
        var vc = p.Components;
        var sb = new StringBuilder("# Experiment plan\n\n");
        sb.Append(Ci, $"Pilot: {p.PilotMovies} movies, {p.PilotTracks} tracks (median {p.MedianTracksPerMovie:G3} per movie). Measure: per-track ln({(p.Measure == "anisotropy" ? "var_L / var_W" : "var_along / var_across")}). ");
        sb.Append(Ci, $"Between-movie variance {F(vc.Between)}, within-movie variance {F(vc.Within)}, intraclass correlation {F(vc.Icc)}, so averaging m cells in a movie is worth m / (1 + (m − 1) ICC) independent cells (design effect, Kish 1965): with {p.MedianTracksPerMovie:G3} cells per movie the design effect is {F(vc.DesignEffect(p.MedianTracksPerMovie))}.\n\n");
        sb.Append(Ci, $"Target: a {p.RelativeEffect * 100:G3}% change in {p.Measure} (ln-scale effect {F(p.LogEffect)}), two-sided alpha 0.05, power 0.8, two-sample t test on movie means.\n\n");
        sb.Append(p.Smallest is { } b
            ? string.Format(Ci, "Smallest design reaching power 0.8: **{0} movies per condition** with {1} cells per movie (power {2:F2}). More cells per movie help only while the within-movie part dominates; the between-movie variance sets a floor that only more movies lower.\n", b.MoviesPerCondition, b.CellsPerMovie, b.Power)
            : "No design with up to 30 movies per condition reaches power 0.8 for this effect: consider a larger effect, a less variable measure, or more movies.\n");
        sb.Append("\nThe variance components come from a small pilot and are themselves uncertain; treat the numbers as a guide.\n");
        return sb.ToString();
    }
}
