using System.Text.Json.Nodes;
using System.Text.Json.Serialization;

namespace ShapeNoise.Cli.Jobs;

/// <summary>The option records as run.json writes them: every public property by name, enums as their names. Generated at
/// build time (System.Text.Json source generation) rather than by reflection, so the ahead-of-time compiled command
/// (scripts/publish.sh) writes the same bytes as the JIT-compiled one.</summary>
[JsonSourceGenerationOptions(UseStringEnumConverter = true)]
[JsonSerializable(typeof(Pipeline.AnalysisOptions))]
[JsonSerializable(typeof(Synthesis.EllipseMovieOptions))]
[JsonSerializable(typeof(Synthesis.MonolayerMovieOptions))]
[JsonSerializable(typeof(Imaging.Segmentation.SegmentOptions))]
internal sealed partial class OptionsJson : JsonSerializerContext
{
    /// <summary>The options record <paramref name="options"/> as a JSON object for run.json.</summary>
    public static JsonNode Node<T>(T options) where T : class =>
        System.Text.Json.JsonSerializer.SerializeToNode(options, typeof(T), Default)
        ?? throw new InvalidOperationException($"{typeof(T).Name} serialised to null");
}
