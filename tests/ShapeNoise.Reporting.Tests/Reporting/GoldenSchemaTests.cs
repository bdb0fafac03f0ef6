using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

/// <summary>Runs the real command once per scenario (synth, then analyze) and keeps the analysis folders for the class.</summary>
public sealed class GoldenRuns : IDisposable
{
    private readonly TempDir _dir = new();

    /// <summary>The synth and analyze arguments of each scenario (small, seeded: the class takes a few seconds).</summary>
    public static readonly Dictionary<string, (string[] Synth, string[] Analyze)> Scenarios = new()
    {
        ["ellipses"] = (["synth", "ellipses", "--cells", "6", "--frames", "16", "--seed", "3"], ["--bootstrap", "50"]),
        ["monolayer"] = (["synth", "monolayer", "--cells", "150", "--frames", "12", "--motion", "tailward", "--seed", "3"], ["--bootstrap", "50", "--min-track", "5"]),
    };

    private readonly Dictionary<string, string> _folders = new();

    /// <summary>The analysis folder of <paramref name="scenario"/>, produced on first use.</summary>
    public string Folder(string scenario)
    {
        lock (_folders)
        {
            if (_folders.TryGetValue(scenario, out var f)) return f;
            var (synth, analyze) = Scenarios[scenario];
            string movie = _dir[$"{scenario}-movie"], run = _dir[$"{scenario}-run"];
            var s = Support.Cli.Run([.. synth, "--out", movie]);
            Assert.True(s.ExitCode == 0, $"synth {scenario}: {s.Stderr}");
            var r = Support.Cli.Run(["analyze", Path.Combine(movie, "labels.tif"), "--out", run, .. analyze]);
            Assert.True(r.ExitCode == 0, $"analyze {scenario}: {r.Stderr}");
            _folders[scenario] = run;
            return run;
        }
    }

    public void Dispose() => _dir.Dispose();
}

/// <summary>
/// Output contract (docs/measures.md#output-contract): the analyze folder's file list, the header line of every CSV,
/// and the key schema of summary.json and sim-params.json, compared against the committed golden files in
/// tests/ShapeNoise.Reporting.Tests/Golden/ (one set per synth scenario). Only names and value kinds are recorded, never values.
/// A mismatch prints a line diff (- golden, + now). When the change is intended, regenerate the golden files with
/// <c>SHAPENOISE_UPDATE_GOLDEN=1 dotnet test ShapeNoise.sln -c Release --filter "FullyQualifiedName~GoldenSchemaTests"</c>
/// (the tests then rewrite the files instead of comparing) and commit the diff with the change that caused it.
/// </summary>
/// <remarks>
/// JSON schema: one line per path ("$", "$.key", "$.array[]" for the elements), "path kind", sorted (ordinal). Kinds
/// are object, array, string, bool and number|null. Number and null are one kind on purpose: the writers emit null
/// exactly where a number is undefined (a non-finite estimate, e.g. no +1/2 defect followed long enough for a headward
/// speed, or an optional numeric option not given), so which of the two appears depends on the data and would make
/// the golden files flip between movies; the schema is the same for both scenarios (checked below). The one non-numeric
/// null, the unset --floor-from path in provenance.options, therefore reads number|null while unset. Array elements are
/// merged over all elements (a key in any element is listed; differing kinds are joined with |); an empty array lists
/// no element line.
/// </remarks>
public class GoldenSchemaTests(GoldenRuns runs) : IClassFixture<GoldenRuns>
{
    private const string UpdateVariable = "SHAPENOISE_UPDATE_GOLDEN";

    private static string GoldenFolder()
    {
        var d = new DirectoryInfo(AppContext.BaseDirectory);
        while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
        Assert.True(d is not null, "ShapeNoise.sln not found above the test assembly");
        return Path.Combine(d!.FullName, "tests", "ShapeNoise.Reporting.Tests", "Golden");
    }

    // ---- what is recorded ----

    /// <summary>Every file and folder in the analysis folder, relative, '/'-separated, sorted.</summary>
    internal static List<string> FileList(string folder)
    {
        var list = new List<string>();
        foreach (var f in Directory.EnumerateFileSystemEntries(folder, "*", SearchOption.AllDirectories))
            list.Add(Path.GetRelativePath(folder, f).Replace('\\', '/') + (Directory.Exists(f) ? "/" : ""));
        list.Sort(StringComparer.Ordinal);
        return list;
    }

    /// <summary>"name.csv: header" for every CSV in the folder, sorted by name.</summary>
    internal static List<string> CsvHeaders(string folder)
    {
        var list = new List<string>();
        foreach (var f in Directory.EnumerateFiles(folder, "*.csv", SearchOption.AllDirectories))
        {
            string header = File.ReadLines(f).FirstOrDefault() ?? "";
            list.Add($"{Path.GetRelativePath(folder, f).Replace('\\', '/')}: {header.TrimStart('\uFEFF')}");
        }
        list.Sort(StringComparer.Ordinal);
        return list;
    }

    /// <summary>"path kind" lines of a JSON document (see the class remarks), sorted.</summary>
    internal static List<string> JsonSchema(JsonNode? root)
    {
        var kinds = new SortedDictionary<string, SortedSet<string>>(StringComparer.Ordinal);
        Walk(root, "$", kinds);
        var list = new List<string>();
        foreach (var (path, k) in kinds) list.Add($"{path} {string.Join("|", k)}");
        return list;
    }

    /// <summary>Keys of an estimate object (docs/statistics.md#estimate-status) present only for some statuses.</summary>
    private static readonly string[] StatusKeys = ["unit", "bound", "bound_value", "fraction_at_bound", "reason"];

    private static void Walk(JsonNode? node, string path, SortedDictionary<string, SortedSet<string>> kinds)
    {
        // An estimate object ({"value", "ci95", "n", "status", ...}) is recorded by its stable part: ci95 as
        // "array|null" (null unless ok) and without the keys that only some statuses carry, so the schema does not
        // flip with the data's status; the status-dependent keys are checked in EstimateStatusTests.
        if (node is JsonObject est && est.ContainsKey("status") && est.ContainsKey("n") && est.ContainsKey("ci95"))
        {
            Add(kinds, path, "object");
            Add(kinds, $"{path}.ci95", "array|null");
            foreach (var (k, v) in est)
                if (k != "ci95" && Array.IndexOf(StatusKeys, k) < 0) Walk(v, $"{path}.{k}", kinds);
            return;
        }
        // A null stands for an undefined number (class remarks): it joins the number kind.
        string kind = node switch
        {
            null => "number|null",
            JsonObject => "object",
            JsonArray => "array",
            _ => node.GetValueKind() switch
            {
                JsonValueKind.String => "string",
                JsonValueKind.True or JsonValueKind.False => "bool",
                JsonValueKind.Number or JsonValueKind.Null => "number|null",
                var other => other.ToString().ToLowerInvariant(),
            },
        };
        Add(kinds, path, kind);
        switch (node)
        {
            case JsonObject o: foreach (var (k, v) in o) Walk(v, $"{path}.{k}", kinds); break;
            case JsonArray a: foreach (var v in a) Walk(v, $"{path}[]", kinds); break;
        }
    }

    private static void Add(SortedDictionary<string, SortedSet<string>> kinds, string path, string kind)
    {
        if (!kinds.TryGetValue(path, out var set)) kinds[path] = set = new SortedSet<string>(StringComparer.Ordinal);
        set.Add(kind);
    }

    // ---- comparison ----

    /// <summary>Compares <paramref name="actual"/> with the golden file (lines starting with # are comments), or rewrites
    /// the golden file when SHAPENOISE_UPDATE_GOLDEN=1.</summary>
    private static void AssertGolden(string name, IReadOnlyList<string> actual, string what)
    {
        string path = Path.Combine(GoldenFolder(), name);
        if (Environment.GetEnvironmentVariable(UpdateVariable) == "1")
        {
            Directory.CreateDirectory(GoldenFolder());
            var sb = new StringBuilder();
            sb.Append($"# {what}. Golden file of tests/ShapeNoise.Reporting.Tests/Reporting/GoldenSchemaTests.cs; regenerate with {UpdateVariable}=1 (see DEVELOPERS.md).\n");
            foreach (var l in actual) sb.Append(l).Append('\n');
            File.WriteAllText(path, sb.ToString());
            return;
        }
        Assert.True(File.Exists(path), $"golden file {path} is missing: run the tests once with {UpdateVariable}=1 to write it, then commit it");
        var expected = new List<string>();
        foreach (var l in File.ReadAllLines(path)) if (l.Length > 0 && !l.StartsWith('#')) expected.Add(l);
        if (expected.SequenceEqual(actual, StringComparer.Ordinal)) return;
        Assert.Fail($"{what} differs from golden file {name} (- golden, + now):\n{Diff(expected, actual)}\n" +
                    $"If the change is intended, regenerate with {UpdateVariable}=1 dotnet test ShapeNoise.sln -c Release --filter \"FullyQualifiedName~GoldenSchemaTests\" and commit tests/ShapeNoise.Reporting.Tests/Golden/.");
    }

    /// <summary>Line diff by longest common subsequence: changed lines with "-"/"+", unchanged ones left out; CSV
    /// header lines that changed also get their column differences spelled out.</summary>
    internal static string Diff(IReadOnlyList<string> a, IReadOnlyList<string> b)
    {
        int n = a.Count, m = b.Count;
        var lcs = new int[n + 1, m + 1];
        for (int i = n - 1; i >= 0; i--)
            for (int j = m - 1; j >= 0; j--)
                lcs[i, j] = a[i] == b[j] ? lcs[i + 1, j + 1] + 1 : Math.Max(lcs[i + 1, j], lcs[i, j + 1]);
        var sb = new StringBuilder();
        int x = 0, y = 0;
        while (x < n || y < m)
        {
            if (x < n && y < m && a[x] == b[y]) { x++; y++; }
            else if (x < n && (y == m || lcs[x + 1, y] >= lcs[x, y + 1])) sb.Append("- ").Append(a[x++]).Append('\n');
            else sb.Append("+ ").Append(b[y++]).Append('\n');
        }
        foreach (var la in a)
        {
            int c = la.IndexOf(".csv: ", StringComparison.Ordinal);
            if (c < 0) continue;
            string file = la[..(c + 4)];
            var lb = b.FirstOrDefault(l => l.StartsWith(file + ": ", StringComparison.Ordinal));
            if (lb is null || lb == la) continue;
            var ca = la[(c + 6)..].Split(','); var cb = lb[(c + 6)..].Split(',');
            var gone = ca.Except(cb).ToArray(); var added = cb.Except(ca).ToArray();
            sb.Append($"  {file}: columns removed [{string.Join(", ", gone)}], added [{string.Join(", ", added)}]");
            if (gone.Length == 0 && added.Length == 0) sb.Append(", same columns in a different order");
            sb.Append('\n');
        }
        return sb.ToString();
    }

    // ---- tests ----

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_SynthScenario_FileListMatchesGolden(string scenario)
        => AssertGolden($"{scenario}.files.txt", FileList(runs.Folder(scenario)), $"Files of the analyze folder ({scenario} scenario)");

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_SynthScenario_CsvHeadersMatchGolden(string scenario)
    {
        var headers = CsvHeaders(runs.Folder(scenario));
        // The CSVs the output contract promises must be among them, whatever the golden file says.
        foreach (var f in new[] { "cells.csv", "tracks.csv", "spectrum.csv", "profile.csv", "autocorrelation.csv", "defects.csv", "defect-flow.csv", "estimates.csv" })
            Assert.Contains(headers, h => h.StartsWith(f + ": ", StringComparison.Ordinal));
        AssertGolden($"{scenario}.csv-headers.txt", headers, $"CSV header lines ({scenario} scenario)");
    }

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_SynthScenario_SummaryJsonKeySchemaMatchesGolden(string scenario)
        => AssertGolden($"{scenario}.summary-schema.txt", JsonSchema(JsonNode.Parse(File.ReadAllText(Path.Combine(runs.Folder(scenario), "summary.json")))),
            $"Key schema of summary.json ({scenario} scenario)");

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_SynthScenario_SimParamsJsonKeySchemaMatchesGolden(string scenario)
        => AssertGolden($"{scenario}.sim-params-schema.txt", JsonSchema(JsonNode.Parse(File.ReadAllText(Path.Combine(runs.Folder(scenario), "sim-params.json")))),
            $"Key schema of sim-params.json ({scenario} scenario)");

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_SynthScenario_HoldsEveryKeyAndFileOfTheOutputContract(string scenario)
    {
        // The written contract, docs/measures.md#output-contract: the keys summary.json must have at least, the
        // {"value", "ci95": [lo, hi]} objects, and the files of the folder. Guards the golden files themselves: a
        // regeneration that drops a promised key or file fails here.
        string folder = runs.Folder(scenario);
        var schema = JsonSchema(JsonNode.Parse(File.ReadAllText(Path.Combine(folder, "summary.json"))));
        void Has(string line) => Assert.True(schema.Contains(line), $"summary.json lacks \"{line}\" (docs/measures.md#output-contract)");
        Has("$.units object"); Has("$.units.length string"); Has("$.units.time string");
        foreach (var k in new[] { "frames", "cells_tracked", "tracks_used", "tracks_below_floor", "outlines_excluded", "non_star_shaped",
                                  "plus_half_defects", "minus_half_defects", "fraction_headward", "mean_cell_radius" })
            Has($"$.{k} number|null");
        foreach (var k in new[] { "anisotropy", "anisotropy_contour", "var_L", "var_W", "var_along", "var_across", "tau_q", "tau_theta",
                                  "defect_headward_speed", "flow_headward_speed" })
        {
            // The estimate object of docs/statistics.md#estimate-status: ci95 is [lo, hi] when ok, else null.
            Has($"$.{k} object"); Has($"$.{k}.value number|null"); Has($"$.{k}.n number|null"); Has($"$.{k}.status string");
            Has($"$.{k}.ci95 array|null");
        }
        Has("$.hypothesis object");
        foreach (var k in new[] { "spearman_rho", "p_value", "n_defect_tracks" }) Has($"$.hypothesis.{k} number|null");
        var files = FileList(folder);
        foreach (var f in new[] { "summary.json", "cells.csv", "tracks.csv", "spectrum.csv", "autocorrelation.csv", "defects.csv", "sim-params.json", "report.html" })
            Assert.Contains(f, files);
        Assert.Contains(files, f => f.EndsWith(".png", StringComparison.Ordinal));
        string units = JsonNode.Parse(File.ReadAllText(Path.Combine(folder, "summary.json")))!["units"]!["length"]!.GetValue<string>();
        Assert.Contains(units, new[] { "um", "px" });
    }

    [Fact]
    public void Analyze_TwoScenarios_SameJsonSchemasAndCsvHeaders()
    {
        // The contract does not depend on the movie: a scenario with no followed +1/2 defect (ellipses: null headward
        // speed) and one with (monolayer) must give the same keys and kinds and the same CSV columns.
        string e = runs.Folder("ellipses"), m = runs.Folder("monolayer");
        foreach (var doc in new[] { "summary.json", "sim-params.json" })
        {
            var se = JsonSchema(JsonNode.Parse(File.ReadAllText(Path.Combine(e, doc))));
            var sm = JsonSchema(JsonNode.Parse(File.ReadAllText(Path.Combine(m, doc))));
            Assert.True(se.SequenceEqual(sm), $"{doc} schema differs between scenarios (- ellipses, + monolayer):\n{Diff(se, sm)}");
        }
        var he = CsvHeaders(e); var hm = CsvHeaders(m);
        Assert.True(he.SequenceEqual(hm), $"CSV headers differ between scenarios (- ellipses, + monolayer):\n{Diff(he, hm)}");
    }

    [Fact]
    public void JsonSchema_NullAndNumber_SameKindAndArraysMerged()
    {
        // The schema rules of the class remarks, on a hand-written document.
        var doc = JsonNode.Parse("""{"a": 1.5, "b": null, "c": [ {"x": 1}, {"x": null, "y": "s"} ], "d": [], "e": true, "f": [1, "t"]}""");
        Assert.Equal(new[]
        {
            "$ object", "$.a number|null", "$.b number|null", "$.c array", "$.c[] object", "$.c[].x number|null", "$.c[].y string",
            "$.d array", "$.e bool", "$.f array", "$.f[] number|null|string",
        }, JsonSchema(doc));
    }

    [Fact]
    public void Diff_ChangedCsvHeader_NamesTheColumns()
    {
        var d = Diff(["a.csv: x,y,z", "b.csv: p"], ["a.csv: x,z,w", "b.csv: p"]);
        Assert.Contains("- a.csv: x,y,z", d);
        Assert.Contains("+ a.csv: x,z,w", d);
        Assert.Contains("columns removed [y], added [w]", d);
        Assert.True(d.IndexOf("- a.csv", StringComparison.Ordinal) < d.IndexOf("+ a.csv", StringComparison.Ordinal), "golden line first");
        Assert.DoesNotContain("b.csv", d);
    }
}
