using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using ShapeNoise.Comparison;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

internal sealed class CompareCommand : Command<CompareCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandArgument(0, "<CONDITIONS_CSV>"), Description("CSV with columns condition,replicate,path (an analysis folder, or a movie to analyse first).")] public string Conditions { get; init; } = "";
        [CommandOption("--out <DIR>"), Description("Output folder.")] public string Out { get; init; } = "";
        [CommandOption("--overwrite"), Description("Replace an earlier ShapeNoise output in --out (only a folder whose run.json lists every file in it).")] public bool Overwrite { get; init; }
        [CommandOption("--bootstrap <N>"), Description("Hierarchical bootstrap resamples.")] public int Bootstrap { get; init; } = 1000;
        [CommandOption("--seed <N>"), Description("Seed of every random resample.")] public int Seed { get; init; } = 1;
        [CommandOption("--pixel-size <UM>"), Description("For movies analysed here: pixel size (um/px); overrides the metadata.")] public double? PixelSize { get; init; }
        [CommandOption("--frame-interval <MIN>"), Description("For movies analysed here: frame interval (min); overrides the metadata.")] public double? FrameInterval { get; init; }
        [CommandOption("--quiet"), Description("Print nothing but errors.")] public bool Quiet { get; init; }
        [CommandOption("--json"), Description("Print the differences as JSON, nothing else.")] public bool Json { get; init; }
        public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required") : ValidationResult.Success();
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var options = new AnalysisOptions { BootstrapResamples = s.Bootstrap, Seed = s.Seed, PixelSizeUm = s.PixelSize, FrameIntervalMin = s.FrameInterval }.Validated();
        var r = CompareJob.Compare(s.Conditions, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite, CompareJob.ListedInputs(s.Conditions)), options, LabelMovies.Open, new ShapeNoise.Imaging.Drawing.DefectOverlays(), Environment.GetCommandLineArgs().Skip(1));
        if (s.Json)
        {
            static System.Text.Json.Nodes.JsonNode? N(double v) => double.IsFinite(v) ? v : null;
            var arr = new System.Text.Json.Nodes.JsonArray();
            foreach (var d in r.Differences)
                arr.Add((System.Text.Json.Nodes.JsonNode)new System.Text.Json.Nodes.JsonObject
                {
                    ["measure"] = d.Measure, ["condition_a"] = d.A, ["condition_b"] = d.B, ["difference"] = N(d.Difference.Value),
                    ["ci95"] = new System.Text.Json.Nodes.JsonArray(N(d.Difference.Low), N(d.Difference.High)), ["ratio"] = N(d.Ratio.Value), ["p_value"] = N(d.PValue),
                    ["status"] = d.Status == ShapeNoise.Statistics.EstimateStatus.Ok ? "ok" : "too_few", ["p_holm"] = N(d.HolmPValue), ["primary"] = d.IsPrimary,
                });
            Console.WriteLine(arr.ToJsonString(new System.Text.Json.JsonSerializerOptions { WriteIndented = true }));
            return 0;
        }
        if (s.Quiet) return 0;
        var t = new Table().AddColumn("measure").AddColumn("a - b").AddColumn("difference").AddColumn("95% CI").AddColumn("p (movies)");
        var units = ShapeNoise.Reporting.UnitScale.FromNames(r.LengthUnit, r.TimeUnit);
        foreach (var d in r.Differences)
            t.AddRow((units is null ? d.Measure : ShapeNoise.Reporting.Measures.Get(d.Measure).Label(units)).EscapeMarkup(), $"{d.A} - {d.B}".EscapeMarkup(), $"{d.Difference.Value:G4}", double.IsFinite(d.Difference.Low) ? $"{d.Difference.Low:G4} - {d.Difference.High:G4}" : "-", double.IsFinite(d.PValue) ? $"{d.PValue:G3}" : "-");
        AnsiConsole.Write(t);
        foreach (var d in r.Differences) AnsiConsole.WriteLine($"{d.Measure}: {ShapeNoise.Reporting.ComparisonReport.Sentence(d)}");
        foreach (var o in r.OrderStatements) AnsiConsole.WriteLine(o);
        AnsiConsole.MarkupLineInterpolated($"results in [bold]{s.Out}[/] (comparison.md, comparison.csv, differences.csv, superplots)");
        return 0;
    }
}

internal sealed class PlanCommand : Command<PlanCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandArgument(0, "<PILOT_DIRS>"), Description("Pilot analysis folders (or folders of analysis folders, one per condition).")] public string[] Pilots { get; init; } = [];
        [CommandOption("--effect <RELATIVE>"), Description("Relative change to detect, e.g. 0.2 for 20%.")] public double Effect { get; init; } = 0.2;
        [CommandOption("--measure <MEASURE>"), Description("anisotropy (default), anisotropy_contour, or a movie-level measure of collective motion or defects such as polar_order, rms_speed, velocity_correlation_length, plus_half_density, defect_lifetime (docs/motion.md#comparing-conditions).")] public string Measure { get; init; } = "anisotropy";
        [CommandOption("--out <DIR>"), Description("Output folder.")] public string Out { get; init; } = "";
        [CommandOption("--overwrite"), Description("Replace an earlier ShapeNoise output in --out (only a folder whose run.json lists every file in it).")] public bool Overwrite { get; init; }
        [CommandOption("--quiet"), Description("Print nothing but errors.")] public bool Quiet { get; init; }
        public override ValidationResult Validate() => string.IsNullOrWhiteSpace(Out) ? ValidationResult.Error("--out <DIR> is required")
            : Pilots.Length == 0 ? ValidationResult.Error("give at least one pilot folder") : ValidationResult.Success();
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        var p = CompareJob.Plan(s.Pilots, s.Effect, s.Measure, new ShapeNoise.Reporting.OutputTarget(s.Out, s.Overwrite, s.Pilots), Environment.GetCommandLineArgs().Skip(1));
        if (s.Quiet) return 0;
        AnsiConsole.WriteLine($"ICC {p.Components.Icc:G3} (between {p.Components.Between:G3}, within {p.Components.Within:G3}) from {p.PilotMovies} pilot movies");
        AnsiConsole.WriteLine(p.Smallest is { } b ? $"smallest design with power >= 0.8: {b.MoviesPerCondition} movies per condition{(ShapeNoise.Comparison.ConditionComparison.MovieLevelMeasures.Contains(p.Measure) ? " of the pilots' size" : $", {b.CellsPerMovie} cells per movie")} (power {b.Power:F2})"
                                                  : "no design up to 30 movies per condition reaches power 0.8");
        AnsiConsole.MarkupLineInterpolated($"results in [bold]{s.Out}[/] (plan.md, plan.csv, plan.png)");
        return 0;
    }
}
