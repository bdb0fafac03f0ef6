using System.ComponentModel;
using ShapeNoise.Imaging.Reading;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

/// <summary>Options of every command that reads one movie and writes one folder (analyze, segment): the output folder,
/// the plane of a multi-plane file and the scale overrides (docs/inputs.md#dimensions-planes-and-physical-units).</summary>
internal abstract class MovieInputSettings : CommandSettings
{
    [CommandOption("--out <DIR>"), Description("Output folder; written to a temporary folder first, then renamed.")] public string Out { get; init; } = "";
    [CommandOption("--overwrite"), Description("Replace an earlier ShapeNoise output in --out (only a folder whose run.json lists every file in it).")] public bool Overwrite { get; init; }
    [CommandOption("--pixel-size <UM>"), Description("Pixel size (um/px); overrides the movie's metadata and makes pixels square.")] public double? PixelSize { get; init; }
    [CommandOption("--frame-interval <MIN>"), Description("Frame interval (min); overrides the movie's metadata.")] public double? FrameInterval { get; init; }
    [CommandOption("--series <N>"), Description("Series (OME Image) to read, 0-based; needed when the file holds several.")] public int? Series { get; init; }
    [CommandOption("--channel <N>"), Description("Channel to read, 0-based; needed when the file has several.")] public int? Channel { get; init; }
    [CommandOption("-z|--z-plane <N>"), Description("Z plane to read, 0-based; needed when the file has several.")] public int? Z { get; init; }
    [CommandOption("--z-is-time"), Description("The file's z planes (ImageJ 'slices') are time points.")] public bool ZIsTime { get; init; }

    /// <summary>The plane and scale options as a <see cref="MovieSelection"/> (validated).</summary>
    public MovieSelection Selection()
        => new MovieSelection { Series = Series, Channel = Channel, Z = Z, ZIsTime = ZIsTime, PixelSizeUm = PixelSize, FrameIntervalMin = FrameInterval }.Validated();

    /// <inheritdoc/>
    public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required") : ValidationResult.Success();
}
