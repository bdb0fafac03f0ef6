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

    [CommandOption("--line-width <PX>"), Description("Raw movie: physical junction width (px), rendered by pixel-area coverage of the band around the true contact; default: a one-pixel line on both sides of each label change.")] public double? LineWidth { get; init; }
    [CommandOption("--haze <FRACTION>"), Description("Raw movie: out-of-focus haze (junctions blurred by --haze-sigma), mean level as a fraction of the peak junction signal.")] public double Haze { get; init; }
    [CommandOption("--haze-sigma <PX>"), Description("Raw movie: width of the out-of-focus blur of --haze (px).")] public double HazeSigma { get; init; } = 20;
    [CommandOption("--cytoplasm <FRACTION>"), Description("Raw movie: cytoplasmic marker level as a fraction of the peak junction signal (each cell x 0.75-1.25).")] public double Cytoplasm { get; init; }

    public RawRenderOptions? RenderOptions(int seed) => Raw
        ? new RawRenderOptions { Snr = Snr, PsfSigmaPx = Psf, Illumination = Illumination, Bleach = Bleach, Seed = seed + 1000,
            LineWidthPx = LineWidth, Haze = Haze, HazeSigmaPx = HazeSigma, Cytoplasm = Cytoplasm }.Validated()
        : null;
}
