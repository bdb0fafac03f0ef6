using System.Globalization;
using System.Text;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

public class OutlineTableTests
{
    private static string Table(EllipseMovie e, int frames, bool shuffleIds, int vertices = 180)
    {
        var sb = new StringBuilder("frame,cell,x,y\n");
        var t = e.Truth;
        for (int f = 0; f < frames; f++)
            for (int i = 0; i < e.Options.Cells; i++)
            {
                int id = shuffleIds ? t.LabelOfCell[f][i] : i + 1;
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
}
