using ShapeNoise.Comparison;
using ShapeNoise.Reporting;
using ShapeNoise.Tests.Reporting;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Comparison;

public class ComparisonCsvTests
{
    /// <summary>Three movies of one condition, each with ten tracks whose var_L / var_W is near <paramref name="ratio"/>.</summary>
    private static IEnumerable<MovieData> Movies(string condition, double ratio, int seed)
    {
        var rng = new Random(seed);
        for (int m = 0; m < 3; m++)
        {
            var tracks = Enumerable.Range(0, 10).Select(_ => { double w = 1 + rng.NextDouble(); return new TrackUnit(20, ratio * w * (0.8 + 0.4 * rng.NextDouble()), w, 2 * w, w); }).ToArray();
            yield return new MovieData(condition, $"{m + 1}", $"/nowhere/{condition}/{m}", "um", "min", tracks, 5 + m, [0.1 * (m + 1)], [0.05]);
        }
    }

    [Fact]
    public void Write_ConditionWithCommaAndQuote_RoundTripsThroughCsvHelper()
    {
        const string odd = "wt, \"fast\" batch";
        using var d = new TempDir();
        Directory.CreateDirectory(d["cmp"]);
        var r = ConditionComparison.Run([.. Movies(odd, 3, 1), .. Movies("mutant", 1, 2)], 50, 1);
        ComparisonReport.Write(r, d["cmp"]);

        // Read back with a third-party CSV reader (CsvHelper, RFC 4180 quoting) by the header names.
        var (header, rows) = AnalysisFolderTests.ReadCsv(d["cmp/comparison.csv"]);
        Assert.Equal(["condition", "measure", "unit", "movies", "units", "value", "ci95_low", "ci95_high", "n", "status", "reason"], header);
        Assert.All(rows, row => Assert.Equal(header.Length, row.Length));
        Assert.Equal(new[] { "mutant", odd }, rows.Select(x => x[0]).Distinct().Order(StringComparer.Ordinal));
        // The unit column comes from the measure table: ratio, the time unit, length/time.
        Assert.Equal("ratio", rows.First(x => x[1] == "anisotropy")[2]);
        Assert.Equal("min", rows.First(x => x[1] == "tau_q")[2]);
        Assert.Equal("um/min", rows.First(x => x[1] == "defect_headward_speed")[2]);

        var (dh, drows) = AnalysisFolderTests.ReadCsv(d["cmp/differences.csv"]);
        Assert.Equal("measure,condition_a,condition_b,difference,ci95_low,ci95_high,ratio,ratio_ci95_low,ratio_ci95_high,p_value,movies_a,movies_b,status,movie_effect,movie_effect_ci95_low,movie_effect_ci95_high,scale,p_holm,primary", string.Join(",", dh));
        Assert.All(drows, row => Assert.Equal(odd, row[1]));
        Assert.All(drows, row => Assert.Equal("mutant", row[2]));
        // RFC 4180 §2.6–2.7: the field is quoted and its quotes doubled.
        Assert.Contains("\"wt, \"\"fast\"\" batch\"", File.ReadAllText(d["cmp/comparison.csv"]));
    }

    // Spec rule (docs/statistics.md, "Comparing conditions"): fewer than 3 movies in a condition is descriptive only.
    [Fact]
    public void Run_OneMoviePerCondition_TooFewNoPValueNoInterval()
    {
        var r = ConditionComparison.Run([Movies("a", 3, 1).First(), Movies("b", 1, 2).First()], 50, 1);
        Assert.All(r.Differences, x =>
        {
            Assert.Equal(ShapeNoise.Statistics.EstimateStatus.TooFew, x.Status);
            Assert.True(double.IsNaN(x.PValue));
            Assert.True(double.IsNaN(x.Difference.Low) && double.IsNaN(x.Effect.Low));
            Assert.Contains("not enough movies (n = 1 and 1; at least 3 per condition)", ComparisonReport.Sentence(x));
        });
        string md = ComparisonReport.Narrative(r);
        Assert.DoesNotContain("difference shown", md.Replace("no difference shown", ""));
        Assert.DoesNotContain("more anisotropic", md);
        Assert.DoesNotContain("less anisotropic", md);
    }

    // Holm (1979), Scand. J. Statist. 6:65-70, step-down rule worked by hand: p = (0.01, 0.04, 0.03, 0.005), k = 4;
    // sorted 0.005, 0.01, 0.03, 0.04 -> 4*0.005 = 0.02, 3*0.01 = 0.03, 2*0.03 = 0.06, max(0.06, 1*0.04) = 0.06.
    [Fact]
    public void Holm_HandWorkedExample_StepDownValues()
    {
        var adj = ConditionComparison.Holm([0.01, 0.04, 0.03, 0.005, double.NaN]);
        Assert.Equal(0.03, adj[0], 12); Assert.Equal(0.06, adj[1], 12); Assert.Equal(0.06, adj[2], 12); Assert.Equal(0.02, adj[3], 12);
        Assert.True(double.IsNaN(adj[4]));
    }
}
