using System.Xml.Linq;
using ShapeNoise.Cli.Jobs;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

public class HtmlFiguresTests
{
    [Fact]
    public void Build_MonolayerWithOverlays_EmbedsEveryFigureFileExactlyOnce()
    {
        using var d = new TempDir();
        SynthJob.Monolayer(new MonolayerMovieOptions { Cells = 150, Frames = 12, Seed = 3 }, d["movie"]);
        AnalyzeJob.Run(d["movie/labels.tif"], d["run"], new AnalysisOptions { BootstrapResamples = 50, MinTrackFrames = 5 }, LabelMovies.Open,
            frameFigures: new ShapeNoise.Imaging.Drawing.DefectOverlays());
        string html = File.ReadAllText(d["run/report.html"]);
        var imgs = XDocument.Parse(html[html.IndexOf("<html", StringComparison.Ordinal)..]).Descendants("img").ToList();
        var pngs = Directory.GetFiles(d["run"], "*.png").Select(f => Path.GetFileName(f)).Order(StringComparer.Ordinal).ToList();
        Assert.Contains("defects-frame-000.png", pngs);
        Assert.Contains(AnalysisFolder.AnisotropyFigure, pngs);
        // One image per figure file, named by its file (alt) ...
        Assert.Equal(pngs, imgs.Select(i => (string)i.Attribute("alt")!).Order(StringComparer.Ordinal).ToList());
        foreach (var name in pngs)
        {
            // ... and the embedded data are the bytes saved under that name, once in the page.
            string data = "data:image/png;base64," + Convert.ToBase64String(File.ReadAllBytes(Path.Combine(d["run"], name)));
            Assert.Equal(data, (string)imgs.Single(i => (string)i.Attribute("alt")! == name).Attribute("src")!);
            Assert.Equal(1, Count(html, data));
            // PNG signature (ISO/IEC 15948 §5.2: 89 50 4E 47 0D 0A 1A 0A).
            Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }, File.ReadAllBytes(Path.Combine(d["run"], name))[..8]);
        }
    }

    private static int Count(string text, string part)
    {
        int n = 0;
        for (int i = text.IndexOf(part, StringComparison.Ordinal); i >= 0; i = text.IndexOf(part, i + part.Length, StringComparison.Ordinal)) n++;
        return n;
    }
}
