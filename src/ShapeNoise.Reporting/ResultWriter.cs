using System.Text.Json.Nodes;
using ShapeNoise.Pipeline;

namespace ShapeNoise.Reporting;

/// <summary>Writes every output of <c>analyze</c> into a folder, atomically.</summary>
public static class ResultWriter
{
    public static void Write(AnalysisResult r, OutputTarget outDir, JsonObject provenance, Action<string>? extra = null)
    {
        OutputFolder.Write(outDir, dir =>
        {
            Tables.WriteAll(r, dir);
            File.WriteAllText(Path.Combine(dir, "summary.json"), Summary.Build(r).ToJsonString(Summary.Indented));
            File.WriteAllText(Path.Combine(dir, "floor.json"), Summary.Floor(r).ToJsonString(Summary.Indented));
            File.WriteAllText(Path.Combine(dir, "run.json"), provenance.ToJsonString(Summary.Indented));
            var sim = SimulationParameters.Build(r, provenance);
            if (r.Options.SimFormat == SimFormat.Toml) File.WriteAllText(Path.Combine(dir, "sim-params.toml"), SimulationParameters.ToToml(sim));
            else File.WriteAllText(Path.Combine(dir, "sim-params.json"), sim.ToJsonString(Summary.Indented));
            Figures.WriteAll(r, dir);
            extra?.Invoke(dir);
            File.WriteAllText(Path.Combine(dir, "report.html"), HtmlReport.Build(r, dir, provenance));
        });
    }
}
