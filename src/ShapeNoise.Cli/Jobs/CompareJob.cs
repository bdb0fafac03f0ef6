using System.Globalization;
using System.Text.Json.Nodes;
using ShapeNoise.Comparison;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;

namespace ShapeNoise.Cli.Jobs;

/// <summary>The <c>compare</c> and <c>plan</c> jobs: read (or produce) per-movie analyses, compute with
/// <see cref="ConditionComparison"/> / <see cref="ExperimentPlan"/>, write the folder with <see cref="ComparisonReport"/>.</summary>
public static class CompareJob
{

    /// <summary>Loads the movies listed in conditions.csv; a path that is not an analysis folder is analysed first
    /// (into <paramref name="analysisDir"/>) with <paramref name="options"/>.</summary>
    public static List<MovieData> LoadConditions(string conditionsCsv, string analysisDir, AnalysisOptions options, Func<string, ILabelMovie> open,
        IFrameFigures? figures, List<string> inputs)
    {
        var rows = ConditionTable.Read(conditionsCsv);
        inputs.Add(conditionsCsv);
        foreach (var r in rows)
            if (!AnalysisFolder.IsAnalysisFolder(r.Path) && !File.Exists(r.Path) && !Directory.Exists(r.Path))
                throw new InputException(r.Path, $"listed in {Path.GetFileName(conditionsCsv)} does not exist");
        RefuseRepeatedData(conditionsCsv, rows);
        var movies = new List<MovieData>();
        foreach (var r in rows)
        {
            string folder = r.Path;
            if (!AnalysisFolder.IsAnalysisFolder(folder))
            {
                folder = Path.Combine(analysisDir, Safe($"{r.Condition}-{r.Replicate}"));
                try { AnalyzeJob.Run(r.Path, folder, options, open, null, null, figures); }
                catch (InputException e) when (e.Problem.Contains("give --", StringComparison.Ordinal))
                {
                    // compare opens movies without plane options: say how to pick the plane instead.
                    throw new InputException(e.PathName, $"{e.Problem} — compare cannot pick a plane itself: run analyze on this movie with that option and list its analysis folder in {Path.GetFileName(conditionsCsv)}");
                }
            }
            inputs.AddRange(AnalysisFolder.LoadedFiles(folder));
            movies.Add(AnalysisFolder.Load(r.Condition, r.Replicate, folder));
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
            string real = FilePaths.Real(r.Path);
            if (byPath.TryGetValue(real, out var first))
                throw new InputException(conditionsCsv, $"{first.Describe()} and {r.Describe()} are the same {(AnalysisFolder.IsAnalysisFolder(real) ? "analysis folder" : "movie")} ({real}); list each movie once");
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
        string run = Path.Combine(path, AnalysisFolder.Run);
        if (AnalysisFolder.IsAnalysisFolder(path))
        {
            if (!File.Exists(run)) yield break;   // an analysis folder without provenance: only its path can be compared
            JsonNode? doc;
            try { doc = JsonNode.Parse(File.ReadAllText(run)); }
            catch (System.Text.Json.JsonException e) { throw new InputException(run, $"is not valid JSON ({e.Message})"); }
            if (doc?["inputs"] is not JsonArray arr) yield break;
            foreach (var i in arr)
            {
                string? name = i?["name"]?.GetValue<string>(), sha = i?["sha256"]?.GetValue<string>();
                if (name is null || sha is null || name == AnalysisFolder.Floor) continue;
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
            ComparisonReport.Write(result, dir);
            var prov = Provenance.Describe("compare", inputs, new JsonObject { ["bootstrap"] = options.BootstrapResamples, ["seed"] = options.Seed }, commandLine);
            File.WriteAllText(Path.Combine(dir, AnalysisFolder.Run), prov.ToJsonString(Summary.Indented));
        });
        return result!;
    }

    public static PlanResult Plan(IReadOnlyList<string> pilotFolders, double effect, string measure, OutputTarget outDir, IEnumerable<string>? commandLine = null)
    {
        if (measure != Measures.Anisotropy.Name && measure != Measures.AnisotropyContour.Name && !ConditionComparison.MovieLevelMeasures.Contains(measure))
            throw new ArgumentException($"--measure must be anisotropy, anisotropy_contour or a movie-level measure ({string.Join(", ", ConditionComparison.MovieLevelMeasures)}) (got '{measure}')");
        OutputFolder.Check(outDir);
        var inputs = new List<string>();
        var pilots = new List<MovieData>();
        foreach (var p in pilotFolders)
        {
            // A pilot folder is one analysis folder, or a folder of analysis folders (one condition's movies).
            var folders = AnalysisFolder.IsAnalysisFolder(p) ? [p]
                : Directory.Exists(p) ? Directory.GetDirectories(p).Where(AnalysisFolder.IsAnalysisFolder).OrderBy(d => d, StringComparer.Ordinal).ToList()
                : throw new InputException(p, "no such folder");
            if (folders.Count == 0) throw new InputException(p, "holds no shapenoise analysis folder (no summary.json)");
            foreach (var f in folders)
            {
                pilots.Add(AnalysisFolder.Load(Path.GetFileName(p.TrimEnd('/')), Path.GetFileName(f), f));
                inputs.Add(Path.Combine(f, AnalysisFolder.Tracks));
            }
        }
        var plan = ExperimentPlan.Run(pilots, effect, measure);
        OutputFolder.Write(outDir, dir =>
        {
            ComparisonReport.WritePlan(plan, dir);
            var prov = Provenance.Describe("plan", inputs, new JsonObject
            {
                ["effect"] = effect, ["measure"] = measure, ["test"] = ComparisonReport.PlanTestOf(measure),
                ["track_resamples"] = ExperimentPlan.TrackResamples, ["movie_resamples"] = plan.Resamples, ["seed"] = plan.Seed,
            }, commandLine);
            File.WriteAllText(Path.Combine(dir, AnalysisFolder.Run), prov.ToJsonString(Summary.Indented));
        });
        return plan;
    }
}
