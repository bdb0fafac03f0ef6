using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Cli;

/// <summary>End to end through the real command: outputs, provenance, determinism, and bad input.</summary>
public class AnalyzeCommandTests
{
    private static void AssertCleanFailure(Support.Cli.Result r, int code, string parent, string outName, params string[] mustContain)
    {
        Assert.Equal(code, r.ExitCode);
        var lines = r.Stderr.Trim().Split('\n');
        Assert.Single(lines);
        foreach (var s in mustContain) Assert.Contains(s, lines[0]);
        Assert.False(Directory.Exists(Path.Combine(parent, outName)), "no output folder after a failure");
        Assert.Empty(Directory.GetDirectories(parent, $".{outName}.partial-*"));
    }

    private static int[] Blob(int w, int h, int x0, int y0, int size, int label)
    {
        var img = new int[w * h];
        for (int y = y0; y < y0 + size; y++) for (int x = x0; x < x0 + size; x++) img[y * w + x] = label;
        return img;
    }

    [Fact]
    public void SynthThenAnalyze_WritesEveryOutputWithProvenance()
    {
        using var d = new TempDir();
        var s = Support.Cli.Run("synth", "ellipses", "--out", d["demo"], "--cells", "6", "--frames", "20", "--seed", "3");
        Assert.Equal(0, s.ExitCode);
        var r = Support.Cli.Run("analyze", d["demo/labels.tif"], "--out", d["run"], "--bootstrap", "100");
        Assert.True(r.ExitCode == 0, r.Stderr);
        foreach (var f in new[] { "summary.json", "cells.csv", "tracks.csv", "spectrum.csv", "profile.csv", "run.json", "floor.json", "spectrum.png", "anisotropy.png", "profile.png",
                                 "autocorrelation.csv", "autocorrelation.png", "sim-params.json" })
            Assert.True(new FileInfo(d[$"run/{f}"]).Length > 0, f);
        var run = JsonNode.Parse(File.ReadAllText(d["run/run.json"]))!;
        var input = run["inputs"]![0]!;
        Assert.Equal("labels.tif", input["name"]!.GetValue<string>());
        Assert.Equal(new FileInfo(d["demo/labels.tif"]).Length, input["bytes"]!.GetValue<long>());
        Assert.Equal(ShapeNoise.Reporting.Provenance.Sha256(d["demo/labels.tif"]), input["sha256"]!.GetValue<string>());
        Assert.Equal(100, run["options"]!["BootstrapResamples"]!.GetValue<int>());
        var sum = JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!;
        Assert.Equal("um", sum["units"]!["length"]!.GetValue<string>());     // from the OME-XML the synth wrote
        Assert.Equal(6, sum["tracks_used"]!.GetValue<int>());
        var header = File.ReadLines(d["run/cells.csv"]).First();
        Assert.Contains("area_um2", header);
        Assert.Contains("time_min", header);
    }

    [Fact]
    public void Analyze_SimFormatToml_WritesTomlInsteadOfJson()
    {
        using var d = new TempDir();
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "4", "--frames", "12");
        var r = Support.Cli.Run("analyze", d["m/labels.tif"], "--out", d["o"], "--sim-format", "toml", "--time-unit", "min", "--bootstrap", "20");
        Assert.True(r.ExitCode == 0, r.Stderr);
        Assert.True(File.Exists(d["o/sim-params.toml"]));
        Assert.False(File.Exists(d["o/sim-params.json"]));
        Assert.Contains("T_definition = \"min\"", File.ReadAllText(d["o/sim-params.toml"]));
    }

    [Fact]
    public void SynthMonolayerThenAnalyze_WritesDefectOutputs()
    {
        using var d = new TempDir();
        var s = Support.Cli.Run("synth", "monolayer", "--out", d["mono"], "--cells", "150", "--frames", "12", "--motion", "tailward");
        Assert.True(s.ExitCode == 0, s.Stderr);
        var truth = JsonNode.Parse(File.ReadAllText(d["mono/truth.json"]))!;
        Assert.Equal("tailward", truth["motion"]!.GetValue<string>());
        Assert.Equal(12, truth["defects"]!.AsArray().Count);
        var r = Support.Cli.Run("analyze", d["mono/labels.tif"], "--out", d["run"], "--bootstrap", "50", "--min-track", "5");
        Assert.True(r.ExitCode == 0, r.Stderr);
        foreach (var f in new[] { "defects.csv", "defect-flow.csv", "defect-flow.png", "headward.png", "defects-frame-000.png", "defects-frame-011.png" })
            Assert.True(new FileInfo(d[$"run/{f}"]).Length > 0, f);
        var header = File.ReadLines(d["run/defects.csv"]).First();
        Assert.StartsWith("frame,time_min,defect_track_id,charge,x_um,y_um,x_px,y_px,head_x,head_y", header);
        Assert.Contains("headward_speed_um_per_min", header);
        var sum = JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!;
        foreach (var k in new[] { "plus_half_defects", "minus_half_defects", "defect_headward_speed", "flow_headward_speed", "fraction_headward" })
            Assert.NotNull(sum[k]);
    }

    [Fact]
    public void Synth_SameSeed_SameBytes()
    {
        using var d = new TempDir();
        Assert.Equal(0, Support.Cli.Run("synth", "ellipses", "--out", d["a"], "--cells", "4", "--frames", "5", "--seed", "9").ExitCode);
        Assert.Equal(0, Support.Cli.Run("synth", "ellipses", "--out", d["b"], "--cells", "4", "--frames", "5", "--seed", "9").ExitCode);
        Assert.Equal(File.ReadAllBytes(d["a/labels.tif"]), File.ReadAllBytes(d["b/labels.tif"]));
        Assert.Equal(File.ReadAllText(d["a/truth.json"]), File.ReadAllText(d["b/truth.json"]));
    }

    [Fact]
    public void Analyze_JsonMode_PrintsSummaryOnly()
    {
        using var d = new TempDir();
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "4", "--frames", "12");
        var r = Support.Cli.Run("analyze", d["m/labels.tif"], "--out", d["o"], "--json", "--bootstrap", "50");
        Assert.Equal(0, r.ExitCode);
        var j = JsonNode.Parse(r.Stdout)!;
        // 4 cells are fewer than the 5 units an interval needs: the estimate object says too_few (docs/statistics.md#minimum-units).
        Assert.Equal("too_few", j["anisotropy"]!["status"]!.GetValue<string>());
        Assert.Equal(j["anisotropy"]!.ToJsonString(), JsonNode.Parse(File.ReadAllText(d["o/summary.json"]))!["anisotropy"]!.ToJsonString());
    }

    [Fact]
    public void Analyze_TruncatedTiff_ExitsWithOneLineAndNoOutput()
    {
        using var d = new TempDir();
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "4", "--frames", "12");
        var bytes = File.ReadAllBytes(d["m/labels.tif"]);
        File.WriteAllBytes(d["cut.tif"], bytes[..(bytes.Length * 2 / 3)]);
        AssertCleanFailure(Support.Cli.Run("analyze", d["cut.tif"], "--out", d["out"]), 2, d.Path, "out", "cut.tif", "truncated");
    }

    [Fact]
    public void Analyze_FloatingPointImage_ExitsWithOneLine()
    {
        using var d = new TempDir();
        TiffWriter.Write(d["f.tif"], 16, 16, [new int[256], new int[256]], TiffWriter.PixelType.Float32);
        AssertCleanFailure(Support.Cli.Run("analyze", d["f.tif"], "--out", d["out"]), 2, d.Path, "out", "f.tif", "floating-point");
    }

    [Fact]
    public void Analyze_AllBackgroundFrame_ExitsWithOneLineAndNoOutput()
    {
        using var d = new TempDir();
        var frames = new List<int[]> { Blob(32, 32, 8, 8, 10, 1), Blob(32, 32, 9, 8, 10, 1), new int[32 * 32], Blob(32, 32, 9, 9, 10, 1) };
        TiffWriter.Write(d["e.tif"], 32, 32, frames);
        AssertCleanFailure(Support.Cli.Run("analyze", d["e.tif"], "--out", d["out"]), 2, d.Path, "out", "e.tif", "frame 3", "empty");
    }

    [Fact]
    public void Analyze_SingleFrame_ExitsWithOneLine()
    {
        using var d = new TempDir();
        TiffWriter.Write(d["one.tif"], 32, 32, [Blob(32, 32, 8, 8, 10, 1)]);
        AssertCleanFailure(Support.Cli.Run("analyze", d["one.tif"], "--out", d["out"]), 2, d.Path, "out", "one.tif", "1 frame");
    }

    [Fact]
    public void Analyze_UnwritableOut_ExitsWithOneLine()
    {
        using var d = new TempDir();
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "4", "--frames", "12");
        File.WriteAllText(d["afile"], "x");
        // A folder below a regular file cannot be created, even by root.
        var r = Support.Cli.Run("analyze", d["m/labels.tif"], "--out", d["afile/out"], "--bootstrap", "10");
        Assert.Equal(3, r.ExitCode);
        Assert.Single(r.Stderr.Trim().Split('\n'));
        Assert.Contains("afile/out", r.Stderr);
    }

    [Fact]
    public void Analyze_MissingInput_ExitsWithOneLine()
    {
        using var d = new TempDir();
        AssertCleanFailure(Support.Cli.Run("analyze", d["nope.tif"], "--out", d["out"]), 2, d.Path, "out", "nope.tif", "no such file");
    }

    [Fact]
    public void Analyze_BadOption_ExitsWithUsageCode()
    {
        using var d = new TempDir();
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "4", "--frames", "12");
        var r = Support.Cli.Run("analyze", d["m/labels.tif"], "--out", d["out"], "--rays", "30");
        Assert.Equal(64, r.ExitCode);
        Assert.Contains("--rays", r.Stderr);
        Assert.False(Directory.Exists(d["out"]));
    }

    [Fact]
    public void Analyze_FloorFromFixedCells_SubtractsTheirFluctuations()
    {
        using var d = new TempDir();
        // Fixed cells: constant ellipses with sub-pixel stage jitter; their measured fluctuation is the noise floor.
        var rng = new Random(8);
        var fixedFrames = new List<int[]>();
        for (int t = 0; t < 20; t++)
        {
            var img = new int[96 * 96];
            for (int c = 0; c < 4; c++)
                Raster.Ellipse(img, 96, 96, 24 + 48 * (c % 2) + rng.NextDouble(), 24 + 48 * (c / 2) + rng.NextDouble(), 14, 9, 0.5 * c, c + 1);
            fixedFrames.Add(img);
        }
        TiffWriter.Write(d["fixed.tif"], 96, 96, fixedFrames);
        Assert.Equal(0, Support.Cli.Run("analyze", d["fixed.tif"], "--out", d["floor"], "--bootstrap", "20").ExitCode);
        Support.Cli.Run("synth", "ellipses", "--out", d["m"], "--cells", "6", "--frames", "20");
        var r = Support.Cli.Run("analyze", d["m/labels.tif"], "--out", d["run"], "--floor-from", d["floor"], "--bootstrap", "20");
        Assert.True(r.ExitCode == 0, r.Stderr);
        var floor = JsonNode.Parse(File.ReadAllText(d["floor/floor.json"]))!;
        var sum = JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!;
        Assert.Equal("--floor-from", sum["floor_source"]!.GetValue<string>());
        double s2 = 0.25; // the synth movie's 0.5 um pixels
        Assert.Equal(floor["var_along_px2"]!.GetValue<double>() * s2, sum["floor_along"]!.GetValue<double>(), 12);
        Assert.Equal(sum["var_along_raw"]!.GetValue<double>() - sum["floor_along"]!.GetValue<double>(), sum["var_along"]!["value"]!.GetValue<double>(), 12);
        var run = JsonNode.Parse(File.ReadAllText(d["run/run.json"]))!;
        Assert.Contains(run["inputs"]!.AsArray(), i => i!["name"]!.GetValue<string>() == "floor.json");
    }
}
