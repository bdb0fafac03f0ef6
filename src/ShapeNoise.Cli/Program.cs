using ShapeNoise.Cli.Jobs;
using ShapeNoise.Cli;
using ShapeNoise.Reading;
using Spectre.Console;
using Spectre.Console.Cli;

Interrupts.Install();
ShapeNoise.Imaging.NativeCode.UseApplicationFolder();   // the published native command carries the image library beside it
#pragma warning disable IL3050   // the parser reads the settings types by reflection: kept whole in the native publish (TrimMode partial), checked by scripts/check-native.sh
var app = new CommandApp();
#pragma warning restore IL3050
app.Configure(c =>
{
    c.SetApplicationName("shapenoise");
    c.SetApplicationVersion(ShapeNoise.Reporting.Provenance.ToolVersion);
    c.PropagateExceptions();
    c.Settings.Culture = System.Globalization.CultureInfo.InvariantCulture;
    c.SetInterceptor(new StrictOptions.Interceptor());   // unknown options the parser set aside (see StrictOptions)
    c.AddBranch("synth", s =>
    {
        s.SetDescription("Generate an invented test scenario (label movie + truth.json).");
        s.AddCommand<SynthEllipsesCommand>("ellipses").WithDescription("Isolated ellipses with Ornstein-Uhlenbeck semi-axes.")
            .WithExample("synth", "ellipses", "--out", "demo-data/ellipses");
        s.AddCommand<SynthMonolayerCommand>("monolayer").WithDescription("Confluent tissue aligned with a moving +1/2 / -1/2 defect pair.")
            .WithExample("synth", "monolayer", "--out", "demo-data/monolayer", "--motion", "tailward");
    });
    c.AddCommand<AnalyzeCommand>("analyze").WithDescription(
            "Analyse a label movie (or raw movie with --raw, or outline table): outlines, Fourier modes, along/across fluctuations, correlation times, nematic defects; writes report.html.")
        .WithExample("analyze", "demo-data/ellipses/labels.tif", "--out", "runs/ellipses");
    c.AddCommand<SegmentCommand>("segment").WithDescription("Segment a raw junction/membrane-marker movie into labels (watershed).")
        .WithExample("segment", "raw.tif", "--out", "runs/seg");
    c.AddCommand<ScoreCommand>("score").WithDescription("Segmentation quality against reference labels: SEG and detection F1.")
        .WithExample("score", "runs/seg/labels.tif", "truth.tif");
    c.AddCommand<CompareCommand>("compare").WithDescription("Compare conditions over several movies each (hierarchical bootstrap, movie-level tests).")
        .WithExample("compare", "conditions.csv", "--out", "runs/compare");
    c.AddCommand<PlanCommand>("plan").WithDescription("How many movies a comparison needs, from pilot analyses.")
        .WithExample("plan", "runs/pilot-wt", "runs/pilot-ko", "--effect", "0.2", "--out", "runs/plan");
});
int code = ExitCodes.Run(() => { StrictOptions.Check(args); return app.Run(args); });
Interrupts.AfterCommand();
if (args.Length == 0 || args is ["--help"] or ["-h"] or ["-?"])
    Console.WriteLine(ExitCodes.Help);
return code;
