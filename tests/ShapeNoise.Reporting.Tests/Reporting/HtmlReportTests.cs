using ShapeNoise.Cli.Jobs;
using System.Text.Json.Nodes;
using System.Xml.Linq;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

public class HtmlReportTests
{
    [Fact]
    public void Report_DemoMovie_WellFormedSelfContainedWithEveryHeadlineNumber()
    {
        using var d = new TempDir();
        string root = new DirectoryInfo(AppContext.BaseDirectory).Parent!.Parent!.Parent!.Parent!.Parent!.FullName;
        AnalyzeJob.Run(Path.Combine(root, "demo-data", "monolayer", "labels.tif"), d["run"], new AnalysisOptions { BootstrapResamples = 200 },
            LabelMovies.Open, null, null, new ShapeNoise.Imaging.Drawing.DefectOverlays());
        string html = File.ReadAllText(d["run/report.html"]);
        // Well-formed: the page is XHTML-compatible HTML5, so an XML parser reads it (after the doctype).
        var doc = XDocument.Parse(html[html.IndexOf("<html", StringComparison.Ordinal)..]);
        var imgs = doc.Descendants("img").ToList();
        Assert.True(imgs.Count >= 6);
        // Self-contained: every image is embedded data, no element points at another resource.
        Assert.All(imgs, i => Assert.StartsWith("data:image/png;base64,", (string)i.Attribute("src")!));
        Assert.DoesNotContain(doc.Descendants(), e => e.Name.LocalName is "link" or "iframe" || (e.Name.LocalName == "script" && e.Attribute("src") is not null));
        Assert.DoesNotContain("http://", html.Replace("http://www.w3.org", ""));
        Assert.DoesNotContain("https://", html);
        // Every headline number of summary.json, rounded the way the report rounds.
        var s = JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!;
        foreach (var key in new[] { "anisotropy", "anisotropy_contour", "tau_q", "tau_theta", "defect_headward_speed" })
        {
            var v = s[key]!;
            foreach (var x in new[] { v["value"], v["ci95"]?[0], v["ci95"]?[1] })
                if (x is not null) Assert.Contains(HtmlReport.Round(x.GetValue<double>()), html);
        }
        if (s["plus_half_defects"] is { } plus) Assert.Contains(HtmlReport.Round(plus.GetValue<double>()), html);
        else Assert.Contains("not applicable", html);
        Assert.Contains("no clinical or diagnostic claim", html);
        // The header names the resampling unit summary.json reports (spatial blocks on this confluent demo), not "tracks" always.
        Assert.Contains($"the shape statistics resample {s["resampling_unit"]!.GetValue<string>()}", html);
    }
}
