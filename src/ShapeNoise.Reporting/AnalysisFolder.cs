using System.Globalization;
using System.Text.Json.Nodes;
using CsvHelper;
using CsvHelper.Configuration;
using ShapeNoise.Comparison;
using ShapeNoise.Reading;

namespace ShapeNoise.Reporting;

/// <summary>Reads an analysis folder back (for compare, plan and notebooks): summary.json, tracks.csv, defects.csv.</summary>
public static class AnalysisFolder
{
    /// <summary>Loads summary.json, tracks.csv and defects.csv of an analysis folder; a one-line <see cref="InputException"/> on anything missing or malformed.</summary>
    public static MovieData Load(string condition, string replicate, string folder)
    {
        string summaryPath = Path.Combine(folder, "summary.json"), tracksPath = Path.Combine(folder, "tracks.csv"), defectsPath = Path.Combine(folder, "defects.csv");
        foreach (var f in new[] { summaryPath, tracksPath, defectsPath })
            if (!File.Exists(f)) throw new InputException(folder, $"is not a shapenoise analysis folder ({Path.GetFileName(f)} missing)");
        JsonNode summary;
        try { summary = JsonNode.Parse(File.ReadAllText(summaryPath))!; }
        catch (System.Text.Json.JsonException e) { throw new InputException(summaryPath, $"is not valid JSON ({e.Message})"); }
        string lu = summary["units"]?["length"]?.GetValue<string>() ?? throw new InputException(summaryPath, "has no units.length");
        string tu = summary["units"]?["time"]?.GetValue<string>() ?? throw new InputException(summaryPath, "has no units.time");
        string l2 = lu == "um" ? "um2" : "px2";
        double tau = summary["tau_q"]?["value"]?.GetValue<double?>() ?? double.NaN;

        var tracks = new List<TrackUnit>();
        ReadRows(tracksPath, ["frames", "in_statistics", $"var_L_{l2}", $"var_W_{l2}", $"var_along_{l2}", $"var_across_{l2}"], row =>
        {
            if (!bool.Parse(row[1])) return;
            tracks.Add(new TrackUnit(Num(row[0], tracksPath, "frames"), Num(row[2], tracksPath, "var_L"), Num(row[3], tracksPath, "var_W"),
                NumOrNaN(row[4]), NumOrNaN(row[5])));
        });
        string v = $"{lu}_per_{(tu == "min" ? "min" : "frame")}";
        var head = new Dictionary<int, List<double>>(); var flow = new Dictionary<int, List<double>>();
        ReadRows(defectsPath, ["defect_track_id", "charge", $"headward_speed_{v}", $"flow_headward_speed_{v}"], row =>
        {
            if (NumOrNaN(row[1]) != 0.5) return;
            int id = int.Parse(row[0], CultureInfo.InvariantCulture);
            double h = NumOrNaN(row[2]), f = NumOrNaN(row[3]);
            if (double.IsFinite(h)) { if (!head.TryGetValue(id, out var l)) head[id] = l = []; l.Add(h); }
            if (double.IsFinite(f)) { if (!flow.TryGetValue(id, out var l)) flow[id] = l = []; l.Add(f); }
        });
        return new MovieData(condition, replicate, folder, lu, tu, tracks.ToArray(), tau,
            head.OrderBy(k => k.Key).Select(k => k.Value.Average()).ToArray(), flow.OrderBy(k => k.Key).Select(k => k.Value.Average()).ToArray());
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
