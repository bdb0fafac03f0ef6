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

    private static readonly string[] Coords = ["L", "W", "along", "across"];

    [Fact]
    public void SynthFrom_DemoSimParams_ReanalysisMatchesWithinTenPercent()
    {
        // Expectation source: issue 14's round-trip criterion - analyse the demo, synthesise from its sim-params.json,
        // analyse again: tau, signal variances and noise variances along and across within 10 % of the parameters the first
        // analysis exported (mean over the seeds below).
        using var d = new TempDir();
        var a1 = Support.Cli.Run("analyze", Path.Combine(Root(), "demo-data", "ellipses", "labels.tif"), "--out", d["a1"], "--bootstrap", "200");
        Assert.True(a1.ExitCode == 0, a1.Stderr);
        var f1 = Fluct(d["a1/sim-params.json"]);
        // Three seeds (not the demo's 7), each 200 cells (the --from default, 5 x the demo's 40 tracks), averaged: one seed's
        // tau scatters by about 4 % (sd over seeds 11-15, docs/sim-params.md#round-trip), the mean of three by about 2.4 %.
        int[] seeds = [11, 12, 13];
        var runs = new List<(JsonNode Fluct, JsonNode Truth, double R0)>();
        foreach (int seed in seeds)
        {
            string sim = d[$"sim{seed}"], a2 = d[$"a2-{seed}"];
            var s = Support.Cli.Run("synth", "ellipses", "--from", d["a1/sim-params.json"], "--seed", $"{seed}", "--out", sim);
            Assert.True(s.ExitCode == 0, s.Stderr);
            // Point values do not depend on the resamples; 20 keep the test short.
            var r = Support.Cli.Run("analyze", Path.Combine(sim, "labels.tif"), "--out", a2, "--bootstrap", "20");
            Assert.True(r.ExitCode == 0, r.Stderr);
            var sp = JsonNode.Parse(File.ReadAllText(Path.Combine(a2, "sim-params.json")))!;
            Assert.Equal("um", sp["units"]!["length"]!.GetValue<string>());
            var truth = JsonNode.Parse(File.ReadAllText(Path.Combine(sim, "truth.json")))!;
            Assert.Equal(200, truth["cells"]!.GetValue<int>());
            Assert.Equal(2, truth["from_sim_params"]!["supersample"]!.GetValue<int>());
            Assert.Equal(0.25, truth["pixel_size_um"]!.GetValue<double>(), 12);   // the demo's 0.5 um / 2
            runs.Add((sp["fluctuations"]!, truth["from_sim_params"]!, sp["scales"]!["R0_um"]!.GetValue<double>()));
        }
        double Mean(Func<(JsonNode Fluct, JsonNode Truth, double R0), double> of) => runs.Average(of);
        double r01 = JsonNode.Parse(File.ReadAllText(d["a1/sim-params.json"]))!["scales"]!["R0_um"]!.GetValue<double>();
        Assert.True(Math.Abs(Mean(r => r.R0) / r01 - 1) < 0.10, $"R0: first {r01:G4}, round trip {Mean(r => r.R0):G4}");
        foreach (var c in Coords)
            foreach (var k in new[] { "tau_min", "variance_um2" })
            {
                double x1 = V(f1, c, k), x2 = Mean(r => V(r.Fluct, c, k));
                Assert.True(Math.Abs(x2 / x1 - 1) < 0.10, $"{c}.{k}: first {x1:G4}, round trip (mean of {seeds.Length} seeds) {x2:G4}");
            }
        // Noise variances along and across: issue 14's 10 %, on the mean of the seeds. synth renders 2-fold finer (its own
        // pixelation, about 1/4 of the demo's, stays below the target) and adds radial noise in the pole / flank sectors for
        // the rest, so the render must not exceed the target there (docs/sim-params.md#round-trip).
        foreach (var c in new[] { "along", "across" })
        {
            double e1 = V(f1, c, "noise_variance_um2"), e2 = Mean(r => V(r.Fluct, c, "noise_variance_um2"));
            Assert.All(runs, r => Assert.False(r.Truth["noise"]![c]!["render_exceeds_target"]!.GetValue<bool>()));
            Assert.True(Math.Abs(e2 / e1 - 1) < 0.10, $"{c}.noise_variance: first {e1:G4}, round trip (mean of {seeds.Length} seeds) {e2:G4}");
        }
        // L and W: the demo's e2_L and e2_W are 0 (at the bound; ci95 [0, 0.049] and [0, 0.010] um2), and a rendered outline
        // always has some pixelation there, so 10 % of 0 cannot be met. Where the render alone exceeds the target synth must
        // say so, and the round trip must lie inside the first analysis' 95 % interval (its own uncertainty); where it does
        // not (no seed exceeds), 10 % (or exactly 0 for a target of 0).
        foreach (var c in new[] { "L", "W" })
        {
            double e1 = V(f1, c, "noise_variance_um2"), e2 = Mean(r => V(r.Fluct, c, "noise_variance_um2"));
            bool exceeds = runs.Any(r => r.Truth["noise"]![c]!["render_exceeds_target"]!.GetValue<bool>());
            if (!exceeds)
            {
                Assert.True(e1 > 0 ? Math.Abs(e2 / e1 - 1) < 0.10 : e2 == 0, $"{c}.noise_variance: first {e1:G4}, round trip {e2:G4}");
                continue;
            }
            Assert.All(runs.Where(r => r.Truth["noise"]![c]!["render_exceeds_target"]!.GetValue<bool>()),
                r => Assert.Contains(r.Truth["warnings"]!.AsArray(), w => w!.GetValue<string>().Contains($"noise of {c} ")));
            var ci = f1[c]!["noise_variance_um2"]!["ci95"]!;
            double lo = ci[0]!.GetValue<double>(), hi = ci[1]!.GetValue<double>();
            Assert.True(lo <= e2 && e2 <= hi, $"{c}.noise_variance: first {e1:G4} [{lo:G4}, {hi:G4}], round trip {e2:G4}");
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
