using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Statistics;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

internal sealed class AnalyzeCommand : Command<AnalyzeCommand.Settings>
{
    public sealed class Settings : MovieInputSettings
    {
        [CommandArgument(0, "<INPUT>"), Description("Label movie: multi-page TIFF (8/16/32-bit integer) or a folder of TIFF/PNG frames.")] public string Input { get; init; } = "";
        [CommandOption("--rays <M>"), Description("Rays per outline (multiple of 8).")] public int Rays { get; init; } = 64;
        [CommandOption("--min-area <PX>"), Description("Exclude objects smaller than this (px).")] public int MinArea { get; init; } = 30;
        [CommandOption("--border-margin <PX>"), Description("Exclude objects within this distance of the image edge (px).")] public int BorderMargin { get; init; } = 1;
        [CommandOption("--min-track <FRAMES>"), Description("Only tracks at least this long enter the statistics.")] public int MinTrack { get; init; } = 10;
        [CommandOption("--max-gap <FRAMES>"), Description("A track lost, merged or split for at most this many frames resumes when its cell reappears near its last position (one-frame segmentation errors are bridged; 0 = off).")] public int MaxGap { get; init; } = 2;
        [CommandOption("--outline <METHOD>"), Description("Outline placement: midpoint, subpixel or pixel-edge.")] public string Outline { get; init; } = "midpoint";
        [CommandOption("--link-overlap <FRACTION>"), Description("Overlap fraction (of the smaller mask) that links masks in consecutive frames.")] public double LinkOverlap { get; init; } = 0.25;
        [CommandOption("--bootstrap <N>"), Description("Bootstrap resamples over tracks.")] public int Bootstrap { get; init; } = 1000;
        [CommandOption("--seed <N>"), Description("Seed of every random resample.")] public int Seed { get; init; } = 1;
        [CommandOption("--floor-from <DIR>"), Description("Output folder of a fixed-cell movie analysed the same way: its fluctuations are the noise floor.")] public string? FloorFrom { get; init; }
        [CommandOption("--noise-model <MODEL>"), Description("Measurement noise removed from the headline variances: temporal (OU signal + white noise fitted in time; default), modes (high-mode floor) or fixed-cells (needs --floor-from; the default when --floor-from is given).")] public string? NoiseModel { get; init; }
        [CommandOption("--max-lag <FRAMES>"), Description("Longest lag of the autocorrelation curves.")] public int MaxLag { get; init; } = 30;
        [CommandOption("--time-unit <UNIT>"), Description("Time unit of the dimensionless simulation parameters: tau_q, min, or a number of minutes.")] public string TimeUnit { get; init; } = "tau_q";
        [CommandOption("--sim-format <FORMAT>"), Description("Simulation parameters as json (sim-params.json) or toml (sim-params.toml).")] public string SimFormat { get; init; } = "json";
        [CommandOption("--coarse <LENGTH>"), Description("Gaussian width of the nematic coarse-graining: um (px if unknown) or a multiple of R0 such as 2R0.")] public string Coarse { get; init; } = "2R0";
        [CommandOption("--coarse-sweep <WIDTHS>"), Description("Re-run the defect stage at each of these coarse widths (comma-separated, e.g. 1R0,2R0,3R0,4R0) and report defect density and headward speed against the width (coarse-sweep.csv, coarse-sweep.png).")] public string? CoarseSweep { get; init; }
        [CommandOption("--grid <LENGTH>"), Description("Grid spacing of the coarse-grained fields: um or a multiple of R0.")] public string Grid { get; init; } = "0.5R0";
        [CommandOption("--raw"), Description("INPUT is a raw junction/membrane-marker movie: segment it first (kept in segmentation/).")] public bool Raw { get; init; }
        [CommandOption("--cell-diameter <UM>"), Description("With --raw: expected cell diameter (um; px if the pixel size is unknown).")] public double CellDiameter { get; init; } = 10;
        [CommandOption("--deconvolve <PX>"), Description("With --raw: sd (px) of the microscope's Gaussian point-spread function: the image the watershed floods is deconvolved with it (Richardson-Lucy, kernel at most 1.5 px; the seeds are not); 0 = off (default).")] public double Deconvolve { get; init; }
        [CommandOption("--model-fit"), Description("With --raw: end the segmentation by fitting a blurred-junction model to the image (see segment --model-fit).")] public bool ModelFit { get; init; }
        [CommandOption("--marginal-sweeps <N>"), Description("With --raw --model-fit: label each pixel by its most frequent label over N sweeps sampling the fitted model (see segment --marginal-sweeps; 0 = off).")] public int MarginalSweeps { get; init; }
        [CommandOption("--seeds <METHOD>"), Description("With --raw: seed method of the segmentation, hminima (default) or laplacian (see segment --seeds).")] public string Seeds { get; init; } = "hminima";
        [CommandOption("--no-crest"), Description("With --raw: keep the segmented masks' outlines instead of moving them onto the crest of the junction signal.")] public bool NoCrest { get; init; }
        [CommandOption("--velocity <SOURCE>"), Description("Cell velocities for the defect analysis: centroids (tracked) or flow (Farneback optical flow of the raw movie; needs --raw).")] public string Velocity { get; init; } = "centroids";
        [CommandOption("--keep-drift"), Description("Keep stage drift (the tissue's median cell velocity per frame) in defect speeds and cell flows; by default it is removed (docs/defects.md#drift).")] public bool KeepDrift { get; init; }
        [CommandOption("--ids-are-tracks"), Description("Outline tables: the cell ids are stable track ids (else cells are linked by centroid).")] public bool IdsAreTracks { get; init; }
        [CommandOption("--max-displacement <PX>"), Description("Outline tables: largest centroid step between frames when linking by centroid (default: the mean cell radius).")] public double? MaxDisplacement { get; init; }
        [CommandOption("--quiet"), Description("Print nothing but errors.")] public bool Quiet { get; init; }
        [CommandOption("--json"), Description("Print summary.json to standard output, nothing else.")] public bool Json { get; init; }

    }

    public static OutlineMethod ParseOutline(string s) => s.ToLowerInvariant() switch
    {
        "midpoint" => OutlineMethod.Midpoint,
        "subpixel" => OutlineMethod.Subpixel,
        "pixel-edge" or "pixeledge" => OutlineMethod.PixelEdge,
        _ => throw new ArgumentException($"--outline must be midpoint, subpixel or pixel-edge (got '{s}')"),
    };

    /// <summary>--noise-model: temporal, modes or fixed-cells (case-insensitive); anything else is a bad option (exit 64).</summary>
    public static ShapeNoise.Fluctuations.NoiseModel ParseNoiseModel(string s)
    {
        try { return ShapeNoise.Fluctuations.Pooling.ParseNoiseModel(s); }
        catch (ArgumentException) { throw new ArgumentException($"--noise-model must be temporal, modes or fixed-cells (got '{s}')"); }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        // Segmentation options act only on a raw movie: given with a label movie they would be silently ignored.
        if (!s.Raw && (s.ModelFit || s.MarginalSweeps != 0 || s.Deconvolve != 0 || s.NoCrest || SeedMethodOption.Parse(s.Seeds) != ShapeNoise.Imaging.Segmentation.SeedMethod.HMinima))
            throw new ArgumentException("--model-fit, --marginal-sweeps, --deconvolve, --seeds and --no-crest segment a raw movie: give --raw too");
        var options = new AnalysisOptions
        {
            PixelSizeUm = s.PixelSize, FrameIntervalMin = s.FrameInterval, Rays = s.Rays, MinAreaPx = s.MinArea, BorderMarginPx = s.BorderMargin,
            MinTrackFrames = s.MinTrack, MaxGapFrames = s.MaxGap, Outline = ParseOutline(s.Outline), LinkOverlapFraction = s.LinkOverlap, BootstrapResamples = s.Bootstrap,
            Seed = s.Seed, FloorFrom = s.FloorFrom,
            NoiseModel = s.NoiseModel is { } nm ? ParseNoiseModel(nm)
                : s.FloorFrom is null ? ShapeNoise.Fluctuations.NoiseModel.Temporal : ShapeNoise.Fluctuations.NoiseModel.FixedCells, MaxLagFrames = s.MaxLag, IdsAreTracks = s.IdsAreTracks, MaxDisplacementPx = s.MaxDisplacement,
            Velocity = s.Velocity.ToLowerInvariant() switch
            {
                "centroids" => VelocitySource.Centroids,
                "flow" when s.Raw => VelocitySource.Flow,
                "flow" => throw new ArgumentException("--velocity flow needs --raw (optical flow runs on the raw movie)"),
                _ => throw new ArgumentException($"--velocity must be centroids or flow (got '{s.Velocity}')"),
            }, TimeUnit = s.TimeUnit, CoarseWidth = s.Coarse, CoarseSweep = s.CoarseSweep, GridSpacing = s.Grid, KeepDrift = s.KeepDrift,
            SimFormat = s.SimFormat.ToLowerInvariant() switch
            {
                "json" => ShapeNoise.Pipeline.SimFormat.Json,
                "toml" => ShapeNoise.Pipeline.SimFormat.Toml,
                _ => throw new ArgumentException($"--sim-format must be json or toml (got '{s.SimFormat}')"),
            },
        }.Validated();
        var sel = s.Selection();
        var cmd = Environment.GetCommandLineArgs().Skip(1);
        bool chatty = !s.Quiet && !s.Json;
        AnalysisResult result;
        if (chatty && !Console.IsOutputRedirected)
        {
            result = null!;
            AnsiConsole.Progress()
                .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new TransferSpeedlessFpsColumn(), new RemainingTimeColumn())
                .Start(ctx =>
                {
                    var task = ctx.AddTask("frames");
                    var after = ctx.AddTask("statistics", autoStart: false, maxValue: 3);
                    result = Analyze(s, options, sel, new SyncProgress(task, after), cmd);
                    after.Value = after.MaxValue;
                });
        }
        else result = Analyze(s, options, sel, null, cmd);

        if (s.Json) { Console.WriteLine(Summary.Build(result).ToJsonString(Summary.Indented)); return 0; }
        if (s.Quiet) return 0;
        PrintSummary(result, s.Out);
        return 0;
    }

    private static AnalysisResult Analyze(Settings s, AnalysisOptions options, MovieSelection sel, IProgress<MovieAnalyzer.Progress>? progress, IEnumerable<string> cmd)
        => s.Raw
            ? RawAnalyzeJob.Run(s.Input, Target(s), options, new ShapeNoise.Imaging.Segmentation.SegmentOptions { CellDiameterUm = s.CellDiameter, CrestOutlines = !s.NoCrest, DeconvolveSigmaPx = s.Deconvolve, ModelFit = s.ModelFit, MarginalSweeps = s.MarginalSweeps, Seeds = SeedMethodOption.Parse(s.Seeds) }, progress, cmd, sel)
            : AnalyzeJob.Run(s.Input, Target(s), options, p => LabelMovies.Open(p, sel), progress, cmd, new ShapeNoise.Imaging.Drawing.DefectOverlays());

    private static OutputTarget Target(Settings s) => new(s.Out, s.Overwrite, s.FloorFrom is null ? [s.Input] : [s.Input, s.FloorFrom]);

    private static void PrintSummary(AnalysisResult r, string outDir)
    {
        foreach (var w in r.Warnings) AnsiConsole.MarkupLineInterpolated($"[yellow]warning:[/] {w}");
        var u = r.Units; var us = ShapeNoise.Reporting.UnitScale.Of(u);
        if (r.Movie.Plane is { } plane) AnsiConsole.MarkupLineInterpolated($"plane: {plane}");
        AnsiConsole.MarkupLineInterpolated($"pixel size: {(u.PixelSizeUm is { } ps ? $"{ps:G6} um/px" : "unknown (px)")} ({u.PixelSizeSource}); frame interval: {(u.FrameIntervalMin is { } fi ? $"{fi:G6} min" : "unknown (frames)")} ({u.FrameIntervalSource})");
        var t = new Table().AddColumn("measure").AddColumn("value").AddColumn("95% CI").AddColumn("n").AddColumn("status");
        void Row(Measure m, Estimate e) =>
            t.AddRow(m.Label(us).EscapeMarkup(), (e.IsOk ? $"{e.Value:G4}" : EstimateText.Phrase(e, "")).EscapeMarkup(), e.IsOk ? $"{e.Low:G4} - {e.High:G4}" : "-",
                EstimateText.Units(e)[4..].EscapeMarkup(), Summary.StatusName(e.Status));
        Row(Measures.Anisotropy, r.Pooled.Anisotropy);
        Row(Measures.AnisotropyContour, r.Pooled.AnisotropyContour);
        Row(Measures.VarL, us.Area(r.Pooled.VarL));
        Row(Measures.VarW, us.Area(r.Pooled.VarW));
        Row(Measures.VarAlong, us.Area(r.Pooled.VarAlong));
        Row(Measures.VarAcross, us.Area(r.Pooled.VarAcross));
        Row(Measures.TauQ, us.Time(r.Dynamics.TauQFrames));
        Row(Measures.TauTheta, us.Time(r.Dynamics.TauThetaFrames));
        var df = r.Defects;
        t.AddRow("+1/2 / -1/2 defects per frame", df.NotApplicableReason is { } why ? $"not applicable: {why}".EscapeMarkup() : $"{df.PlusPerFrame:G3} / {df.MinusPerFrame:G3}", "", "", df.NotApplicableReason is null ? "" : "not_applicable");
        Row(Measures.DefectHeadwardSpeed, us.Speed(df.HeadwardSpeed));
        Row(Measures.FlowHeadwardSpeed, us.Speed(df.FlowHeadwardSpeed));
        if (r.DefectStatistics is { } ds) foreach (var (measure, e) in DefectStatisticsReport.Estimates(ds)) Row(measure, us.Of(measure.Kind, e));
        foreach (var (measure, e) in MotionReport.Estimates(r.Motion)) Row(measure, us.Of(measure.Kind, e));   // docs/motion.md
        t.AddRow("noise model", ShapeNoise.Fluctuations.Pooling.Name(r.Pooled.NoiseModel), "", "", "");
        t.AddRow("tracks used / tracked", $"{r.Counts.TracksUsed} / {r.Counts.Tracks}", "");
        t.AddRow("frames", $"{r.Counts.Frames}", "");
        AnsiConsole.Write(t);
        AnsiConsole.MarkupLineInterpolated($"results in [bold]{outDir}[/] (units: {us.LengthName}, {us.TimeName})");
        foreach (var h in HtmlReport.Headlines(r)) AnsiConsole.WriteLine(h);
        AnsiConsole.MarkupLineInterpolated($"report: [bold]{Path.Combine(outDir, AnalysisFolder.Report)}[/]");
    }

    /// <summary>Reports progress on the calling thread (Progress&lt;T&gt; would post to the thread pool).</summary>
    private sealed class SyncProgress(ProgressTask frames, ProgressTask after) : IProgress<MovieAnalyzer.Progress>
    {
        public void Report(MovieAnalyzer.Progress x)
        {
            if (x.Stage == "frames") { frames.MaxValue = x.FramesTotal; frames.Value = x.FramesDone; return; }
            if (!after.IsStarted) after.StartTask();
            frames.Value = frames.MaxValue;
            after.Description = x.Stage;
            after.Value = x.FramesDone;
        }
    }

    /// <summary>Frames per second of a progress task.</summary>
    private sealed class TransferSpeedlessFpsColumn : ProgressColumn
    {
        public override Spectre.Console.Rendering.IRenderable Render(Spectre.Console.Rendering.RenderOptions options, ProgressTask task, TimeSpan deltaTime)
            => new Markup(task.Description == "frames" && task.Speed is { } v ? $"{v:F1} frames/s" : "");
    }
}
