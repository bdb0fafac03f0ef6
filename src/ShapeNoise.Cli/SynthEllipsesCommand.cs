using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Synthesis;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

internal sealed class SynthEllipsesCommand : Command<SynthEllipsesCommand.Settings>
{
    public sealed class Settings : RawRenderSettings
    {
        [CommandOption("--out <DIR>"), Description("Output folder (labels.tif, truth.json, run.json).")] public string Out { get; init; } = "";
        [CommandOption("--overwrite"), Description("Replace an earlier ShapeNoise output in --out (only a folder whose run.json lists every file in it).")] public bool Overwrite { get; init; }
        [CommandOption("--cells <N>"), Description("Number of cells.")] public int Cells { get; init; } = 40;
        [CommandOption("--frames <N>"), Description("Number of frames.")] public int Frames { get; init; } = 80;
        [CommandOption("--semi-major <PX>"), Description("Mean semi-major axis a0 (px).")] public double A { get; init; } = 14;
        [CommandOption("--semi-minor <PX>"), Description("Mean semi-minor axis b0 (px).")] public double B { get; init; } = 9;
        [CommandOption("--sigma-along <PX>"), Description("Standard deviation of a(t) (px).")] public double SigmaAlong { get; init; } = 1.0;
        [CommandOption("--sigma-across <PX>"), Description("Standard deviation of b(t) (px).")] public double SigmaAcross { get; init; } = 0.5;
        [CommandOption("--tau <FRAMES>"), Description("Correlation time of the semi-axes (frames).")] public double Tau { get; init; } = 5;
        [CommandOption("--rotation <DEG>"), Description("Steady axis rotation per frame (degrees).")] public double Rotation { get; init; }
        [CommandOption("--tau-theta <FRAMES>"), Description("Orientation correlation time under rotational diffusion (frames; 0 = none).")] public double TauTheta { get; init; } = 40;
        [CommandOption("--drift <PX>"), Description("Standard deviation of the centre's slow drift (px).")] public double Drift { get; init; } = 1.5;
        [CommandOption("--width <PX>"), Description("Canvas width (0 = fit the cells).")] public int Width { get; init; }
        [CommandOption("--height <PX>"), Description("Canvas height (0 = fit the cells).")] public int Height { get; init; }
        [CommandOption("--pixel-size <UM>"), Description("Pixel size written to the OME-XML (um/px).")] public double PixelSize { get; init; } = 0.5;
        [CommandOption("--frame-interval <MIN>"), Description("Frame interval written to the OME-XML (min).")] public double FrameInterval { get; init; } = 2;
        [CommandOption("--from <SIM_PARAMS>"), Description("Simulate what a sim-params.json of `analyze` describes: sets the semi-axis sigmas, correlation times, measurement noise, mean size and the scales (docs/sim-params.md#round-trip); --pixel-size / --frame-interval convert a file in um / min whose analysis read them from the movie's metadata.")] public string? From { get; init; }
        [CommandOption("--seed <N>"), Description("Random seed: the same seed gives the same bytes.")] public int Seed { get; init; } = 7;

        public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required") : ValidationResult.Success();
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var o = new EllipseMovieOptions
        {
            Cells = s.Cells, Frames = s.Frames, SemiMajorPx = s.A, SemiMinorPx = s.B, SigmaAlongPx = s.SigmaAlong, SigmaAcrossPx = s.SigmaAcross,
            TauFrames = s.Tau, RotationDegPerFrame = s.Rotation, TauThetaFrames = s.TauTheta, DriftPx = s.Drift, Width = s.Width, Height = s.Height,
            PixelSizeUm = s.PixelSize, FrameIntervalMin = s.FrameInterval, Seed = s.Seed,
        };
        if (s.From is { } from)
        {
            var p = ShapeNoise.Reporting.SimulationParameters.Read(from, s.PixelSize, s.FrameInterval);
            (o, double eL, double eW) = SynthJob.FromSimParams(o, p);
            AnsiConsole.WriteLine($"from {from}: sigma_a {o.SigmaAlongPx:F3} px, sigma_b {o.SigmaAcrossPx:F3} px, tau_a {o.TauAlongFrames:F2} frames, tau_b {o.TauAcrossFrames:F2} frames, a0 {o.SemiMajorPx:F2} px, b0 {o.SemiMinorPx:F2} px, eta_a {o.NoiseAlongPx:F3} px, eta_b {o.NoiseAcrossPx:F3} px" + (double.IsFinite(eL) ? $" (render noise e2_L {eL:G3}, e2_W {eW:G3} px2)" : "").ToString(System.Globalization.CultureInfo.InvariantCulture));
        }
        o = o.Validated();
        var m = SynthJob.Ellipses(o, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite), Environment.GetCommandLineArgs().Skip(1), s.RenderOptions(s.Seed));
        AnsiConsole.MarkupLineInterpolated($"wrote [bold]{Path.Combine(s.Out, "labels.tif")}[/] ({m.Width}x{m.Height} px, {o.Frames} frames, {o.Cells} cells) and truth.json: anisotropy {m.Truth.Anisotropy:F3}, anisotropy_contour {m.Truth.AnisotropyContour:F3}");
        return 0;
    }
}
