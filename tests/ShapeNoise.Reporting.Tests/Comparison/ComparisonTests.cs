using ShapeNoise.Reporting;
using ShapeNoise.Cli.Jobs;
using System.Text.Json.Nodes;
using ShapeNoise.Comparison;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Comparison;

public class ComparisonTests(ITestOutputHelper log)
{
    /// <summary>Three movies per condition from our ellipse scenario: "aniso" with variance ratio 4, "iso" with ratio 1.</summary>
    private static void MakePilots(TempDir d)
    {
        var opts = new AnalysisOptions { BootstrapResamples = 100 };
        for (int i = 0; i < 3; i++)
        {
            foreach (var (cond, sa, sc) in new[] { ("aniso", 1.0, 0.5), ("iso", 0.7, 0.7) })
            {
                var o = new EllipseMovieOptions { Cells = 16, Frames = 30, SigmaAlongPx = sa, SigmaAcrossPx = sc, Seed = 40 + 7 * i + (cond == "iso" ? 100 : 0) };
                SynthJob.Ellipses(o, d[$"movies/{cond}-{i}"]);
                AnalyzeJob.Run(d[$"movies/{cond}-{i}/labels.tif"], d[$"pilot-{cond}/r{i}"], opts, LabelMovies.Open);
            }
        }
    }

    [Fact]
    public void CompareAndPlan_Ratio4Vs1_DifferenceExcludesZeroAndDesignIsFinite()
    {
        using var d = new TempDir();
        MakePilots(d);
        // conditions.csv mixes analysis folders and raw movies (which compare analyses first), with relative paths.
        File.WriteAllText(d["conditions.csv"], "condition,replicate,path\n" +
            "aniso,1,pilot-aniso/r0\naniso,2,pilot-aniso/r1\naniso,3,movies/aniso-2/labels.tif\n" +
            "iso,1,pilot-iso/r0\niso,2,pilot-iso/r1\niso,3,movies/iso-2/labels.tif\n");
        var r = CompareJob.Compare(d["conditions.csv"], d["cmp"], new AnalysisOptions { BootstrapResamples = 300 }, LabelMovies.Open);
        var diff = r.Differences.Single(x => x.Measure == "anisotropy");
        log.WriteLine($"anisotropy aniso - iso = {diff.Difference.Value:F3} (95% CI {diff.Difference.Low:F3} to {diff.Difference.High:F3}), ratio {diff.Ratio.Value:F2}, Student p {diff.PValue:G3}");
        Assert.True(diff.Difference.Low > 0, "the interval must exclude 0");
        Assert.InRange(diff.Ratio.Value, 2.5, 6);
        foreach (var f in new[] { "comparison.csv", "differences.csv", "comparison.md", "superplot-anisotropy.png", "superplot-anisotropy_contour.png", "run.json", "report.html" })
            Assert.True(new FileInfo(d[$"cmp/{f}"]).Length > 0, f);
        Assert.StartsWith("measure,condition_a,condition_b,difference,ci95_low,ci95_high,ratio,ratio_ci95_low,ratio_ci95_high,p_value", File.ReadLines(d["cmp/differences.csv"]).First());
        Assert.Contains("aniso is more anisotropic than iso", File.ReadAllText(d["cmp/comparison.md"]));
        Assert.True(Directory.Exists(d["cmp/movies/aniso-3"]), "raw movies are analysed inside the comparison folder");

        var plan = CompareJob.Plan([d["pilot-aniso"], d["pilot-iso"]], 0.2, "anisotropy", d["plan"]);
        log.WriteLine($"ICC {plan.Components.Icc:F3}; smallest design {plan.Smallest}");
        Assert.NotNull(plan.Smallest);
        Assert.InRange(plan.Smallest!.Value.MoviesPerCondition, ConditionComparison.MinMovies, 30);   // compare tests from 3 movies per condition
        Assert.True(File.Exists(d["plan/plan.csv"]) && File.Exists(d["plan/plan.png"]) && File.Exists(d["plan/plan.md"]) && File.Exists(d["plan/report.html"]));
        var page = File.ReadAllText(d["cmp/report.html"]);
        System.Xml.Linq.XDocument.Parse(page[page.IndexOf("<html", StringComparison.Ordinal)..]);   // well-formed
        Assert.Contains(diff.Effect.Value.ToString("G4", System.Globalization.CultureInfo.InvariantCulture), page);   // the narrative's rounding
        Assert.Contains("more anisotropic", page);
        Assert.Equal(29 * ExperimentPlan.CellsChoices.Length + 1, File.ReadLines(d["plan/plan.csv"]).Count());
        // The plan names the test it is for and writes its ICC as an estimate object (docs/statistics.md#estimate-status)
        // over the 6 pilot movies, with the assumed tracks per movie and frames per track.
        Assert.Contains("the same Student t test on per-movie ln pooled ratio that compare runs", File.ReadAllText(d["plan/plan.md"]));
        log.WriteLine(File.ReadAllText(d["plan/plan.md"]));
        var pj = JsonNode.Parse(File.ReadAllText(d["plan/plan.json"]))!;
        Assert.Equal(6, (int)pj["icc"]!["n"]!);
        Assert.Equal("movies", (string)pj["icc"]!["unit"]!);
        Assert.Contains((string)pj["icc"]!["status"]!, new[] { "ok", "too_few" });
        Assert.True((double)pj["assumptions"]!["tracks_per_movie"]! > 0);
        Assert.True((double)pj["assumptions"]!["frames_per_track"]! > 0);
    }

    [Fact]
    public void Compare_SameSeed_SameNumbers()
    {
        using var d = new TempDir();
        MakePilots(d);
        File.WriteAllText(d["c.csv"], "condition,replicate,path\naniso,1,pilot-aniso/r0\naniso,2,pilot-aniso/r1\niso,1,pilot-iso/r0\niso,2,pilot-iso/r1\n");
        CompareJob.Compare(d["c.csv"], d["a"], new AnalysisOptions { BootstrapResamples = 200, Seed = 9 }, LabelMovies.Open);
        CompareJob.Compare(d["c.csv"], d["b"], new AnalysisOptions { BootstrapResamples = 200, Seed = 9 }, LabelMovies.Open);
        Assert.Equal(File.ReadAllText(d["a/differences.csv"]), File.ReadAllText(d["b/differences.csv"]));
    }

    [Fact]
    public void ConditionTable_MissingColumn_OneLineError()
    {
        using var d = new TempDir();
        File.WriteAllText(d["c.csv"], "condition,path\na,x\nb,y\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => ConditionTable.Read(d["c.csv"]));
        Assert.Contains("replicate", e.Message);
        Assert.Contains("c.csv", e.Message);
    }

    [Fact]
    public void MovieTest_KnownSamples_MatchesHandComputation()
    {
        // Hand computation (Student's pooled two-sample t): a = (1,2,3,4), b = (2,4,6,8,10): means 2.5, 6; s^2 1.6667, 10;
        // s_p^2 = (3 x 1.6667 + 4 x 10) / 7 = 6.4286; se = sqrt(6.4286 x (1/4 + 1/5)) = 1.70084; t = -3.5 / 1.70084 = -2.05780;
        // df = 7; the interval is -3.5 +- t_{0.975,7} se with t_{0.975,7} = 2.36462 (from memory; MathNet's quantile below).
        var r = ConditionComparison.MovieTest([1, 2, 3, 4], [2, 4, 6, 8, 10])!.Value;
        double expected = 2 * (1 - MathNet.Numerics.Distributions.StudentT.CDF(0, 1, 7, 2.05780));
        Assert.Equal(expected, r.PValue, 4);
        Assert.Equal(-3.5, r.Difference, 12);
        double crit = MathNet.Numerics.Distributions.StudentT.InvCDF(0, 1, 7, 0.975);
        Assert.Equal(2.36462, crit, 4);
        Assert.Equal(-3.5 - crit * 1.70084, r.Low, 4);
        Assert.Equal(-3.5 + crit * 1.70084, r.High, 4);
    }

    /// <summary>A stand-in analysis folder: summary.json and a run.json whose inputs carry the given SHA-256 values.</summary>
    private static void FakeAnalysis(string dir, params (string Name, string Sha)[] inputs)
    {
        Directory.CreateDirectory(dir);
        File.WriteAllText(Path.Combine(dir, "summary.json"), "{}");
        var arr = new JsonArray(inputs.Select(i => (JsonNode?)new JsonObject { ["name"] = i.Name, ["sha256"] = i.Sha }).ToArray());
        File.WriteAllText(Path.Combine(dir, "run.json"), new JsonObject { ["inputs"] = arr }.ToJsonString());
    }

    private static List<ConditionRow> Rows(TempDir d, string body)
    {
        File.WriteAllText(d["c.csv"], "condition,replicate,path\n" + body);
        return ConditionTable.Read(d["c.csv"]);
    }

    // Listing one movie as two replicates is pseudo-replication (Lord et al. 2020, J Cell Biol 219:e202001064,
    // "SuperPlots": replicates must be independent); the refusal must name both rows of conditions.csv.
    [Fact]
    public void RefuseRepeatedData_SameFolderViaDotDotPath_NamesBothRows()
    {
        using var d = new TempDir();
        FakeAnalysis(d["runs/wt1"], ("labels.tif", new string('a', 64)));
        FakeAnalysis(d["runs/ko1"], ("labels.tif", new string('b', 64)));
        var rows = Rows(d, "wt,1,runs/wt1\nwt,2,runs/ko1/../wt1/\nko,1,runs/ko1\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => CompareJob.RefuseRepeatedData(d["c.csv"], rows));
        Assert.Contains("row 2 (wt, 1) and row 3 (wt, 2) are the same analysis folder", e.Message);
        Assert.Contains("c.csv", e.Message);
    }

    [Fact]
    public void RefuseRepeatedData_SameFolderViaSymlinkedParent_Refused()
    {
        using var d = new TempDir();
        FakeAnalysis(d["runs/wt1"], ("labels.tif", new string('a', 64)));
        FakeAnalysis(d["runs/ko1"], ("labels.tif", new string('b', 64)));
        Directory.CreateSymbolicLink(d["alias"], d["runs"]);   // alias -> runs: alias/wt1 is runs/wt1
        var rows = Rows(d, "wt,1,runs/wt1\nko,1,runs/ko1\nko,2,alias/wt1\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => CompareJob.RefuseRepeatedData(d["c.csv"], rows));
        Assert.Contains("row 2 (wt, 1) and row 4 (ko, 2)", e.Message);
    }

    [Fact]
    public void RefuseRepeatedData_TwoFoldersSameInputHash_Refused()
    {
        using var d = new TempDir();
        string sha = "0123456789abcdef" + new string('c', 48);
        FakeAnalysis(d["runs/a"], ("labels.tif", sha));
        FakeAnalysis(d["runs/b"], ("copy.tif", sha));   // the same movie analysed twice (a renamed copy)
        var rows = Rows(d, "wt,1,runs/a\nko,1,runs/b\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => CompareJob.RefuseRepeatedData(d["c.csv"], rows));
        Assert.Contains("row 2 (wt, 1) and row 3 (ko, 1) hold the same data", e.Message);
        Assert.Contains("0123456789ab", e.Message);
    }

    [Fact]
    public void RefuseRepeatedData_TwoMovieFilesSameBytes_Refused()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["m"]);
        File.WriteAllBytes(d["m/one.tif"], [1, 2, 3, 4]);
        File.WriteAllBytes(d["m/two.tif"], [1, 2, 3, 4]);
        File.WriteAllBytes(d["m/three.tif"], [1, 2, 3, 5]);
        var rows = Rows(d, "wt,1,m/one.tif\nwt,2,m/three.tif\nko,1,m/two.tif\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => CompareJob.RefuseRepeatedData(d["c.csv"], rows));
        Assert.Contains("row 2 (wt, 1) and row 4 (ko, 1)", e.Message);
        Assert.Contains("one.tif and two.tif", e.Message);
    }

    [Fact]
    public void RefuseRepeatedData_DistinctMoviesSharingOnlyTheFloor_Accepted()
    {
        using var d = new TempDir();
        string floor = new string('f', 64);
        FakeAnalysis(d["runs/a"], ("labels.tif", new string('1', 64)), ("floor.json", floor));
        FakeAnalysis(d["runs/b"], ("labels.tif", new string('2', 64)), ("floor.json", floor));
        CompareJob.RefuseRepeatedData(d["c.csv"], Rows(d, "wt,1,runs/a\nko,1,runs/b\n"));
    }

    [Fact]
    public void Cli_CompareSameFolderTwice_Exit2NamesBothRowsWritesNothing()
    {
        using var d = new TempDir();
        FakeAnalysis(d["runs/wt1"], ("labels.tif", new string('a', 64)));
        FakeAnalysis(d["runs/ko1"], ("labels.tif", new string('b', 64)));
        File.WriteAllText(d["c.csv"], "condition,replicate,path\nwt,1,runs/wt1\nwt,2,./runs/wt1\nko,1,runs/ko1\n");
        var r = Support.Cli.Run("compare", d["c.csv"], "--out", d["cmp"]);
        Assert.Equal(2, r.ExitCode);
        Assert.Single(r.Stderr.Trim().Split('\n'));
        Assert.Contains("row 2 (wt, 1) and row 3 (wt, 2)", r.Stderr);
        Assert.False(Directory.Exists(d["cmp"]));
    }
}
