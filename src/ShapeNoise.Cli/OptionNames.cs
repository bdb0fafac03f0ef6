using System.Text.RegularExpressions;

namespace ShapeNoise.Cli;

/// <summary>The command-line flag of each option property. Core's option records name the property in their messages
/// (<c>nameof</c>, e.g. "MaxGapFrames must be >= 0 frames"); the CLI shows the flag the user typed ("--max-gap must be
/// >= 0 frames"). Messages that already name a flag pass through unchanged.</summary>
public static partial class OptionNames
{
    /// <summary>Property name (AnalysisOptions and the stage records) to flag. Only compound names that no plain English
    /// sentence starts with, so a message that is not about a property is left alone.</summary>
    public static readonly IReadOnlyDictionary<string, string> Flags = new Dictionary<string, string>(StringComparer.Ordinal)
    {
        ["Rays"] = "--rays",
        ["MinAreaPx"] = "--min-area",
        ["BorderMarginPx"] = "--border-margin",
        ["MinTrackFrames"] = "--min-track",
        ["MaxGapFrames"] = "--max-gap",
        ["LinkOverlapFraction"] = "--link-overlap",
        ["PixelSizeUm"] = "--pixel-size",
        ["FrameIntervalMin"] = "--frame-interval",
        ["BootstrapResamples"] = "--bootstrap",
        ["MaxLagFrames"] = "--max-lag",
        ["TimeUnit"] = "--time-unit",
        ["CoarseWidth"] = "--coarse",
        ["CoarseSweep"] = "--coarse-sweep",
        ["GridSpacing"] = "--grid",
        ["MaxDisplacementPx"] = "--max-displacement",
        ["NoiseModel"] = "--noise-model",
        ["KeepDrift"] = "--keep-drift",
    };

    [GeneratedRegex(@"\b[A-Z][A-Za-z]+\b")]
    private static partial Regex Identifier();

    /// <summary><paramref name="message"/> with every whole-word property name of <see cref="Flags"/> replaced by its flag.</summary>
    public static string ToFlags(string message)
        => Identifier().Replace(message, m => Flags.TryGetValue(m.Value, out var flag) ? flag : m.Value);
}
