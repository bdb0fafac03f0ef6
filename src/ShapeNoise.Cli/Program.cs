using ShapeNoise.Cli;
using ShapeNoise.Reading;
using Spectre.Console;
using Spectre.Console.Cli;

var app = new CommandApp();
app.Configure(c =>
{
    c.SetApplicationName("shapenoise");
    c.SetApplicationVersion(ShapeNoise.Reporting.Provenance.ToolVersion);
    c.PropagateExceptions();
    c.AddBranch("synth", s =>
    {
        s.SetDescription("Generate an invented test scenario (label movie + truth.json).");
        s.AddCommand<SynthEllipsesCommand>("ellipses").WithDescription("Isolated ellipses with Ornstein-Uhlenbeck semi-axes.")
            .WithExample("synth", "ellipses", "--out", "demo-data/ellipses");
        s.AddCommand<SynthMonolayerCommand>("monolayer").WithDescription("Confluent tissue aligned with a moving +1/2 / -1/2 defect pair.")
            .WithExample("synth", "monolayer", "--out", "demo-data/monolayer", "--motion", "tailward");
    });
    c.AddCommand<AnalyzeCommand>("analyze").WithDescription(
            "Analyse a label movie: outlines, Fourier modes, along/across fluctuations, correlation times, nematic defects.\n" +
            "Exit codes: 0 done; 2 bad input (named in the one-line error); 3 output folder not writable; 64 bad options; 1 unexpected error.")
        .WithExample("analyze", "demo-data/ellipses/labels.tif", "--out", "runs/ellipses");
});
return ExitCodes.Run(() => app.Run(args));
