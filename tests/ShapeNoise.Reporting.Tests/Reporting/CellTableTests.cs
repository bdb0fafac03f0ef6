using System.Text.Json.Nodes;
using ShapeNoise.Cli.Jobs;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

/// <summary>
/// cells.csv as a tracks table for other tools (docs/python.md#napari-tracks): one row per (track_id, frame), with the
/// centroid in the image's pixel frame (x_px = column, y_px = row, pixel centres at index + 0.5;
/// docs/measures.md#coordinates). The reference is outside our code: the label movie read by tifffile (Debian's
/// python3-tifffile) and numpy, whose mean pixel index of each (frame, label) mask + 0.5 is the pixel-set centroid.
/// </summary>
public class CellTableTests
{
    /// <summary>Per row of cells.csv: the mask of its (frame, label) in labels.tif, its pixel centroid, and the
    /// differences to x_px, y_px; also repeated (track_id, frame) pairs, empty track ids and the px/um ratio.</summary>
    private const string Check = """
        import csv, json, sys, numpy, tifffile
        img = tifffile.imread(sys.argv[1])
        rows = list(csv.DictReader(open(sys.argv[2], newline="")))
        dx = dy = ratio = 0.0; seen = set(); dup = empty = 0
        for r in rows:
            if r["track_id"] == "": empty += 1; continue
            key = (int(r["track_id"]), int(r["frame"]))
            dup += key in seen; seen.add(key)
            ys, xs = numpy.nonzero(img[int(r["frame"])] == int(r["label"]))
            dx = max(dx, abs(xs.mean() + 0.5 - float(r["x_px"]))); dy = max(dy, abs(ys.mean() + 0.5 - float(r["y_px"])))
            ratio = max(ratio, abs(float(r["x_um"]) / float(r["x_px"]) - float(sys.argv[3])))
        print(json.dumps({"rows": len(rows), "max_dx": dx, "max_dy": dy, "duplicates": dup, "empty_track": empty, "ratio_error": ratio}))
        """;

    [Fact]
    public void Cells_MicronRun_PixelCentroidsMatchLabelMasksAndOneRowPerTrackAndFrame()
    {
        using var d = new TempDir();
        var o = new EllipseMovieOptions { Cells = 6, Frames = 12, Seed = 3 };
        SynthJob.Ellipses(o, d["movie"]);
        AnalyzeJob.Run(d["movie/labels.tif"], d["run"], new AnalysisOptions { BootstrapResamples = 20 }, LabelMovies.Open);
        var r = JsonNode.Parse(Python.Run("tifffile", "python3-tifffile", Check, d["movie/labels.tif"], d["run/cells.csv"],
            o.PixelSizeUm.ToString("R", System.Globalization.CultureInfo.InvariantCulture)))!;
        Assert.True((int)r["rows"]! >= 6 * 12 / 2, $"only {(int)r["rows"]!} rows");
        Assert.Equal(0, (int)r["duplicates"]!);
        Assert.Equal(0, (int)r["empty_track"]!);
        // x_um = x_px * pixel size, to the 15-17 digits CsvHelper writes.
        Assert.True((double)r["ratio_error"]! < 1e-9, $"x_um / x_px differs from the pixel size by {(double)r["ratio_error"]!}");
        // The outline polygon's area centroid and the pixel-set centroid differ only by the corner cuts of the midpoint
        // outline (sub-pixel); a swapped axis or a missing +0.5 would be off by pixels or by exactly 0.5.
        Assert.True((double)r["max_dx"]! < 0.2, $"x_px off by {(double)r["max_dx"]!} px");
        Assert.True((double)r["max_dy"]! < 0.2, $"y_px off by {(double)r["max_dy"]!} px");
    }

    /// <summary>The fast cells.csv writer against CsvHelper (the general-purpose CSV library the other tables use) with the
    /// table's class map: the same bytes, for rows with NaN, infinities, negative zero, subnormal and large values, a
    /// label id above 2^31 - 1, in a um run (x_px, y_px columns) and a px run.</summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void CellsCsv_AwkwardValues_SameBytesAsCsvHelper(bool micron)
    {
        using var d = new TempDir();
        var cols = new ShapeNoise.Reporting.AnalysisColumns(new ShapeNoise.Reporting.UnitScale(micron, micron, 0.65, 2.5));
        double[] awkward = [double.NaN, double.PositiveInfinity, double.NegativeInfinity, -0.0, double.Epsilon, 1e300, -123.456, 0.1 + 0.2, 1.0 / 3];
        var rnd = new Random(8);
        var rows = new List<ShapeNoise.Reporting.CellRow>();
        for (int i = 0; i < 200; i++)
        {
            double V(int k) => i < awkward.Length * 2 ? awkward[(i + k) % awkward.Length] : (rnd.NextDouble() - 0.5) * Math.Pow(10, rnd.Next(-8, 8));
            rows.Add(new ShapeNoise.Reporting.CellRow(i, V(0), i == 3 ? unchecked((int)3_000_000_000u) : rnd.Next(), i % 5 == 0 ? -1 : i, i % 2 == 0,
                V(1), V(2), V(3), V(4), V(5), V(6), V(7), V(8), V(9), V(10), V(11), i % 3 == 0, rnd.Next(3, 400), V(12), V(13)));
        }
        ShapeNoise.Reporting.Tables.Write(d["reference.csv"], rows, new ShapeNoise.Reporting.CellMap(cols));
        ShapeNoise.Reporting.CellsCsv.Write(d["fast.csv"], rows, cols);
        Assert.Equal(File.ReadAllBytes(d["reference.csv"]), File.ReadAllBytes(d["fast.csv"]));
    }
}
