using ShapeNoise.Reporting;
using ShapeNoise.Cli.Jobs;
using System.Diagnostics;
using System.Text.RegularExpressions;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Reporting;

/// <summary>Renders report.html in headless Chromium (Debian's chromium package; scripts/test.sh installs it).</summary>
public class BrowserRenderTests(ITestOutputHelper log)
{
    private static string Chromium() =>
        new[] { "/usr/bin/chromium", "/usr/bin/chromium-browser" }.FirstOrDefault(File.Exists)
        ?? throw new InvalidOperationException("Chromium not found: scripts/test.sh installs Debian's chromium package");

    private static (string Stdout, string Stderr) RunChromium(params string[] args)
    {
        var psi = new ProcessStartInfo(Chromium()) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                                   "--disable-component-update", "--disable-sync", "--enable-logging=stderr", "--v=0",
                                   $"--user-data-dir={Path.Combine(Path.GetTempPath(), "shapenoise-chromium-" + Guid.NewGuid().ToString("N"))}" })
            psi.ArgumentList.Add(a);
        foreach (var a in args) psi.ArgumentList.Add(a);
        using var p = Process.Start(psi)!;
        var o = p.StandardOutput.ReadToEndAsync(); var e = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(120_000)) { p.Kill(true); throw new TimeoutException("chromium did not finish"); }
        return (o.Result, e.Result);
    }

    [Fact]
    public void Report_InHeadlessChromium_LoadsWithoutConsoleMessagesAndEveryImageDecodes()
    {
        using var d = new TempDir();
        string root = new DirectoryInfo(AppContext.BaseDirectory).Parent!.Parent!.Parent!.Parent!.Parent!.FullName;
        AnalyzeJob.Run(Path.Combine(root, "demo-data", "ellipses", "labels.tif"), d["run"], new AnalysisOptions { BootstrapResamples = 100 },
            LabelMovies.Open, null, null, new ShapeNoise.Imaging.Drawing.DefectOverlays());
        string url = new Uri(d["run/report.html"]).AbsoluteUri;
        var (dom, err) = RunChromium("--virtual-time-budget=5000", "--dump-dom", url);
        var console = err.Split('\n').Where(l => l.Contains(":CONSOLE")).ToList();
        Assert.True(console.Count == 0, "console output: " + string.Join(" | ", console));
        var m = Regex.Match(dom, "data-image-sizes=\"([^\"]*)\"");
        Assert.True(m.Success, "the page's load check did not run");
        var sizes = m.Groups[1].Value.Split(',');
        log.WriteLine($"{sizes.Length} images: {m.Groups[1].Value}");
        Assert.True(sizes.Length >= 6);
        Assert.All(sizes, s => Assert.DoesNotMatch("(^0x)|(x0$)", s));
        // Screenshot kept as an artifact under the test output.
        string shots = Path.Combine(AppContext.BaseDirectory, "artifacts");
        Directory.CreateDirectory(shots);
        string png = Path.Combine(shots, "report.png");
        RunChromium("--window-size=1200,2400", $"--screenshot={png}", url);
        Assert.True(new FileInfo(png).Length > 10_000);
    }
}
