using System.Text.Json.Nodes;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;

using ShapeNoise.Pipeline;

namespace ShapeNoise.Cli.Jobs;

/// <summary>The whole <c>analyze</c> job: open the movie, analyse it, write the output folder with provenance.</summary>
public static class AnalyzeJob
{
    /// <param name="input">Movie path (file or folder).</param>
    /// <param name="outDir">Output folder; written atomically.</param>
    /// <param name="options">Analysis options.</param>
    /// <param name="open">Opens a movie path (supplied by the imaging layer).</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="commandLine">The command line, for run.json.</param>
    /// <param name="frameFigures">Optional figures drawn on the movie's frames.</param>
    /// <param name="extraInputs">Further input files for run.json (e.g. the raw movie a label movie was segmented from).</param>
    /// <param name="velocities">Cell velocities of the defect stage, chosen before the run (e.g. optical flow of the raw
    /// movie); null = tracked centroids.</param>
    /// <param name="extraFiles">Optional further files written into the output folder (e.g. a copy of the segmentation).</param>
    /// <param name="junctions">Raw movies: the junction signal whose crest the outlines follow (docs/segmentation.md#sub-pixel-boundaries).</param>
    public static AnalysisResult Run(string input, OutputTarget outDir, AnalysisOptions options, Func<string, ILabelMovie> open,
        IProgress<MovieAnalyzer.Progress>? progress = null, IEnumerable<string>? commandLine = null, IFrameFigures? frameFigures = null,
        IEnumerable<string>? extraInputs = null, ShapeNoise.Nematic.IVelocitySource? velocities = null,
        Action<string>? extraFiles = null, ShapeNoise.Outlines.IJunctionSignal? junctions = null)
    {
        options.Validated();
        OutputFolder.Check(outDir);
        var floor = options.FloorFrom is null ? null : Summary.ReadFloor(options.FloorFrom);
        if (floor is not null && !string.Equals(floor.Outline, options.Outline.ToString(), StringComparison.OrdinalIgnoreCase))
            throw new InputException(options.FloorFrom!, $"floor was measured with --outline {floor.Outline}, this run uses {options.Outline.ToString().ToLowerInvariant()}");
        AnalysisResult result;
        List<string> files;
        if (Path.GetExtension(input).Equals(".csv", StringComparison.OrdinalIgnoreCase))
        {
            var table = OutlineTable.Read(input, options.PixelSizeUm, options.FrameIntervalMin);
            result = MovieAnalyzer.RunFrames(table.Info with { PixelSizeUm = null, FrameIntervalMin = null }, table.Linked(options, options.IdsAreTracks, options.MaxDisplacementPx),
                options, progress, floor, new PhaseTimes(), velocities);
            if (table.Warnings.Count > 0) result = result with { Warnings = [.. result.Warnings, .. table.Warnings] };
            files = [input];
            frameFigures = null;   // no image to draw on
        }
        else
        {
            using var movie = open(input);
            result = MovieAnalyzer.Run(movie, options, progress, floor, velocities: velocities, junctions: junctions);
            files = new List<string>(movie.Files);
        }
        if (options.FloorFrom is not null) files.Add(Path.Combine(options.FloorFrom, "floor.json"));
        if (extraInputs is not null) files.InsertRange(0, extraInputs);
        var opts = OptionsJson.Node(options);
        var prov = Provenance.Describe("analyze", files, opts, commandLine);
        prov["movie"] = Provenance.Movie(result.Movie, result.Units.PixelSizeUm, result.Units.PixelSizeSource, result.Units.FrameIntervalMin, result.Units.FrameIntervalSource);
        var figs = frameFigures;
        ResultWriter.Write(result, outDir, prov, figs is null ? null : () => figs.Draw(result, () => open(input)), extraFiles);
        return result;
    }
}
