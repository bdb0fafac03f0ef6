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
        [CommandOption("--cells <N>"), Description("Number of cells (default 40; with --from 5 x the tracks of the sim-params, at least 200 and at most 2000, so the re-analysis is more precise than the analysis it checks).")] public int? Cells { get; init; }
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
        [CommandOption("--from <SIM_PARAMS>"), Description("Simulate what a sim-params.json of `analyze` describes: sets the semi-axis sigmas, correlation times, mean size and the scales, renders 2-fold finer and adds the measurement noise the render does not make (docs/sim-params.md#round-trip); --pixel-size / --frame-interval convert a file in um / min whose analysis read them from the movie's metadata.")] public string? From { get; init; }
        [CommandOption("--seed <N>"), Description("Random seed: the same seed gives the same bytes.")] public int Seed { get; init; } = 7;

        public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required") : ValidationResult.Success();
    }

    /// <summary>Cells simulated from a sim-params file when --cells is not given: 5 x its tracks, at least 200 and at most 2000
    /// (docs/sim-params.md#round-trip).</summary>
    internal static int DefaultCellsFrom(int tracks) => Math.Clamp(5 * tracks, 200, 2000);

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var p = s.From is { } path ? ShapeNoise.Reporting.SimulationParameters.Read(path, s.PixelSize, s.FrameInterval) : null;
        var o = new EllipseMovieOptions
        {
            Cells = s.Cells ?? (p is null ? 40 : DefaultCellsFrom(p.Tracks)), Frames = s.Frames, SemiMajorPx = s.A, SemiMinorPx = s.B, SigmaAlongPx = s.SigmaAlong, SigmaAcrossPx = s.SigmaAcross,
            TauFrames = s.Tau, RotationDegPerFrame = s.Rotation, TauThetaFrames = s.TauTheta, DriftPx = s.Drift, Width = s.Width, Height = s.Height,
            PixelSizeUm = s.PixelSize, FrameIntervalMin = s.FrameInterval, Seed = s.Seed,
        };
        System.Text.Json.Nodes.JsonObject? fromBlock = null;
        if (p is not null)
        {
            (o, var noise) = SynthJob.FromSimParams(o, p);
            var inv = System.Globalization.CultureInfo.InvariantCulture;
            AnsiConsole.WriteLine(string.Create(inv, $"from {s.From}: {o.Cells} cells, sigma_a {o.SigmaAlongPx:F3} px, sigma_b {o.SigmaAcrossPx:F3} px, tau_a {o.TauAlongFrames:F2} frames, tau_b {o.TauAcrossFrames:F2} frames, a0 {o.SemiMajorPx:F2} px, b0 {o.SemiMinorPx:F2} px, eta_a {o.NoiseAlongPx:F3} px, eta_b {o.NoiseAcrossPx:F3} px, pixel {o.PixelSizeUm:G4} um, radial sd pole {o.RadialNoisePolePx:F3} px, flank {o.RadialNoiseFlankPx:F3} px")
                + " (render noise e2 " + string.Join(", ", noise.Select(n => string.Create(inv, $"{n.Coordinate} {n.RenderPx2:G3}"))) + " px2)");
            foreach (var n in noise)
                if (SynthJob.ExceedWarning(n, p.PixelSizeUm) is { } w) AnsiConsole.MarkupLineInterpolated($"[yellow]warning:[/] {w}");
            fromBlock = SynthJob.RenderNoiseJson(noise, o.PixelSizeUm * SynthJob.DefaultSupersample, SynthJob.DefaultSupersample, o);
        }
        o = o.Validated();
        var m = SynthJob.Ellipses(o, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite), Environment.GetCommandLineArgs().Skip(1), s.RenderOptions(s.Seed), fromBlock);
        AnsiConsole.MarkupLineInterpolated($"wrote [bold]{Path.Combine(s.Out, "labels.tif")}[/] ({m.Width}x{m.Height} px, {o.Frames} frames, {o.Cells} cells) and truth.json: anisotropy {m.Truth.Anisotropy:F3}, anisotropy_contour {m.Truth.AnisotropyContour:F3}");
        return 0;
    }
}
