using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>
/// The speed work must not change the numbers: summary.json of the two bundled demo movies, recorded before any
/// optimisation (Fixtures/, written by the commit that added this test), must be reproduced. Tolerance: 1e-9 relative,
/// room for summation order under parallel loops, nothing more. Re-recorded once, on 2026-12-04, when the pooled lag
/// sums became exact (docs/statistics.md#how-a-resample-is-pooled): at most 1.5e-8 relative on four values (fitted
/// minima are located to about sqrt(eps)), under 1e-9 on the rest.
/// </summary>
public class RegressionTests
{
    private static string Root()
    {
        var d = new DirectoryInfo(AppContext.BaseDirectory);
        while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
        return d!.FullName;
    }

    private static void Compare(JsonNode? expected, JsonNode? actual, string path, ref int count)
    {
        switch (expected)
        {
            case JsonObject o:
                foreach (var (k, v) in o)
                {
                    if (k is "tool_version" or "warnings") continue;
                    Compare(v, actual?[k], $"{path}.{k}", ref count);
                }
                break;
            case JsonArray a:
                for (int i = 0; i < a.Count; i++) Compare(a[i], actual?.AsArray()[i], $"{path}[{i}]", ref count);
                break;
            case JsonValue v when v.TryGetValue<double>(out var x):
                Assert.True(actual is not null, $"{path} missing");
                double y = actual!.GetValue<double>();
                Assert.True(Math.Abs(x - y) <= 1e-9 * Math.Max(1, Math.Abs(x)), $"{path}: recorded {x:R}, now {y:R}");
                count++;
                break;
            case JsonValue v:
                Assert.Equal(v.ToJsonString(), actual?.ToJsonString());
                break;
        }
    }

    [Theory]
    [InlineData("ellipses")]
    [InlineData("monolayer")]
    public void Analyze_DemoMovie_ReproducesRecordedSummary(string name)
    {
        string root = Root();
        var expected = JsonNode.Parse(File.ReadAllText(Path.Combine(root, "tests", "ShapeNoise.Core.Tests", "Fixtures", $"demo-{name}-summary.json")))!;
        using var movie = LabelMovies.Open(Path.Combine(root, "demo-data", name, "labels.tif"));
        var actual = JsonNode.Parse(Summary.Build(MovieAnalyzer.Run(movie, new AnalysisOptions())).ToJsonString())!;
        // After an intended change of the numbers: SHAPENOISE_UPDATE_FIXTURES=1 rewrites the fixture (commit the diff).
        if (Environment.GetEnvironmentVariable("SHAPENOISE_UPDATE_FIXTURES") == "1")
            File.WriteAllText(Path.Combine(root, "tests", "ShapeNoise.Core.Tests", "Fixtures", $"demo-{name}-summary.json"), actual.ToJsonString(Summary.Indented));
        int n = 0;
        Compare(expected, actual, name, ref n);
        Assert.True(n > 100, $"only {n} numbers compared");
    }
}
