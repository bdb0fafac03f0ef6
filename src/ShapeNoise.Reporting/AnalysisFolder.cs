using System.Globalization;
using System.Text.Json.Nodes;
using CsvHelper;
using CsvHelper.Configuration;
using ShapeNoise.Comparison;
using ShapeNoise.Reading;

namespace ShapeNoise.Reporting;

/// <summary>The column names of an analysis folder's tables that carry a unit suffix, computed in one place from the run's
/// <see cref="UnitScale"/> (docs/measures.md#output-contract); the writers' class maps and the readers both use them.</summary>
public sealed class AnalysisColumns(UnitScale u)
{
    /// <summary>time_min or time_frames.</summary>
    public string Time => $"time_{u.TimeSuffix}";
    /// <summary>duration_min or duration_frames.</summary>
    public string Duration => $"duration_{u.TimeSuffix}";
    /// <summary>x_um or x_px.</summary>
    public string X => $"x_{u.LengthName}";
    /// <summary>y_um or y_px.</summary>
    public string Y => $"y_{u.LengthName}";
    /// <summary>area_um2 or area_px2.</summary>
    public string Area => $"area_{u.AreaSuffix}";
    /// <summary>perimeter_um or perimeter_px.</summary>
    public string Perimeter => $"perimeter_{u.LengthName}";
    /// <summary>length_um or length_px.</summary>
    public string Length => $"length_{u.LengthName}";
    /// <summary>width_um or width_px.</summary>
    public string Width => $"width_{u.LengthName}";
    /// <summary>mean_radius_um or mean_radius_px.</summary>
    public string MeanRadius => $"mean_radius_{u.LengthName}";
    /// <summary>mode2_amplitude_um or mode2_amplitude_px.</summary>
    public string Mode2Amplitude => $"mode2_amplitude_{u.LengthName}";
    /// <summary>mean_area_um2 or mean_area_px2.</summary>
    public string MeanArea => $"mean_area_{u.AreaSuffix}";
    /// <summary>mean_length_um or mean_length_px.</summary>
    public string MeanLength => $"mean_length_{u.LengthName}";
    /// <summary>mean_width_um or mean_width_px.</summary>
    public string MeanWidth => $"mean_width_{u.LengthName}";
    /// <summary>var_L_um2 or var_L_px2.</summary>
    public string VarL => $"var_L_{u.AreaSuffix}";
    /// <summary>var_W_um2 or var_W_px2.</summary>
    public string VarW => $"var_W_{u.AreaSuffix}";
    /// <summary>var_along_raw_um2 or var_along_raw_px2.</summary>
    public string VarAlongRaw => $"var_along_raw_{u.AreaSuffix}";
    /// <summary>var_across_raw_um2 or var_across_raw_px2.</summary>
    public string VarAcrossRaw => $"var_across_raw_{u.AreaSuffix}";
    /// <summary>floor_along_um2 or floor_along_px2.</summary>
    public string FloorAlong => $"floor_along_{u.AreaSuffix}";
    /// <summary>floor_across_um2 or floor_across_px2.</summary>
    public string FloorAcross => $"floor_across_{u.AreaSuffix}";
    /// <summary>var_along_um2 or var_along_px2 (floor-corrected).</summary>
    public string VarAlong => $"var_along_{u.AreaSuffix}";
    /// <summary>var_across_um2 or var_across_px2 (floor-corrected).</summary>
    public string VarAcross => $"var_across_{u.AreaSuffix}";
    /// <summary>power_raw_um2 or power_raw_px2.</summary>
    public string PowerRaw => $"power_raw_{u.AreaSuffix}";
    /// <summary>floor_um2 or floor_px2.</summary>
    public string Floor => $"floor_{u.AreaSuffix}";
    /// <summary>power_corrected_um2 or power_corrected_px2.</summary>
    public string PowerCorrected => $"power_corrected_{u.AreaSuffix}";
    /// <summary>variance_raw_um2 or variance_raw_px2.</summary>
    public string VarianceRaw => $"variance_raw_{u.AreaSuffix}";
    /// <summary>variance_corrected_um2 or variance_corrected_px2.</summary>
    public string VarianceCorrected => $"variance_corrected_{u.AreaSuffix}";
    /// <summary>lag_min; null when the frame interval is unknown (lag_frames alone then).</summary>
    public string? Lag => u.FrameIntervalKnown ? "lag_min" : null;
    /// <summary>vx_um_per_min … vx_px_per_frame.</summary>
    public string Vx => $"vx_{u.SpeedSuffix}";
    /// <summary>vy_um_per_min … vy_px_per_frame.</summary>
    public string Vy => $"vy_{u.SpeedSuffix}";
    /// <summary>headward_speed_um_per_min … headward_speed_px_per_frame.</summary>
    public string HeadwardSpeed => $"headward_speed_{u.SpeedSuffix}";
    /// <summary>flow_vx_um_per_min … flow_vx_px_per_frame.</summary>
    public string FlowVx => $"flow_vx_{u.SpeedSuffix}";
    /// <summary>flow_vy_um_per_min … flow_vy_px_per_frame.</summary>
    public string FlowVy => $"flow_vy_{u.SpeedSuffix}";
    /// <summary>flow_headward_speed_um_per_min … flow_headward_speed_px_per_frame.</summary>
    public string FlowHeadwardSpeed => $"flow_headward_speed_{u.SpeedSuffix}";
    /// <summary>v_head_um_per_min … v_head_px_per_frame.</summary>
    public string VHead => $"v_head_{u.SpeedSuffix}";
    /// <summary>v_side_um_per_min … v_side_px_per_frame.</summary>
    public string VSide => $"v_side_{u.SpeedSuffix}";
    /// <summary>u_x and u_y of drift.csv in the run's speed unit (u_x_um_per_min …); null when that unit is px/frame
    /// (u_x_px_per_frame, u_y_px_per_frame are always written).</summary>
    public (string X, string Y)? DriftRun => u.SpeedSuffix == "px_per_frame" ? null : ($"u_x_{u.SpeedSuffix}", $"u_y_{u.SpeedSuffix}");
    /// <summary>cells.csv's extra centroid columns in px (x_px, y_px) when the run is in um; null in a px run, whose
    /// centroid columns are already x_px, y_px.</summary>
    public (string X, string Y)? CellPx => u.PixelSizeKnown ? ("x_px", "y_px") : null;
    /// <summary>x_um and y_um of defects.csv when the pixel size is known (x_px, y_px are always written); null otherwise.</summary>
    public (string X, string Y)? DefectUm => u.PixelSizeKnown ? ("x_um", "y_um") : null;
    /// <summary>tau_min or tau_frames (sim-params and summary.json "dynamics").</summary>
    public string Tau => $"tau_{u.TimeSuffix}";
    /// <summary>variance_um2 or variance_px2.</summary>
    public string Variance => $"variance_{u.AreaSuffix}";
    /// <summary>D_um2_per_min … D_px2_per_frame.</summary>
    public string Diffusion => $"D_{u.DiffusionSuffix}";
    /// <summary>measurement_noise_variance_um2 or measurement_noise_variance_px2.</summary>
    public string NoiseVariance => $"measurement_noise_variance_{u.AreaSuffix}";
}

/// <summary>
/// An analysis folder's layout: every file name it holds (written by <see cref="ResultWriter"/>) and the column names
/// (<see cref="Columns"/>), for writing and for reading back (compare, plan, notebooks) through <see cref="Load"/>.
/// </summary>
public static class AnalysisFolder
{
    /// <summary>summary.json: headline numbers (docs/measures.md#output-contract).</summary>
    public const string Summary = "summary.json";
    /// <summary>cells.csv: one row per analysed outline.</summary>
    public const string Cells = "cells.csv";
    /// <summary>tracks.csv: one row per track.</summary>
    public const string Tracks = "tracks.csv";
    /// <summary>spectrum.csv: pooled mode power.</summary>
    public const string Spectrum = "spectrum.csv";
    /// <summary>profile.csv: contour variance against the normal's angle.</summary>
    public const string Profile = "profile.csv";
    /// <summary>autocorrelation.csv: pooled correlations per series and lag.</summary>
    public const string Autocorrelation = "autocorrelation.csv";
    /// <summary>defects.csv: one row per defect per frame.</summary>
    public const string Defects = "defects.csv";
    /// <summary>estimates.csv: every estimate object of summary.json as one row with its n and status.</summary>
    public const string Estimates = "estimates.csv";
    /// <summary>drift.csv: the tissue's velocity u(t) per frame (docs/defects.md#drift).</summary>
    public const string Drift = "drift.csv";
    /// <summary>defect-flow.csv: mean flow and director around +1/2 defects.</summary>
    public const string DefectFlow = "defect-flow.csv";
    /// <summary>velocity-correlation.csv: radial velocity, vorticity and nematic correlations (docs/motion.md).</summary>
    public const string VelocityCorrelation = "velocity-correlation.csv";
    /// <summary>motion.csv: collective-motion numbers per frame (docs/motion.md).</summary>
    public const string Motion = "motion.csv";
    /// <summary>velocity-autocorrelation.csv: the cells' temporal velocity autocorrelation per lag (docs/motion.md).</summary>
    public const string VelocityAutocorrelation = "velocity-autocorrelation.csv";
    /// <summary>defect-tracks.csv: one row per defect track with its lifetime and censoring (docs/motion.md#defect-lifetime).</summary>
    public const string DefectTracks = "defect-tracks.csv";
    /// <summary>defect-survival.csv: the Kaplan-Meier curve of the defect lifetimes.</summary>
    public const string DefectSurvival = "defect-survival.csv";
    /// <summary>defect-msd.csv: mean-squared displacement of +1/2 defects relative to the tissue.</summary>
    public const string DefectMsd = "defect-msd.csv";
    /// <summary>coarse-sweep.csv: the defect picture against the coarse width (--coarse-sweep only).</summary>
    public const string CoarseSweep = "coarse-sweep.csv";
    /// <summary>sim-params.json (--sim-format json).</summary>
    public const string SimParamsJson = "sim-params.json";
    /// <summary>sim-params.toml (--sim-format toml).</summary>
    public const string SimParamsToml = "sim-params.toml";
    /// <summary>floor.json: the fixed-cell floor export read by --floor-from.</summary>
    public const string Floor = "floor.json";
    /// <summary>run.json: provenance and the list of files written.</summary>
    public const string Run = "run.json";
    /// <summary>report.html: the self-contained report.</summary>
    public const string Report = "report.html";
    /// <summary>Figure files.</summary>
    public const string SpectrumFigure = "spectrum.png", AnisotropyFigure = "anisotropy.png", ProfileFigure = "profile.png",
        AutocorrelationFigure = "autocorrelation.png", HeadwardFigure = "headward.png", DefectFlowFigure = "defect-flow.png",
        DriftFigure = "drift.png", VelocityCorrelationFigure = "velocity-correlation.png", PolarOrderFigure = "polar-order.png",
        VorticityFigure = "vorticity.png", DefectSurvivalFigure = "defect-survival.png",
        CoarseSweepFigure = "coarse-sweep.png";
    /// <summary>The file name of the defect overlay drawn on frame <paramref name="frame"/> (defects-frame-NNN.png).</summary>
    public static string DefectFrameFigure(int frame) => $"defects-frame-{frame:D3}.png";

    /// <summary>The unit-suffixed column names of a run with scale <paramref name="u"/>.</summary>
    public static AnalysisColumns Columns(UnitScale u) => new(u);

    /// <summary>Whether <paramref name="folder"/> holds a summary.json (is an analysis folder, as far as a listing can tell).</summary>
    public static bool IsAnalysisFolder(string folder) => File.Exists(Path.Combine(folder, Summary));

    /// <summary>The files of an analysis folder that <see cref="Load"/> reads (for run.json inputs).</summary>
    public static IReadOnlyList<string> LoadedFiles(string folder) => [Path.Combine(folder, Summary), Path.Combine(folder, Tracks), Path.Combine(folder, Defects)];

    /// <summary>Loads summary.json, tracks.csv and defects.csv of an analysis folder; a one-line <see cref="InputException"/> on anything missing or malformed.</summary>
    public static MovieData Load(string condition, string replicate, string folder)
    {
        string summaryPath = Path.Combine(folder, Summary), tracksPath = Path.Combine(folder, Tracks), defectsPath = Path.Combine(folder, Defects);
        foreach (var f in new[] { summaryPath, tracksPath, defectsPath })
            if (!File.Exists(f)) throw new InputException(folder, $"is not a shapenoise analysis folder ({Path.GetFileName(f)} missing)");
        JsonNode summary;
        try { summary = JsonNode.Parse(File.ReadAllText(summaryPath))!; }
        catch (System.Text.Json.JsonException e) { throw new InputException(summaryPath, $"is not valid JSON ({e.Message})"); }
        string lu = summary["units"]?["length"]?.GetValue<string>() ?? throw new InputException(summaryPath, "has no units.length");
        string tu = summary["units"]?["time"]?.GetValue<string>() ?? throw new InputException(summaryPath, "has no units.time");
        var scale = UnitScale.FromNames(lu, tu) ?? throw new InputException(summaryPath, $"has units '{lu}'/'{tu}' (expected um or px, min or frame)");
        var col = Columns(scale);
        double tau = summary[Measures.TauQ.Name]?["value"]?.GetValue<double?>() ?? double.NaN;
        var (headward, flow, headFrames, flowFrames) = ReadPlusHalfSpeeds(defectsPath, col);
        // A movie whose defect stage did not apply contributes no defect speeds (docs/defects.md#where-defects-apply).
        string? notApplicable = summary["defects_status"]?.GetValue<string>() == "not_applicable"
            ? summary["defects_reason"]?.GetValue<string>() ?? "the defect stage did not apply" : null;
        if (notApplicable is not null) { headward = []; flow = []; headFrames = []; flowFrames = []; }
        return new MovieData(condition, replicate, folder, scale.LengthName, scale.TimeName, ReadTracks(tracksPath, col), tau, headward, flow)
        { DefectsNotApplicable = notApplicable, DefectHeadwardFrames = headFrames, FlowHeadwardFrames = flowFrames, MovieLevel = MovieLevel(summary) };
    }

    /// <summary>The movie-level estimates of summary.json (<see cref="ConditionComparison.MovieLevelMeasures"/>): value when ok,
    /// status and reason; a key missing from an older summary counts as not applicable.</summary>
    private static Dictionary<string, MovieValue> MovieLevel(JsonNode summary)
    {
        var d = new Dictionary<string, MovieValue>();
        foreach (var k in ConditionComparison.MovieLevelMeasures)
        {
            var o = summary[k];
            string status = o?["status"]?.GetValue<string>() ?? "not_applicable";
            double v = status == "ok" ? o?["value"]?.GetValue<double?>() ?? double.NaN : double.NaN;
            var ci = status == "ok" ? o?["ci95"] as JsonArray : null;
            d[k] = new MovieValue(v, status, o?["reason"]?.GetValue<string>() ?? (o is null ? "not in this analysis folder (made by an older version)" : null))
            { Low = ci?[0]?.GetValue<double?>() ?? double.NaN, High = ci?[1]?.GetValue<double?>() ?? double.NaN };
        }
        return d;
    }

    private static TrackUnit[] ReadTracks(string tracksPath, AnalysisColumns col)
    {
        var tracks = new List<TrackUnit>();
        ReadRows(tracksPath, ["frames", "in_statistics", col.VarL, col.VarW, col.VarAlong, col.VarAcross], row =>
        {
            if (!bool.Parse(row[1])) return;
            tracks.Add(new TrackUnit(Num(row[0], tracksPath, "frames"), Num(row[2], tracksPath, col.VarL), Num(row[3], tracksPath, col.VarW),
                NumOrNaN(row[4]), NumOrNaN(row[5])));
        });
        return tracks.ToArray();
    }

    /// <summary>Per +1/2 defect track (in id order), the mean headward speed and the mean headward cell flow, each with its number of frames.</summary>
    private static (double[] Headward, double[] Flow, int[] HeadwardFrames, int[] FlowFrames) ReadPlusHalfSpeeds(string defectsPath, AnalysisColumns col)
    {
        var head = new Dictionary<int, List<double>>(); var flow = new Dictionary<int, List<double>>();
        ReadRows(defectsPath, ["defect_track_id", "charge", col.HeadwardSpeed, col.FlowHeadwardSpeed], row =>
        {
            if (NumOrNaN(row[1]) != 0.5) return;
            int id = int.Parse(row[0], CultureInfo.InvariantCulture);
            double h = NumOrNaN(row[2]), f = NumOrNaN(row[3]);
            if (double.IsFinite(h)) { if (!head.TryGetValue(id, out var l)) head[id] = l = []; l.Add(h); }
            if (double.IsFinite(f)) { if (!flow.TryGetValue(id, out var l)) flow[id] = l = []; l.Add(f); }
        });
        var h = head.OrderBy(k => k.Key).ToList(); var f = flow.OrderBy(k => k.Key).ToList();
        return (h.Select(k => k.Value.Average()).ToArray(), f.Select(k => k.Value.Average()).ToArray(), h.Select(k => k.Value.Count).ToArray(), f.Select(k => k.Value.Count).ToArray());
    }

    private static double Num(string s, string file, string column)
        => double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && double.IsFinite(v) ? v
           : throw new InputException(file, $"column {column} has a value that is not a finite number ('{s}')");

    private static double NumOrNaN(string s) => double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : double.NaN;

    /// <summary>Reads the named columns of a CSV file with a header (CsvHelper), calling <paramref name="row"/> per record.</summary>
    public static void ReadRows(string path, string[] columns, Action<string[]> row) => ReadRows(path, columns, (values, _) => row(values));

    /// <summary>As <see cref="ReadRows(string, string[], Action{string[]})"/>, also passing each record's line number in the file (1-based; the header is line 1).</summary>
    public static void ReadRows(string path, string[] columns, Action<string[], long> row)
    {
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, new CsvConfiguration(CultureInfo.InvariantCulture));
        if (!csv.Read() || !csv.ReadHeader()) throw new InputException(path, "is empty (no header)");
        var header = csv.HeaderRecord!;
        var idx = columns.Select(c => Array.IndexOf(header, c)).ToArray();
        for (int i = 0; i < columns.Length; i++)
            if (idx[i] < 0) throw new InputException(path, $"has no column '{columns[i]}'");
        var values = new string[columns.Length];
        while (csv.Read())
        {
            for (int i = 0; i < columns.Length; i++) values[i] = csv.GetField(idx[i]) ?? "";
            row(values, csv.Parser.RawRow);
        }
    }
}

/// <summary>Reads conditions.csv (columns condition,replicate,path; paths relative to the file).</summary>
public static class ConditionTable
{
    /// <summary>The rows of conditions.csv at <paramref name="path"/> in file order, each path made absolute; throws <see cref="InputException"/> naming the file when it is missing, has an empty condition or path, lists no movies, repeats a condition and replicate, or has fewer than two conditions.</summary>
    public static List<ConditionRow> Read(string path)
    {
        if (!File.Exists(path)) throw new InputException(path, "no such file");
        var rows = new List<ConditionRow>();
        string dir = System.IO.Path.GetDirectoryName(System.IO.Path.GetFullPath(path))!;
        AnalysisFolder.ReadRows(path, ["condition", "replicate", "path"], (r, line) =>
        {
            if (string.IsNullOrWhiteSpace(r[0]) || string.IsNullOrWhiteSpace(r[2])) throw new InputException(path, $"row {line} has an empty condition or path");
            string p = System.IO.Path.GetFullPath(System.IO.Path.IsPathRooted(r[2]) ? r[2] : System.IO.Path.Combine(dir, r[2]));
            rows.Add(new ConditionRow(r[0].Trim(), r[1].Trim(), p, line));
        });
        if (rows.Count == 0) throw new InputException(path, "lists no movies");
        var dup = rows.GroupBy(r => (r.Condition, r.Replicate)).FirstOrDefault(g => g.Count() > 1);
        if (dup is not null) throw new InputException(path, $"lists condition '{dup.Key.Condition}' replicate '{dup.Key.Replicate}' twice");
        if (rows.Select(r => r.Condition).Distinct().Count() < 2) throw new InputException(path, "needs at least two conditions to compare");
        return rows;
    }
}
