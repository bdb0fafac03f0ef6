using System.Reflection;
using System.Security.Cryptography;
using System.Text.Json.Nodes;

namespace ShapeNoise.Reporting;

/// <summary>Provenance of a run (run.json): tool version, options, inputs with sizes and SHA-256.</summary>
public static class Provenance
{
    /// <summary>Version of the ShapeNoise library.</summary>
    public static string ToolVersion =>
        typeof(Provenance).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion?.Split('+')[0]
        ?? typeof(Provenance).Assembly.GetName().Version?.ToString() ?? "unknown";

    /// <summary>SHA-256 of a file, lower-case hex.</summary>
    public static string Sha256(string file)
    {
        using var fs = File.OpenRead(file);
        return Convert.ToHexStringLower(SHA256.HashData(fs));
    }

    /// <summary>run.json's "movie" block: the container, the plane read, the scale used and where each value came from
    /// ("option", "OME-XML", "ImageJ header", "TIFF resolution tags", "none"), and any square-pixel resampling.</summary>
    public static JsonObject Movie(ShapeNoise.Reading.MovieInfo info, double? pixelSizeUm, string pixelSizeSource, double? frameIntervalMin, string frameIntervalSource)
        => new()
        {
            ["format"] = info.Format,
            ["plane"] = info.Plane,
            ["width_px"] = info.Width,
            ["height_px"] = info.Height,
            ["frames"] = info.FrameCount,
            ["pixel_size_um"] = pixelSizeUm,
            ["pixel_size_source"] = pixelSizeSource,
            ["frame_interval_min"] = frameIntervalMin,
            ["frame_interval_source"] = frameIntervalSource,
            ["resampling"] = info.Resampling,
        };

    /// <summary>Builds run.json's content.</summary>
    public static JsonObject Describe(string command, IEnumerable<string> inputFiles, JsonNode options, IEnumerable<string>? commandLine = null)
    {
        var inputs = new JsonArray();
        foreach (var f in inputFiles)
        {
            var fi = new FileInfo(f);
            inputs.Add((JsonNode)new JsonObject { ["name"] = fi.Name, ["path"] = fi.FullName, ["bytes"] = fi.Length, ["sha256"] = Sha256(f) });
        }
        return new JsonObject
        {
            ["tool"] = "shapenoise",
            ["version"] = ToolVersion,
            ["command"] = command,
            ["command_line"] = commandLine is null ? null : new JsonArray(commandLine.Select(a => (JsonNode?)JsonValue.Create(a)).ToArray()),
            ["options"] = options,
            ["inputs"] = inputs,
            ["runtime"] = System.Runtime.InteropServices.RuntimeInformation.FrameworkDescription,
            ["os"] = System.Runtime.InteropServices.RuntimeInformation.OSDescription,
            ["finished_utc"] = DateTime.UtcNow.ToString("yyyy-MM-ddTHH:mm:ssZ"),
        };
    }
}
