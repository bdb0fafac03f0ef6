using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Imaging.Segmentation;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

internal sealed class SegmentCommand : Command<SegmentCommand.Settings>
{
    public sealed class Settings : MovieInputSettings
    {
        [CommandArgument(0, "<RAW>"), Description("Raw junction/membrane-marker movie: 8- or 16-bit single-channel TIFF stack or folder of frames.")] public string Input { get; init; } = "";
        [CommandOption("--cell-diameter <UM>"), Description("Expected cell diameter (um; px if the pixel size is unknown). Every segmentation length derives from it.")] public double CellDiameter { get; init; } = 10;
        [CommandOption("--flatten <DIAMETERS>"), Description("Background flattening: divide by a Gaussian blur this many cell diameters wide.")] public double Flatten { get; init; } = 2;
        [CommandOption("--smooth <FRACTION>"), Description("Smoothing sigma for seeds, as a fraction of the cell diameter.")] public double Smooth { get; init; } = 0.1;
        [CommandOption("--seed-window <FRACTION>"), Description("Seeds: minima over a window of this fraction of the cell diameter.")] public double SeedWindow { get; init; } = 0.9;
        [CommandOption("--boundary-sigma <PX>"), Description("Smoothing (px) of the image the watershed floods.")] public double BoundarySigma { get; init; } = 0.6;
        [CommandOption("--min-area-fraction <FRACTION>"), Description("Fragments below this fraction of the expected cell area are merged into a neighbour.")] public double MinAreaFraction { get; init; } = 0.15;
        [CommandOption("--max-area-factor <FACTOR>"), Description("Regions above this many expected cell areas are not cells and are dropped.")] public double MaxAreaFactor { get; init; } = 6;
        [CommandOption("--seeds <METHOD>"), Description("Seed method: hminima (minima deeper than --seed-depth noise sd; default), laplacian (the same on the Laplacian of Gaussian at --seed-scale: finds cells whose junctions the blur has flattened) or window (minima over --seed-window).")] public string Seeds { get; init; } = "hminima";
        [CommandOption("--seed-scale <FRACTION>"), Description("laplacian seeds: scale of the Laplacian of Gaussian, as a fraction of the cell diameter.")] public double SeedScale { get; init; } = new SegmentOptions().SeedScaleFraction;
        [CommandOption("--seed-depth <SD>"), Description("hminima seeds: a minimum is a seed when it is at least this many noise sd (measured, of the smoothed image) below the pass to a deeper one (default 2; 1 with --model-fit; 1.5 for laplacian seeds).")] public double? SeedDepth { get; init; }
        [CommandOption("--ridge-contrast <SD>"), Description("Neighbouring regions whose shared boundary rises less than this many noise sd above the brighter interior are merged (0 = never).")] public double RidgeContrast { get; init; } = new SegmentOptions().RidgeContrastSd;
        [CommandOption("--ridge-passes <N>"), Description("Passes moving boundary pixels on a crest's flank to its far side (0 = off, the default).")] public int RidgePasses { get; init; }
        [CommandOption("--track-seeds"), Description("Seed each frame with the previous frame's cells shrunk by --track-erosion diameters (steadier boundaries and counts on slowly moving tissue).")] public bool TrackSeeds { get; init; }
        [CommandOption("--track-erosion <FRACTION>"), Description("With --track-seeds: shrink the previous cells by this fraction of the diameter.")] public double TrackErosion { get; init; } = 0.25;
        [CommandOption("--deconvolve <PX>"), Description("Sd (px) of your microscope's Gaussian point-spread function: the image the watershed floods is deconvolved with it (Richardson-Lucy, kernel at most 1.5 px; the seeds are not); 0 = off (default).")] public double Deconvolve { get; init; }
        [CommandOption("--deconvolve-iterations <N>"), Description("Richardson-Lucy iterations with --deconvolve.")] public int DeconvolveIterations { get; init; } = new SegmentOptions().DeconvolveIterations;
        [CommandOption("--model-fit"), Description("Add a last step: fit a blurred-junction model to the image, moving boundary pixels and merging cells whose shared boundary the signal does not support (better on small or blurred cells; boundaries less steady from frame to frame).")] public bool ModelFit { get; init; }
        [CommandOption("--fit-prior <BETA>"), Description("Model fit: cost of one pixel of boundary length, in log-likelihood units (higher = smoother boundaries).")] public double FitPrior { get; init; } = new SegmentOptions().ModelFitBeta;
        [CommandOption("--merge-margin <LOGL>"), Description("Model fit: merge two neighbouring cells when dropping their shared boundary improves the log-likelihood by more than this (negative = never).")] public double MergeMargin { get; init; } = new SegmentOptions().ModelMergeMargin;
        [CommandOption("--marginal-sweeps <N>"), Description("With --model-fit: sample the fitted model for N sweeps and give each pixel the label it held most often (steadier, more accurate boundaries on noisy or blurred images; about 2 ms per sweep per 100 x 100 px; 300 is a good start; 0 = off, the default).")] public int MarginalSweeps { get; init; }
        [CommandOption("--marginal-temperature <T>"), Description("With --marginal-sweeps: temperature of the sampling (the model's log-likelihood and prior divided by T).")] public double MarginalTemperature { get; init; } = new SegmentOptions().MarginalTemperature;
        [CommandOption("--qc-every <N>"), Description("Write a QC overlay every N frames (0 = none).")] public int QcEvery { get; init; } = 10;
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        (int Frames, double MeanCells) result = default;
        void Go(IProgress<(int, int)>? p) => result = SegmentJob.Run(s.Input, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite, [s.Input]), new SegmentOptions
        {
            CellDiameterUm = s.CellDiameter, FlattenDiameters = s.Flatten, SmoothFraction = s.Smooth, SeedWindowFraction = s.SeedWindow,
            BoundarySigmaPx = s.BoundarySigma, MinAreaFraction = s.MinAreaFraction, MaxAreaFactor = s.MaxAreaFactor,
            Seeds = SeedMethodOption.Parse(s.Seeds), SeedScaleFraction = s.SeedScale,
            SeedDepthSd = s.SeedDepth, RidgeContrastSd = s.RidgeContrast, RidgePasses = s.RidgePasses, TrackSeeds = s.TrackSeeds, TrackErosionFraction = s.TrackErosion,
            DeconvolveSigmaPx = s.Deconvolve, DeconvolveIterations = s.DeconvolveIterations,
            ModelFit = s.ModelFit, ModelFitBeta = s.FitPrior, ModelMergeMargin = s.MergeMargin,
            MarginalSweeps = s.MarginalSweeps, MarginalTemperature = s.MarginalTemperature,
        }, s.PixelSize, s.FrameInterval, s.QcEvery, Environment.GetCommandLineArgs().Skip(1), p,
            s.Selection());
        if (Console.IsOutputRedirected) Go(null);
        else AnsiConsole.Progress()
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn())
            .Start(ctx => { var task = ctx.AddTask("segmenting frames"); Go(new Inline(task)); });
        var (frames, cells) = result;
        AnsiConsole.MarkupLineInterpolated($"segmented {frames} frames ({cells:F0} cells per frame) into [bold]{Path.Combine(s.Out, "labels.tif")}[/]");
        return 0;
    }
}

/// <summary>The --seeds option of segment and analyze --raw.</summary>
internal static class SeedMethodOption
{
    public static SeedMethod Parse(string value) => value.ToLowerInvariant() switch
    {
        "hminima" => SeedMethod.HMinima,
        "laplacian" => SeedMethod.Laplacian,
        "window" => SeedMethod.Window,
        _ => throw new ArgumentException($"--seeds must be hminima, laplacian or window (got {value})"),
    };
}

/// <summary>Reports (done, total) on the calling thread.</summary>
internal sealed class Inline(ProgressTask task) : IProgress<(int Done, int Total)>
{
    public void Report((int Done, int Total) x) { task.MaxValue = x.Total; task.Value = x.Done; }
}

internal sealed class ScoreCommand : Command<ScoreCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandArgument(0, "<LABELS>"), Description("Segmented label movie.")] public string Labels { get; init; } = "";
        [CommandArgument(1, "<TRUTH>"), Description("Reference label movie of the same size.")] public string Truth { get; init; } = "";
        [CommandOption("--json"), Description("Print the scores as JSON.")] public bool Json { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var sc = SegmentJob.Score(s.Labels, s.Truth);
        if (s.Json)
        {
            Console.WriteLine(new System.Text.Json.Nodes.JsonObject
            {
                ["seg"] = sc.Seg, ["f1"] = sc.F1, ["precision"] = sc.Precision, ["recall"] = sc.Recall,
                ["reference_objects"] = sc.ReferenceObjects, ["segmented_objects"] = sc.SegmentedObjects, ["matches"] = sc.Matches,
            }.ToJsonString());
            return 0;
        }
        AnsiConsole.WriteLine($"SEG {sc.Seg:F4}  detection F1 {sc.F1:F4} (precision {sc.Precision:F4}, recall {sc.Recall:F4}; {sc.Matches} of {sc.ReferenceObjects} reference objects matched, {sc.SegmentedObjects} segmented)");
        return 0;
    }
}
