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
        var r = ComparisonJobs.Compare(d["conditions.csv"], d["cmp"], new AnalysisOptions { BootstrapResamples = 300 }, LabelMovies.Open);
        var diff = r.Differences.Single(x => x.Measure == "anisotropy");
        log.WriteLine($"anisotropy aniso - iso = {diff.Difference.Value:F3} (95% CI {diff.Difference.Low:F3} to {diff.Difference.High:F3}), ratio {diff.Ratio.Value:F2}, Welch p {diff.PValue:G3}");
        Assert.True(diff.Difference.Low > 0, "the interval must exclude 0");
        Assert.InRange(diff.Ratio.Value, 2.5, 6);
        foreach (var f in new[] { "comparison.csv", "differences.csv", "comparison.md", "superplot-anisotropy.png", "superplot-anisotropy_contour.png", "run.json", "report.html" })
            Assert.True(new FileInfo(d[$"cmp/{f}"]).Length > 0, f);
        Assert.StartsWith("measure,condition_a,condition_b,difference,ci95_low,ci95_high,ratio,ratio_ci95_low,ratio_ci95_high,p_value", File.ReadLines(d["cmp/differences.csv"]).First());
        Assert.Contains("excludes 0", File.ReadAllText(d["cmp/comparison.md"]));
        Assert.True(Directory.Exists(d["cmp/movies/aniso-3"]), "raw movies are analysed inside the comparison folder");

        var plan = ComparisonJobs.Plan([d["pilot-aniso"], d["pilot-iso"]], 0.2, "anisotropy", d["plan"]);
        log.WriteLine($"ICC {plan.Components.Icc:F3}; smallest design {plan.Smallest}");
        Assert.NotNull(plan.Smallest);
        Assert.InRange(plan.Smallest!.Value.MoviesPerCondition, 2, 30);
        Assert.True(File.Exists(d["plan/plan.csv"]) && File.Exists(d["plan/plan.png"]) && File.Exists(d["plan/plan.md"]) && File.Exists(d["plan/report.html"]));
        var page = File.ReadAllText(d["cmp/report.html"]);
        System.Xml.Linq.XDocument.Parse(page[page.IndexOf("<html", StringComparison.Ordinal)..]);   // well-formed
        Assert.Contains(diff.Difference.Value.ToString("G4", System.Globalization.CultureInfo.InvariantCulture), page);   // the narrative's rounding
        Assert.Contains("excludes 0", page);
        Assert.Equal(29 * ExperimentPlan.CellsChoices.Length + 1, File.ReadLines(d["plan/plan.csv"]).Count());
    }

    [Fact]
    public void Compare_SameSeed_SameNumbers()
    {
        using var d = new TempDir();
        MakePilots(d);
        File.WriteAllText(d["c.csv"], "condition,replicate,path\naniso,1,pilot-aniso/r0\naniso,2,pilot-aniso/r1\niso,1,pilot-iso/r0\niso,2,pilot-iso/r1\n");
        ComparisonJobs.Compare(d["c.csv"], d["a"], new AnalysisOptions { BootstrapResamples = 200, Seed = 9 }, LabelMovies.Open);
        ComparisonJobs.Compare(d["c.csv"], d["b"], new AnalysisOptions { BootstrapResamples = 200, Seed = 9 }, LabelMovies.Open);
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
    public void Welch_KnownSamples_MatchesHandComputation()
    {
        // Hand computation: a = (1,2,3,4), b = (2,4,6,8,10): means 2.5, 6; s^2 1.6667, 10; se^2 = 0.41667 + 2 = 2.41667;
        // t = -3.5 / 1.5546 = -2.2514; Welch-Satterthwaite df = 2.41667^2 / (0.41667^2/3 + 2^2/4) = 5.84028 / 1.05787 = 5.5208.
        double p = ConditionComparison.Welch([1, 2, 3, 4], [2, 4, 6, 8, 10]);
        double expected = 2 * (1 - MathNet.Numerics.Distributions.StudentT.CDF(0, 1, 5.5208, 2.2514));
        Assert.Equal(expected, p, 4);
    }
}
