using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Synthesis;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

internal sealed class SynthMonolayerCommand : Command<SynthMonolayerCommand.Settings>
{
    public sealed class Settings : RawRenderSettings
    {
        [CommandOption("--out <DIR>"), Description("Output folder (labels.tif, truth.json, run.json).")] public string Out { get; init; } = "";
        [CommandOption("--overwrite"), Description("Replace an earlier ShapeNoise output in --out (only a folder whose run.json lists every file in it).")] public bool Overwrite { get; init; }
        [CommandOption("--cells <N>"), Description("Number of cells.")] public int Cells { get; init; } = 600;
        [CommandOption("--frames <N>"), Description("Number of frames.")] public int Frames { get; init; } = 60;
        [CommandOption("--cell-area <PX2>"), Description("Mean cell area (px^2).")] public double CellArea { get; init; } = 250;
        [CommandOption("--aspect <RATIO>"), Description("Aspect ratio of the cells' packing ellipse.")] public double Aspect { get; init; } = 2.0;
        [CommandOption("--separation <FRACTION>"), Description("Initial distance of the +1/2 and -1/2 defects (fraction of the width).")] public double Separation { get; init; } = 0.35;
        [CommandOption("--motion <MOTION>"), Description("Motion of the +1/2 defect: headward, tailward or none.")] public string Motion { get; init; } = "headward";
        [CommandOption("--defect-speed <PX>"), Description("Speed of the +1/2 defect (px per frame).")] public double DefectSpeed { get; init; } = 0.4;
        [CommandOption("--flow <KIND>"), Description("Tissue flow carrying the cells: uniform (default; at --flow-speed, 0 = still), flock (--flow-speed plus a weak random field, --flow-noise) or swirl (an incompressible random field of one wavelength, --flow-rms); flock and swirl use a periodic canvas and carry the defects with the tissue (docs/motion.md#synthetic-flows).")] public string Flow { get; init; } = "uniform";
        [CommandOption("--flow-speed <PX>"), Description("Speed of the uniform flow or of the flock (px per frame).")] public double FlowSpeed { get; init; }
        [CommandOption("--flow-angle <DEG>"), Description("Direction of the uniform flow or of the flock relative to the +1/2 head (degrees).")] public double FlowAngle { get; init; }
        [CommandOption("--flow-noise <REL>"), Description("--flow flock: rms speed of the random field relative to --flow-speed (default 0.3).")] public double? FlowNoise { get; init; }
        [CommandOption("--flow-rms <PX>"), Description("--flow swirl: rms speed of the field (px per frame; default 0.4).")] public double? FlowRms { get; init; }
        [CommandOption("--flow-wavelength <PX>"), Description("--flow flock or swirl: wavelength of the random field (px; default 9 cell diameters).")] public double? FlowWavelength { get; init; }
        [CommandOption("--flow-tau <FRAMES>"), Description("--flow flock or swirl: correlation time of the random field at a fixed point (frames; default 20).")] public double? FlowTau { get; init; }
        [CommandOption("--sigma-along <REL>"), Description("Relative shape noise along the long axis.")] public double SigmaAlong { get; init; } = 0.12;
        [CommandOption("--sigma-across <REL>"), Description("Relative shape noise across the long axis.")] public double SigmaAcross { get; init; } = 0.06;
        [CommandOption("--tau <FRAMES>"), Description("Correlation time of the shape noise (frames; along and across the long axis unless --tau-across is given).")] public double Tau { get; init; } = 5;
        [CommandOption("--tau-across <FRAMES>"), Description("Correlation time of the shape noise across the long axis (frames; default --tau).")] public double? TauAcross { get; init; }
        /// <summary>Spatial correlation length of the shape noise (px); 0 = independent cells.</summary>
        [CommandOption("--noise-correlation <PX>"), Description("Spatial correlation length of the shape noise (px); 0 = independent cells.")] public double NoiseCorrelation { get; init; }
        [CommandOption("--width <PX>"), Description("Canvas width (0 = square, fit the cells).")] public int Width { get; init; }
        [CommandOption("--height <PX>"), Description("Canvas height (0 = square, fit the cells).")] public int Height { get; init; }
        [CommandOption("--pixel-size <UM>"), Description("Pixel size written to the OME-XML (um/px).")] public double PixelSize { get; init; } = 0.5;
        [CommandOption("--frame-interval <MIN>"), Description("Frame interval written to the OME-XML (min).")] public double FrameInterval { get; init; } = 5;
        [CommandOption("--pairs <N>"), Description("Number of +1/2 / -1/2 defect pairs (more than 1: a many-defect tissue whose regions differ in shape-noise anisotropy).")] public int Pairs { get; init; } = 1;
        [CommandOption("--hypothesis <BOOL>"), Description("With --pairs > 1: true = each +1/2 moves headward or tailward at a speed following its region's anisotropy; false = speeds independent of anisotropy.")] public string Hypothesis { get; init; } = "true";
        [CommandOption("--anisotropy-spread <G>"), Description("With --pairs > 1: regions multiply var_L/var_W by G^(2z), z in [[-1, 1]].")] public double AnisotropySpread { get; init; } = 1.6;
        [CommandOption("--from <SIM_PARAMS>"), Description("Simulate the shape noise a sim-params.json of `analyze` describes: sets --sigma-along, --sigma-across, --tau, --tau-across, --cell-area and the scales (docs/sim-params.md#monolayer-round-trip); --aspect is kept; --pixel-size / --frame-interval convert a file in um / min whose analysis read them from the movie's metadata.")] public string? From { get; init; }
        [CommandOption("--seed <N>"), Description("Random seed: the same seed gives the same bytes.")] public int Seed { get; init; } = 11;

        public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required") : ValidationResult.Success();
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var motion = s.Motion.ToLowerInvariant() switch
        {
            "headward" => DefectMotion.Headward, "tailward" => DefectMotion.Tailward, "none" => DefectMotion.None,
            _ => throw new ArgumentException($"--motion must be headward, tailward or none (got '{s.Motion}')"),
        };
        var flow = s.Flow.ToLowerInvariant() switch
        {
            "uniform" => TissueFlow.Uniform, "flock" => TissueFlow.Flock, "swirl" => TissueFlow.Swirl,
            _ => throw new ArgumentException($"--flow must be uniform, flock or swirl (got '{s.Flow}')"),
        };
        bool follows = s.Hypothesis.ToLowerInvariant() switch
        {
            "true" => true, "false" => false,
            _ => throw new ArgumentException($"--hypothesis must be true or false (got '{s.Hypothesis}')"),
        };
        var o = new MonolayerMovieOptions
        {
            Cells = s.Cells, Frames = s.Frames, CellAreaPx2 = s.CellArea, Aspect = s.Aspect, Separation = s.Separation, Motion = motion,
            DefectSpeedPx = s.DefectSpeed, FlowSpeedPx = s.FlowSpeed, FlowAngleDeg = s.FlowAngle, SigmaAlong = s.SigmaAlong,
            SigmaAcross = s.SigmaAcross, TauFrames = s.Tau, NoiseCorrelationPx = s.NoiseCorrelation, Width = s.Width, Height = s.Height, PixelSizeUm = s.PixelSize,
            FrameIntervalMin = s.FrameInterval, Seed = s.Seed, Pairs = s.Pairs, SpeedFollowsAnisotropy = follows, AnisotropySpread = s.AnisotropySpread,
            Flow = flow, FlowNoise = s.FlowNoise, FlowRmsPx = s.FlowRms, FlowWavelengthPx = s.FlowWavelength, FlowTauFrames = s.FlowTau,
            TauAcrossFrames = s.TauAcross,
        }.Validated();
        if (s.From is { } from)
        {
            var p = ShapeNoise.Reporting.SimulationParameters.Read(from, s.PixelSize, s.FrameInterval);
            o = SynthJob.MonolayerFromSimParams(o, p);
            AnsiConsole.WriteLine(System.FormattableString.Invariant($"from {from}: sigma_along {o.SigmaAlong:F4}, sigma_across {o.SigmaAcross:F4}, tau {o.TauFrames:F2} frames, tau_across {o.TauAcrossFrames:F2} frames, cell area {o.CellAreaPx2:F1} px2 (aspect {o.Aspect} kept; measurement noise not mapped)"));
        }
        var m = SynthJob.Monolayer(o, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite), Environment.GetCommandLineArgs().Skip(1), s.RenderOptions(s.Seed));
        AnsiConsole.MarkupLineInterpolated($"wrote [bold]{Path.Combine(s.Out, "labels.tif")}[/] ({m.Width}x{m.Height} px, {o.Frames} frames, {m.Truth.Cells} cells, {(o.Pairs > 1 ? $"{o.Pairs} defect pairs, speeds {(o.SpeedFollowsAnisotropy ? "following" : "independent of")} anisotropy" : $"+1/2 moving {o.Motion.ToString().ToLowerInvariant()}")}) and truth.json");
        return 0;
    }
}
