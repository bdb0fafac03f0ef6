using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Synthesis;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

/// <summary>Options shared by the synth commands for rendering the raw junction-marker movie.</summary>
internal class RawRenderSettings : CommandSettings
{
    [CommandOption("--raw"), Description("Also render raw.tif: the junction-marker movie of the tissue (truth labels kept in labels.tif).")] public bool Raw { get; init; }
    [CommandOption("--snr <RATIO>"), Description("Raw movie: junction signal over noise sd.")] public double Snr { get; init; } = 8;
    [CommandOption("--psf <PX>"), Description("Raw movie: Gaussian point-spread sigma (px).")] public double Psf { get; init; } = 1.2;
    [CommandOption("--illumination <FRACTION>"), Description("Raw movie: relative illumination falloff across the field.")] public double Illumination { get; init; } = 0.3;
    [CommandOption("--bleach <FRACTION>"), Description("Raw movie: fraction of signal bleached by the last frame.")] public double Bleach { get; init; } = 0.3;

    public RawRenderOptions? RenderOptions(int seed) => Raw
        ? new RawRenderOptions { Snr = Snr, PsfSigmaPx = Psf, Illumination = Illumination, Bleach = Bleach, Seed = seed + 1000 }.Validated()
        : null;
}
