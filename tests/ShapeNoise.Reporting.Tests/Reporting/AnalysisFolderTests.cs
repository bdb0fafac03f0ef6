using System.Globalization;
using System.Text.Json.Nodes;
using CsvHelper;
using CsvHelper.Configuration;
using ShapeNoise.Cli.Jobs;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

public class AnalysisFolderTests
{
    /// <summary>Reads a CSV file with CsvHelper into a header and rows of fields.</summary>
    internal static (string[] Header, List<string[]> Rows) ReadCsv(string path)
    {
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, new CsvConfiguration(CultureInfo.InvariantCulture));
        csv.Read(); csv.ReadHeader();
        var header = csv.HeaderRecord!;
        var rows = new List<string[]>();
        while (csv.Read()) rows.Add(Enumerable.Range(0, header.Length).Select(i => csv.GetField(i) ?? "").ToArray());
        return (header, rows);
    }

    [Fact]
    public void Columns_PixelRun_SuffixesArePxFramesAndPxPerFrame()
    {
        // docs/measures.md#coordinates-and-units: without a pixel size and frame interval, lengths are px, times frames,
        // speeds px/frame; docs/measures.md#output-contract: summary.json units are "px" and "frame".
        var u = UnitScale.Of(new Units(null, "unknown", null, "unknown"));
        var c = AnalysisFolder.Columns(u);
        Assert.Equal(("px", "frame"), (u.LengthName, u.TimeName));
        Assert.Equal("var_L_px2", c.VarL);
        Assert.Equal("var_across_px2", c.VarAcross);
        Assert.Equal("time_frames", c.Time);
        Assert.Equal("duration_frames", c.Duration);
        Assert.Equal("x_px", c.X);
        Assert.Equal("headward_speed_px_per_frame", c.HeadwardSpeed);
        Assert.Equal("flow_headward_speed_px_per_frame", c.FlowHeadwardSpeed);
        Assert.Null(c.Lag);          // lag_frames alone
        Assert.Null(c.DefectUm);     // x_px, y_px alone
        Assert.Null(c.CellPx);       // cells.csv's centroid columns are x_px, y_px already
        Assert.Equal(1.0, u.SpeedFactor);
    }

    [Fact]
    public void Columns_MicronRun_SuffixesMatchTheGoldenHeaders()
    {
        // The golden header file (tests/ShapeNoise.Reporting.Tests/Golden/ellipses.csv-headers.txt, the output contract of a run in
        // um and min) must hold every unit-suffixed column name that AnalysisColumns gives for um/min.
        var u = UnitScale.Of(new Units(0.5, "option", 2.0, "option"));
        var c = AnalysisFolder.Columns(u);
        string root = new DirectoryInfo(AppContext.BaseDirectory).Parent!.Parent!.Parent!.Parent!.Parent!.FullName;
        var headers = File.ReadLines(Path.Combine(root, "tests", "ShapeNoise.Reporting.Tests", "Golden", "ellipses.csv-headers.txt")).Where(l => !l.StartsWith('#'))
            .ToDictionary(l => l[..l.IndexOf(':')], l => l[(l.IndexOf(':') + 2)..].Split(','));
        Assert.Equal(new[] { "frame", c.Time, "label", "track_id", "in_statistics", c.X, c.Y, c.Area, c.Perimeter, c.Length, c.Width, "aspect_ratio",
            "elongation_q", "theta_rad", c.MeanRadius, c.Mode2Amplitude, "star_shaped", "vertices", c.CellPx!.Value.X, c.CellPx!.Value.Y }, headers[AnalysisFolder.Cells]);
        Assert.Equal(new[] { "track_id", "first_frame", "last_frame", "frames", c.Duration, "end", "in_statistics", c.MeanArea, c.MeanLength, c.MeanWidth,
            c.VarL, c.VarW, c.VarAlongRaw, c.VarAcrossRaw, c.FloorAlong, c.FloorAcross, c.VarAlong, c.VarAcross, "below_floor" }, headers[AnalysisFolder.Tracks]);
        Assert.Contains(c.HeadwardSpeed, headers[AnalysisFolder.Defects]);
        Assert.Contains(c.FlowHeadwardSpeed, headers[AnalysisFolder.Defects]);
        Assert.Contains(c.VHead, headers[AnalysisFolder.DefectFlow]);
        Assert.Contains(c.Lag!, headers[AnalysisFolder.Autocorrelation]);
        Assert.Equal("um/min", u.SpeedLabel);
        Assert.Equal(0.25, u.SpeedFactor, 15);   // 0.5 um/px / 2 min/frame
    }

    [Fact]
    public void Load_WrittenAnalysis_ReadsBackTheWrittenNamesAndValues()
    {
        using var d = new TempDir();
        SynthJob.Ellipses(new EllipseMovieOptions { Cells = 6, Frames = 16, Seed = 3 }, d["movie"]);
        var result = AnalyzeJob.Run(d["movie/labels.tif"], d["run"], new AnalysisOptions { BootstrapResamples = 50 }, LabelMovies.Open);
        var u = UnitScale.Of(result.Units);
        var movie = AnalysisFolder.Load("wt", "1", d["run"]);

        // Every file the folder type names for an analysis is there (sim-params in its default json form).
        foreach (var f in new[] { AnalysisFolder.Summary, AnalysisFolder.Cells, AnalysisFolder.Tracks, AnalysisFolder.Spectrum, AnalysisFolder.Profile,
                     AnalysisFolder.Autocorrelation, AnalysisFolder.Defects, AnalysisFolder.DefectFlow, AnalysisFolder.SimParamsJson, AnalysisFolder.Floor,
                     AnalysisFolder.Run, AnalysisFolder.Report, AnalysisFolder.AnisotropyFigure, AnalysisFolder.SpectrumFigure })
            Assert.True(File.Exists(Path.Combine(d["run"], f)), f);
        var summary = JsonNode.Parse(File.ReadAllText(Path.Combine(d["run"], AnalysisFolder.Summary)))!;
        Assert.Equal(summary["units"]!["length"]!.GetValue<string>(), movie.LengthUnit);
        Assert.Equal(summary["units"]!["time"]!.GetValue<string>(), movie.TimeUnit);
        Assert.Equal(u.LengthName, movie.LengthUnit);
        Assert.Equal(summary["tau_q"]!["value"]?.GetValue<double>() ?? double.NaN, movie.TauQ);

        // tracks.csv read independently (CsvHelper, by the header the writer wrote): the same tracks and numbers.
        var (header, rows) = ReadCsv(Path.Combine(d["run"], AnalysisFolder.Tracks));
        var col = AnalysisFolder.Columns(u);
        int inStats = Array.IndexOf(header, "in_statistics"), varL = Array.IndexOf(header, col.VarL), varW = Array.IndexOf(header, col.VarW);
        Assert.True(varL >= 0 && varW >= 0, string.Join(",", header));
        var used = rows.Where(r => r[inStats] == "True").ToList();
        Assert.True(used.Count > 0);
        Assert.Equal(used.Count, movie.Tracks.Length);
        for (int i = 0; i < used.Count; i++)
        {
            Assert.Equal(double.Parse(used[i][varL], CultureInfo.InvariantCulture), movie.Tracks[i].VarL);
            Assert.Equal(double.Parse(used[i][varW], CultureInfo.InvariantCulture), movie.Tracks[i].VarW);
        }
        // The pooled ratio of what was read back is the one the writer pooled (var_L / var_W, docs/measures.md#movie-pooling).
        Assert.Equal(result.Tracks.Count(t => t.Used), movie.Tracks.Length);
    }

    [Fact]
    public void Load_UnknownUnitName_InputExceptionNamesSummary()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["run"]);
        File.WriteAllText(d["run/summary.json"], """{"units": {"length": "mm", "time": "min"}}""");
        File.WriteAllText(d["run/tracks.csv"], "frames\n");
        File.WriteAllText(d["run/defects.csv"], "charge\n");
        var e = Assert.Throws<ShapeNoise.Reading.InputException>(() => AnalysisFolder.Load("wt", "1", d["run"]));
        Assert.EndsWith("summary.json", e.PathName);
        Assert.Contains("mm", e.Problem);
    }
}
