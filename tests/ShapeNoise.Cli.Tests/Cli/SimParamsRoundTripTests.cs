using System.Text.Json.Nodes;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Cli;

/// <summary>Closing the loop (docs/sim-params.md#round-trip): analyse the bundled ellipse demo, simulate from its
/// sim-params.json with `synth ellipses --from`, analyse the simulation, and compare. The expectation is our own round trip:
/// what we export must be what a simulation needs to reproduce the measured fluctuations.</summary>
public class SimParamsRoundTripTests
{
    private static string Root()
    {
        var d = new DirectoryInfo(AppContext.BaseDirectory);
        while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
        return d!.FullName;
    }

    private static JsonNode Fluct(string simParams) => JsonNode.Parse(File.ReadAllText(simParams))!["fluctuations"]!;
    private static double V(JsonNode f, string c, string k) => f[c]![k]!["value"]!.GetValue<double>();

    [Fact]
    public void SynthFrom_DemoSimParams_ReanalysisMatchesWithinTenPercent()
    {
        using var d = new TempDir();
        var a1 = Support.Cli.Run("analyze", Path.Combine(Root(), "demo-data", "ellipses", "labels.tif"), "--out", d["a1"], "--bootstrap", "200");
        Assert.True(a1.ExitCode == 0, a1.Stderr);
        // 200 cells (5x the demo) so the second analysis' own sampling error (about 10 % on tau for 40 tracks, the demo's
        // ci95) stays well inside the 10 % tolerance; another seed than the demo's so the draws are not the same.
        var s = Support.Cli.Run("synth", "ellipses", "--from", d["a1/sim-params.json"], "--cells", "200", "--seed", "11", "--out", d["sim"]);
        Assert.True(s.ExitCode == 0, s.Stderr);
        var a2 = Support.Cli.Run("analyze", d["sim/labels.tif"], "--out", d["a2"], "--bootstrap", "200");
        Assert.True(a2.ExitCode == 0, a2.Stderr);
        var f1 = Fluct(d["a1/sim-params.json"]); var f2 = Fluct(d["a2/sim-params.json"]);
        Assert.Equal("um", JsonNode.Parse(File.ReadAllText(d["a2/sim-params.json"]))!["units"]!["length"]!.GetValue<string>());
        foreach (var c in new[] { "L", "W", "along", "across" })
            foreach (var k in new[] { "tau_min", "variance_um2" })
            {
                double x1 = V(f1, c, k), x2 = V(f2, c, k);
                Assert.True(Math.Abs(x2 / x1 - 1) < 0.10, $"{c}.{k}: first {x1:G4}, round trip {x2:G4}");
            }
        // Noise variances: the demo's L and W noise is 0 (at the bound) and its along / across noise is the renderer's
        // pixelation, poorly determined from 40 cells (ci95 of along [0, 0.021] um2; the same scenario at 200 cells gives
        // 0.011, 0.015, 0.013 um2 for seeds 11-13, docs/sim-params.md#round-trip), so a 10 % match is not a property the
        // data can show: compare by absolute difference within the first analysis' own 95 % interval upper end.
        foreach (var c in new[] { "L", "W", "along", "across" })
        {
            double e1 = V(f1, c, "noise_variance_um2"), e2 = V(f2, c, "noise_variance_um2");
            double tol = f1[c]!["noise_variance_um2"]!["ci95"]![1]!.GetValue<double>();
            Assert.True(Math.Abs(e2 - e1) <= tol, $"{c}.noise_variance: first {e1:G4}, round trip {e2:G4}, tolerance {tol:G4}");
        }
    }

    [Fact]
    public void SynthFrom_NoiseAboveRenderNoise_ReanalysisRecoversNoiseVariance()
    {
        using var d = new TempDir();
        var a1 = Support.Cli.Run("analyze", Path.Combine(Root(), "demo-data", "ellipses", "labels.tif"), "--out", d["a1"], "--bootstrap", "50");
        Assert.True(a1.ExitCode == 0, a1.Stderr);
        // Invented targets for a recovery test: white measurement noise e2_L = 0.1 um2, e2_W = 0.05 um2 (the demo has none).
        var o = JsonNode.Parse(File.ReadAllText(d["a1/sim-params.json"]))!;
        o["fluctuations"]!["L"]!["noise_variance_um2"]!["value"] = 0.1;
        o["fluctuations"]!["W"]!["noise_variance_um2"]!["value"] = 0.05;
        File.WriteAllText(d["noisy.json"], o.ToJsonString());
        var s = Support.Cli.Run("synth", "ellipses", "--from", d["noisy.json"], "--cells", "200", "--seed", "11", "--out", d["sim"]);
        Assert.True(s.ExitCode == 0, s.Stderr);
        var a2 = Support.Cli.Run("analyze", d["sim/labels.tif"], "--out", d["a2"], "--bootstrap", "200");
        Assert.True(a2.ExitCode == 0, a2.Stderr);
        var f2 = Fluct(d["a2/sim-params.json"]);
        foreach (var (c, target) in new[] { ("L", 0.1), ("W", 0.05) })
        {
            var ci = f2[c]!["noise_variance_um2"]!["ci95"]!;
            double lo = ci[0]!.GetValue<double>(), hi = ci[1]!.GetValue<double>();
            Assert.True(lo <= target && target <= hi, $"{c}: requested e2 {target}, re-analysis 95 % interval [{lo:G4}, {hi:G4}]");
        }
        // The added noise must not leak into the signal: s2_L still within 10 % of the first analysis.
        double s1 = V(Fluct(d["a1/sim-params.json"]), "L", "variance_um2"), s2 = V(f2, "L", "variance_um2");
        Assert.True(Math.Abs(s2 / s1 - 1) < 0.10, $"s2_L first {s1:G4}, with noise {s2:G4}");
    }

    [Theory]
    [InlineData("{\"schema\": \"something-else\"}", "schema")]
    [InlineData("{\"schema\": \"shapenoise.sim-params\", \"units\": {\"length\": \"um\", \"time\": \"min\"}}", "fluctuations")]
    [InlineData("{\"schema\": \"shapenoise.sim-params\", \"units\": {\"length\": \"px\", \"time\": \"frame\"}, \"fluctuations\": {\"L\": {\"tau_frames\": {\"value\": null, \"status\": \"too_few\"}}}}", "fluctuations.L.tau_frames")]
    public void SynthFrom_BadSimParams_FailsWithOneLineNamingKey(string json, string key)
    {
        using var d = new TempDir();
        File.WriteAllText(d["p.json"], json);
        var r = Support.Cli.Run("synth", "ellipses", "--from", d["p.json"], "--out", d["sim"]);
        Assert.Equal(2, r.ExitCode);   // exit code 2 = bad input (ExitCodes.Help)
        var lines = r.Stderr.Trim().Split('\n');
        Assert.Single(lines);
        Assert.Contains("p.json", lines[0]);
        Assert.Contains(key, lines[0]);
        Assert.False(Directory.Exists(d["sim"]));
    }
}
