using System.Text.Json.Nodes;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Tomlyn.Model;

namespace ShapeNoise.Tests.Reporting;

public class SimulationParametersTests
{
    private static readonly AnalysisResult Result = MovieAnalyzer.Run(
        MemoryMovie.Of(EllipseMovie.Generate(new EllipseMovieOptions { Cells = 10, Frames = 40, Seed = 4 }), withUnits: true),
        new AnalysisOptions { BootstrapResamples = 100 });

    private static readonly JsonObject Prov = Provenance.Describe("analyze", [], new JsonObject());

    /// <summary>Every number found at the same path in both documents must be equal.</summary>
    private static int CompareNumbers(JsonNode? a, JsonNode? b, string path)
    {
        int n = 0;
        switch (a)
        {
            case JsonObject oa:
                foreach (var (k, v) in oa) n += CompareNumbers(v, b?[k], $"{path}.{k}");
                break;
            case JsonArray aa:
                for (int i = 0; i < aa.Count; i++) n += CompareNumbers(aa[i], b?.AsArray()[i], $"{path}[{i}]");
                break;
            case JsonValue va when va.TryGetValue<double>(out var x):
                Assert.True(b is not null, $"{path} missing");
                Assert.Equal(x, b!.GetValue<double>());
                n++;
                break;
        }
        return n;
    }

    [Fact]
    public void Json_RoundTrip_EveryNumberEqualsSummary()
    {
        var sim = JsonNode.Parse(SimulationParameters.Build(Result, Prov).ToJsonString())!.AsObject();
        var sum = JsonNode.Parse(Summary.Build(Result).ToJsonString())!.AsObject();
        Assert.Equal(1, sim["schema_version"]!.GetValue<int>());
        int n = CompareNumbers(sim["coordinates"], sum["dynamics"]!["coordinates"], "coordinates")
              + CompareNumbers(sim["elongation_q"], sum["dynamics"]!["elongation_q"], "elongation_q")
              + CompareNumbers(sim["orientation"], sum["dynamics"]!["orientation"], "orientation")
              + CompareNumbers(sim["scales"], sum["dynamics"]!["scales"], "scales")
              + CompareNumbers(sim["noise_anisotropy"], sum["anisotropy"], "anisotropy")
              + CompareNumbers(sim["elongation_q"]!["tau_min"], sum["tau_q"], "tau_q")
              + CompareNumbers(sim["orientation"]!["tau_theta_min"], sum["tau_theta"], "tau_theta");
        Assert.True(n > 60, $"only {n} numbers compared");
    }

    [Fact]
    public void Json_Dimensionless_AreOverR0AndT()
    {
        var sim = SimulationParameters.Build(Result, Prov);
        double R0 = sim["scales"]!["R0_um"]!.GetValue<double>(), T = sim["scales"]!["T_min"]!.GetValue<double>();
        Assert.Equal(sim["elongation_q"]!["tau_min"]!["value"]!.GetValue<double>(), T, 12);   // default time unit: tau_q
        var len = sim["coordinates"]!["length"]!;
        double v = len["variance_um2"]!["value"]!.GetValue<double>(), tau = len["tau_min"]!["value"]!.GetValue<double>(), D = len["D_um2_per_min"]!["value"]!.GetValue<double>();
        Assert.Equal(v / tau, D, 12);                                                          // var = D tau
        Assert.Equal(v / (R0 * R0), len["dimensionless"]!["variance_over_R0_squared"]!["value"]!.GetValue<double>(), 12);
        Assert.Equal(tau / T, len["dimensionless"]!["tau_over_T"]!["value"]!.GetValue<double>(), 12);
        Assert.Equal(D * T / (R0 * R0), len["dimensionless"]!["D_times_T_over_R0_squared"]!["value"]!.GetValue<double>(), 12);
    }

    [Fact]
    public void Toml_RoundTrip_SameNumbersAsJson()
    {
        // Reference library: Tomlyn parses what we wrote back into a TOML table.
        var sim = SimulationParameters.Build(Result, Prov);
        var toml = SimulationParameters.ToToml(sim);
        var table = (TomlTable)Tomlyn.TomlSerializer.Deserialize(toml, typeof(TomlTable), (Tomlyn.TomlSerializerOptions?)null)!;
        var len = (TomlTable)((TomlTable)table["coordinates"])["length"];
        var tau = (TomlTable)len["tau_min"];
        Assert.Equal(sim["coordinates"]!["length"]!["tau_min"]!["value"]!.GetValue<double>(), (double)tau["value"]);
        Assert.Equal(sim["noise_anisotropy"]!["value"]!.GetValue<double>(), (double)((TomlTable)table["noise_anisotropy"])["value"]);
        Assert.Equal("shapenoise.sim-params", (string)table["schema"]);
    }
}
