using System.Text.Json.Nodes;
using ShapeNoise.Pipeline;

namespace ShapeNoise.Reporting;

/// <summary>Writes every output of <c>analyze</c> into a folder, atomically, under the names of <see cref="AnalysisFolder"/>.</summary>
public static class ResultWriter
{
    /// <summary>Writes the tables, summary.json, floor.json, run.json, sim-params, the figures and report.html.</summary>
    /// <param name="r">The analysis.</param>
    /// <param name="outDir">The output folder (written atomically).</param>
    /// <param name="provenance">run.json content.</param>
    /// <param name="frameFigures">Optional figures drawn on the movie's frames: saved and embedded in report.html like the others.</param>
    /// <param name="extra">Optional further files written into the folder (e.g. a copy of the segmentation).</param>
    public static void Write(AnalysisResult r, OutputTarget outDir, JsonObject provenance, Func<IReadOnlyList<Figure>>? frameFigures = null,
        Action<string>? extra = null)
    {
        OutputFolder.Write(outDir, dir =>
        {
            string In(string name) => Path.Combine(dir, name);
            // The tables, the figures and the figures drawn on frames are independent: written side by side.
            var tables = Task.Run(() => Tables.WriteAll(r, dir));
            var drawn = Task.Run(() => Figures.All(r));
            var onFrames = Task.Run(() => frameFigures?.Invoke() ?? []);
            var summary = Summary.Build(r);
            File.WriteAllText(In(AnalysisFolder.Summary), summary.ToJsonString(Summary.Indented));
            Tables.Write(In(AnalysisFolder.Estimates), Tables.Estimates(summary), new EstimateMap());
            File.WriteAllText(In(AnalysisFolder.Floor), Summary.Floor(r).ToJsonString(Summary.Indented));
            File.WriteAllText(In(AnalysisFolder.Run), provenance.ToJsonString(Summary.Indented));
            var sim = SimulationParameters.Build(r, provenance);
            if (r.Options.SimFormat == SimFormat.Toml) File.WriteAllText(In(AnalysisFolder.SimParamsToml), SimulationParameters.ToToml(sim));
            else File.WriteAllText(In(AnalysisFolder.SimParamsJson), sim.ToJsonString(Summary.Indented));
            // GetResult rethrows a task's own exception (not an AggregateException), so output errors keep their exit code.
            tables.GetAwaiter().GetResult();
            var figures = drawn.GetAwaiter().GetResult();
            var frames = onFrames.GetAwaiter().GetResult();
            Figures.Save(figures, dir);
            Figures.Save(frames, dir);
            extra?.Invoke(dir);
            File.WriteAllText(In(AnalysisFolder.Report), HtmlReport.Build(r, figures, frames, provenance));
        });
    }
}
