using ShapeNoise.Reporting;
using ShapeNoise.Cli.Jobs;
using System.Globalization;
using System.Text;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

public class OutlineTableTests
{
    private static string Table(EllipseMovie e, int frames, bool shuffleIds, int vertices = 180, Func<int, string>? textId = null, int skipFrame = -1)
    {
        var sb = new StringBuilder("frame,cell,x,y\n");
        var t = e.Truth;
        for (int f = 0; f < frames; f++)
            for (int i = 0; i < e.Options.Cells; i++)
            {
                if (f == skipFrame) continue;
                string id = textId?.Invoke(i) ?? (shuffleIds ? t.LabelOfCell[f][i] : i + 1).ToString(CultureInfo.InvariantCulture);
                foreach (var p in Raster.EllipsePolygon(vertices, t.CentreX[i][f], t.CentreY[i][f], t.A[i][f], t.B[i][f], t.Theta[i][f]))
                    sb.Append(CultureInfo.InvariantCulture, $"{f},{id},{p.X:R},{p.Y:R}\n");
            }
        return sb.ToString();
    }

    [Fact]
    public void Analyze_OutlineTableOfSameCells_MatchesLabelPathWithinPixelation()
    {
        // The same synthetic cells as continuous outlines (table) and as rasterised masks (labels): per-cell area, length
        // and width agree within pixelation (area 3 %, L and W 0.4 px at a0 = 14, b0 = 9 px).
        using var d = new TempDir();
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 9, Frames = 12, Seed = 3 });
        File.WriteAllText(d["o.csv"], Table(e, 12, shuffleIds: true));
        var opts = new AnalysisOptions { BootstrapResamples = 50 };
        var table = OutlineTable.Read(d["o.csv"], null, null);
        var fromTable = MovieAnalyzer.RunFrames(table.Info, table.Linked(opts, false, null), opts, null, null, new PhaseTimes());
        var fromLabels = MovieAnalyzer.Run(MemoryMovie.Of(e), opts);
        Assert.Equal(fromLabels.Counts.Tracks, fromTable.Counts.Tracks);   // centroid linking recovers every track despite shuffled ids
        var byLabel = fromLabels.Cells.ToDictionary(c => (c.Frame, c.Label));
        int compared = 0;
        foreach (var c in fromTable.Cells)
        {
            var l = byLabel[(c.Frame, c.Label)];   // table ids are the movie's label ids of the same cell in that frame
            Assert.InRange(c.Shape.AreaPx2 / l.Shape.AreaPx2, 0.97, 1.03);
            Assert.True(Math.Abs(c.Shape.LengthPx - l.Shape.LengthPx) < 0.4 && Math.Abs(c.Shape.WidthPx - l.Shape.WidthPx) < 0.4);
            compared++;
        }
        Assert.Equal(9 * 12, compared);
    }

    [Fact]
    public void Read_MissingColumn_OneLineError()
    {
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], "frame,cell,x\n0,1,2\n");
        var ex = Assert.Throws<InputException>(() => OutlineTable.Read(d["t.csv"], null, null));
        Assert.Contains("t.csv", ex.Message); Assert.Contains("'y'", ex.Message);
    }

    [Fact]
    public void Read_NaNCoordinate_ErrorNamesRow()
    {
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], "frame,cell,x,y\n0,1,0,0\n0,1,5,NaN\n0,1,0,5\n");
        var ex = Assert.Throws<InputException>(() => OutlineTable.Read(d["t.csv"], null, null));
        Assert.Contains("row 3", ex.Message);
    }

    [Fact]
    public void Read_CellWithTwoVertices_SkippedAndCounted()
    {
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], "frame,cell,x,y\n0,1,0,0\n0,1,9,0\n0,1,9,9\n0,2,20,20\n0,2,25,25\n1,1,0,0\n1,1,9,0\n1,1,9,9\n");
        var t = OutlineTable.Read(d["t.csv"], null, null);
        Assert.Equal(1, t.SkippedFewVertices);
        Assert.Equal(2, t.Frames.Count);
        Assert.Single(t.Frames[0].Outlines);
    }

    [Fact]
    public void Cli_AnalyzeOutlineTable_WritesResults()
    {
        using var d = new TempDir();
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 6, Frames = 12, Seed = 4 });
        File.WriteAllText(d["o.csv"], Table(e, 12, shuffleIds: false, vertices: 90));
        var r = Support.Cli.Run("analyze", d["o.csv"], "--out", d["run"], "--ids-are-tracks", "--pixel-size", "0.5", "--frame-interval", "2", "--bootstrap", "20");
        Assert.True(r.ExitCode == 0, r.Stderr);
        var sum = System.Text.Json.Nodes.JsonNode.Parse(File.ReadAllText(d["run/summary.json"]))!;
        Assert.Equal(6, sum["tracks_used"]!.GetValue<int>());
        Assert.Equal("um", sum["units"]!["length"]!.GetValue<string>());
    }

    // Malformed rows: the expected messages follow the project's contract (docs/inputs.md, "Outline tables: refusals"):
    // one line naming the file and the 1-based line number of the row. Field counting follows RFC 4180 section 2
    // ("each line should contain the same number of fields throughout the file").
    [Theory]
    [InlineData("frame,cell,x,y\n0,1,0,0\n0,1,5\n0,1,0,5\n", "row 3: 3 field(s), the header has 4")]
    [InlineData("frame,cell,x,y\n0,1,0,0\n0,1,5,0\n0,1,0,5,7\n", "row 4: 5 field(s), the header has 4")]
    [InlineData("frame,cell,x,y\n0,1,0,0\n0,1,5,inf\n0,1,0,5\n", "row 3: coordinate (5, inf) is not a finite number")]
    [InlineData("frame,cell,x,y\n0,1,0,0\n0,1,5,0\n0,1,abc,5\n", "row 4: coordinate (abc, 5)")]
    [InlineData("frame,cell,x,y\n-1,1,0,0\n", "row 2: frame '-1' is not a non-negative integer")]
    [InlineData("frame,cell,x,y\n0,1,0,0\n0,,5,0\n", "row 3: the cell id is empty")]
    [InlineData("frame,cell,x,y\n0,1,0,0\n\n0,1,5,NaN\n", "row 4: coordinate")]   // the blank line 3 still counts as a line
    [InlineData("frame,cell,x,x,y\n0,1,0,0,0\n", "column 'x' twice")]
    public void Read_MalformedRow_ErrorNamesFileAndLine(string text, string expected)
    {
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], text);
        var ex = Assert.Throws<InputException>(() => OutlineTable.Read(d["t.csv"], null, null));
        Assert.Contains("t.csv", ex.Message);
        Assert.Contains(expected, ex.Message);
        Assert.DoesNotContain('\n', ex.Message);
    }

    [Fact]
    public void Read_TextIds_NumberedInOrderOfFirstAppearance()
    {
        // string.GetHashCode is randomised per process (.NET documentation of String.GetHashCode: "the hash code itself is
        // not guaranteed to be stable ... can differ across ... application domains"), so ids must come from the file.
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], "frame,cell,x,y\n0,zeta,0,0\n0,zeta,9,0\n0,zeta,9,9\n0,alpha,20,20\n0,alpha,29,20\n0,alpha,29,29\n"
                                      + "1,alpha,20,20\n1,alpha,29,20\n1,alpha,29,29\n1,\"new, cell\",40,40\n1,\"new, cell\",49,40\n1,\"new, cell\",49,49\n");
        var t = OutlineTable.Read(d["t.csv"], null, null);
        Assert.Equal([1, 2], t.Frames[0].Outlines.Select(o => o.Label));
        Assert.Equal([2, 3], t.Frames[1].Outlines.Select(o => o.Label));
        var again = OutlineTable.Read(d["t.csv"], null, null);
        Assert.Equal(t.Frames.SelectMany(f => f.Outlines.Select(o => o.Label)), again.Frames.SelectMany(f => f.Outlines.Select(o => o.Label)));
    }

    [Fact]
    public void Read_IntegerIds_Kept()
    {
        using var d = new TempDir();
        File.WriteAllText(d["t.csv"], "frame,cell,x,y\n0,17,0,0\n0,17,9,0\n0,17,9,9\n0,4,20,20\n0,4,29,20\n0,4,29,29\n");
        Assert.Equal([17, 4], OutlineTable.Read(d["t.csv"], null, null).Frames[0].Outlines.Select(o => o.Label));
    }

    [Fact]
    public void Read_FrameMissingBetweenOthers_WarningNamesIt()
    {
        using var d = new TempDir();
        var sb = new StringBuilder("frame,cell,x,y\n");
        foreach (int f in new[] { 0, 1, 3 }) sb.Append(CultureInfo.InvariantCulture, $"{f},1,0,0\n{f},1,9,0\n{f},1,9,9\n");
        File.WriteAllText(d["t.csv"], sb.ToString());
        var t = OutlineTable.Read(d["t.csv"], null, null);
        var w = Assert.Single(t.Warnings);
        Assert.Contains("frame 2 (1 in all) missing between frames 0 and 3", w);
        Assert.Contains("t.csv", w);
    }

    [Fact]
    public void AnalyzeJob_TableWithMissingFrame_WarningInResultAndSummary()
    {
        using var d = new TempDir();
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 6, Frames = 14, Seed = 5 });
        File.WriteAllText(d["o.csv"], Table(e, 14, shuffleIds: false, vertices: 60, skipFrame: 6));
        var opts = new AnalysisOptions { BootstrapResamples = 20, MinTrackFrames = 3, IdsAreTracks = true };
        var r = AnalyzeJob.Run(d["o.csv"], d["run"], opts, _ => throw new InvalidOperationException("a table opens no movie"));
        Assert.Contains(r.Warnings, w => w.Contains("frame 6 (1 in all) missing"));
        Assert.Contains("frame 6 (1 in all) missing", File.ReadAllText(d["run/summary.json"]));
    }

    [Fact]
    public void Cli_AnalyzeTextIdsTwice_IdenticalCellsCsv()
    {
        // Two separate processes (each with its own string-hash seed) must write the same cells.csv.
        using var d = new TempDir();
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 5, Frames = 12, Seed = 6 });
        File.WriteAllText(d["o.csv"], Table(e, 12, shuffleIds: false, vertices: 60, textId: i => $"cell-{(char)('e' - i)}"));
        string[] Args(string o) => ["analyze", d["o.csv"], "--out", d[o], "--ids-are-tracks", "--bootstrap", "20"];
        var a = Support.Cli.Run(Args("a"));
        var b = Support.Cli.Run(Args("b"));
        Assert.True(a.ExitCode == 0 && b.ExitCode == 0, a.Stderr + b.Stderr);
        Assert.Equal(File.ReadAllText(d["a/cells.csv"]), File.ReadAllText(d["b/cells.csv"]));
        Assert.Equal(File.ReadAllText(d["a/tracks.csv"]), File.ReadAllText(d["b/tracks.csv"]));
    }

    [Fact]
    public void Cli_AnalyzeShortRow_Exit2NamesRowWritesNothing()
    {
        using var d = new TempDir();
        File.WriteAllText(d["o.csv"], "frame,cell,x,y\n0,1,0,0\n0,1,9,0\n0,1,9\n");
        var r = Support.Cli.Run("analyze", d["o.csv"], "--out", d["run"]);
        Assert.Equal(2, r.ExitCode);
        Assert.Contains("o.csv", r.Stderr);
        Assert.Contains("row 4", r.Stderr);
        Assert.Single(r.Stderr.Trim().Split('\n'));
        Assert.False(Directory.Exists(d["run"]));
    }
}
