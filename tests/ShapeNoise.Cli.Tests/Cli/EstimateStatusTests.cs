using System.Text.Json.Nodes;
using System.Xml.Linq;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Cli;

/// <summary>
/// docs/statistics.md#estimate-status end to end: where the data cannot carry a number, summary.json, estimates.csv, the
/// console and report.html all say so and print no number. Scenarios from our synthetic generators (recovery tests):
/// isolated cells (defects not applicable) and a short confluent movie with a single defect pair (one +1/2 defect
/// track: too few units for a headward speed).
/// </summary>
public class EstimateStatusTests
{
    private static (JsonNode Summary, string Console, string Html, string[] EstimatesCsv) Run(TempDir d, string[] synth, params string[] analyze)
    {
        var s = Support.Cli.Run([.. synth, "--out", d["movie"]]);
        Assert.True(s.ExitCode == 0, s.Stderr);
        var r = Support.Cli.Run(["analyze", d["movie/labels.tif"], "--out", d["run"], .. analyze]);
        Assert.True(r.ExitCode == 0, r.Stderr);
        // The console wraps at its width: compare with whitespace collapsed.
        string console = System.Text.RegularExpressions.Regex.Replace(r.Stdout, @"\s+", " ");
        return (JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!, console, File.ReadAllText(d["run/report.html"]), File.ReadAllLines(d["run/estimates.csv"]));
    }

    /// <summary>Every estimate object that is not ok has null value and ci95; every ok one has a finite interval of non-zero width.</summary>
    private static void AssertNoNumberUnlessOk(JsonNode? n, string path = "$")
    {
        if (n is JsonObject o)
        {
            if (o.ContainsKey("status") && o.ContainsKey("n") && o.ContainsKey("ci95"))
            {
                string st = o["status"]!.GetValue<string>();
                Assert.Contains(st, new[] { "ok", "too_few", "at_bound", "not_applicable" });
                if (st == "ok")
                {
                    double lo = o["ci95"]![0]!.GetValue<double>(), hi = o["ci95"]![1]!.GetValue<double>();
                    Assert.True(hi > lo, $"{path}: ok with an interval of zero width");
                    Assert.True(o["n"]!.GetValue<int>() >= 5, $"{path}: ok from fewer than 5 units");
                }
                else
                {
                    Assert.True(o["value"] is null, $"{path}: {st} but a value");
                    Assert.True(o["ci95"] is null, $"{path}: {st} but an interval");
                }
                if (st == "at_bound") { Assert.NotNull(o["bound"]); Assert.NotNull(o["bound_value"]); }
                return;
            }
            foreach (var (k, v) in o) AssertNoNumberUnlessOk(v, $"{path}.{k}");
        }
        else if (n is JsonArray a) for (int i = 0; i < a.Count; i++) AssertNoNumberUnlessOk(a[i], $"{path}[{i}]");
    }

    private static string HeadlineText(string html)
        => string.Join("\n", XDocument.Parse(html[html.IndexOf("<html", StringComparison.Ordinal)..]).Descendants("li").Select(li => li.Value));

    [Fact]
    public void Analyze_OneDefectPairShortMovie_HeadwardSpeedTooFewAndNoNumberAnywhere()
    {
        using var d = new TempDir();
        var (summary, console, html, csv) = Run(d, ["synth", "monolayer", "--cells", "150", "--frames", "12", "--seed", "3"], "--bootstrap", "100", "--min-track", "5");
        AssertNoNumberUnlessOk(summary);
        var head = summary["defect_headward_speed"]!;
        Assert.Equal("too_few", head["status"]!.GetValue<string>());
        Assert.True(head["n"]!.GetValue<int>() < 5);
        Assert.Contains("not enough data", console);
        Assert.Contains("not enough data", HeadlineText(html));
        Assert.DoesNotContain("toward their head", HeadlineText(html));
        Assert.DoesNotContain("toward their tail", HeadlineText(html));
        Assert.Contains(csv, l => l.StartsWith("defect_headward_speed,,,,", StringComparison.Ordinal) && l.Contains(",too_few,"));
    }

    /// <summary>A small many-defect tissue (3 pairs): fewer than 5 +1/2 defect tracks long enough for the shape-noise test
    /// (docs/statistics.md#minimum-units), so the test is too_few with no rho and no p anywhere; the headward speed of these
    /// 2-4 tracks takes its interval from time blocks and the sentence says it describes these defects only.</summary>
    [Fact]
    public void Analyze_FewDefectTracks_HypothesisTooFewAndSpeedFromTimeBlocks()
    {
        using var d = new TempDir();
        var (summary, console, html, _) = Run(d, ["synth", "monolayer", "--pairs", "3", "--cells", "200", "--frames", "20", "--seed", "5"], "--bootstrap", "100");
        AssertNoNumberUnlessOk(summary);
        var hyp = summary["hypothesis"]!;
        Assert.Equal("too_few", hyp["status"]!.GetValue<string>());
        Assert.InRange(hyp["n_defect_tracks"]!.GetValue<int>(), 0, 4);
        Assert.Null(hyp["spearman_rho"]); Assert.Null(hyp["p_value"]); Assert.Null(hyp["random_position_p_value"]);
        Assert.Contains("Shape-noise test (local anisotropy vs headward speed of +1/2 defects): not enough data", console);
        Assert.Contains("Shape-noise test (local anisotropy vs headward speed of +1/2 defects): not enough data", HeadlineText(html));
        Assert.DoesNotContain("as the shape-noise hypothesis predicts", console);
        var head = summary["defect_headward_speed"]!;
        Assert.Equal("time blocks", head["unit"]!.GetValue<string>());
        if (head["status"]!.GetValue<string>() == "ok") Assert.Contains("describes these defects, not the tissue's", console);
    }

    [Fact]
    public void Analyze_IsolatedCells_DefectsNotApplicableAndNoDirectionClaimed()
    {
        using var d = new TempDir();
        var (summary, console, html, _) = Run(d, ["synth", "ellipses", "--cells", "8", "--frames", "20", "--seed", "3"], "--bootstrap", "100");
        AssertNoNumberUnlessOk(summary);
        Assert.Equal("not_applicable", summary["defect_headward_speed"]!["status"]!.GetValue<string>());
        Assert.Contains("not applicable", console);
        Assert.Contains("not applicable", HeadlineText(html));
        Assert.DoesNotContain("contractile-like)", HeadlineText(html).Replace("(extensile-like)", ""));
    }
}
