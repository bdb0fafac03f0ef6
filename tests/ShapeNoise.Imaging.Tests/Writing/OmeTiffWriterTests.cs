using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Tests.Reading;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Writing;

/// <summary>
/// The TIFFs the tool writes (segment's and synth's labels.tif, synth's raw.tif) carry OME-XML that a third-party reader
/// understands: tifffile (Debian's python3-tifffile, C. Gohlke) must see an OME series with axes TYX, the pixel values
/// we wrote, and PhysicalSizeX/Y in µm and TimeIncrement in min (docs/inputs.md#written-tiffs). tifffile parses the
/// OME-XML with its own code (TiffFile.is_ome, series[0].kind == "ome", xml2dict), so these checks do not reuse ours.
/// Our reader must read the same scale back. A machine without python3-tifffile fails these tests (naming the package).
/// </summary>
public class OmeTiffWriterTests
{
    /// <summary>Prints, as JSON, what tifffile makes of a file: OME or not, series kind, axes, shape, the Pixels
    /// attributes of the first Image (typed by tifffile's xml2dict) and the sum of every plane.</summary>
    private const string Probe = """
        import json, sys, tifffile
        with tifffile.TiffFile(sys.argv[1]) as tf:
            s = tf.series[0]
            out = {"is_ome": bool(tf.is_ome), "kind": getattr(s, "kind", None), "axes": s.axes, "shape": list(s.shape), "series": len(tf.series)}
            if tf.ome_metadata:
                ome = tifffile.xml2dict(tf.ome_metadata)["OME"]
                out["pixels"] = {k: v for k, v in ome["Image"]["Pixels"].items() if not isinstance(v, (dict, list))}
            d = s.asarray()
            out["sums"] = [int(p.sum()) for p in d.reshape(d.shape[0], -1)]
        print(json.dumps(out))
        """;

    private static JsonObject Tifffile(string path) => JsonNode.Parse(Python.Run("tifffile", "python3-tifffile", Probe, path))!.AsObject();

    /// <summary>Three 20 x 12 frames whose pixel (x, y) of frame t holds 1 + x + 20 y + 1000 t: sums known in closed form.</summary>
    private static List<int[]> Frames()
    {
        var frames = new List<int[]>();
        for (int t = 0; t < 3; t++)
        {
            var f = new int[20 * 12];
            for (int i = 0; i < f.Length; i++) f[i] = 1 + i + 1000 * t;
            frames.Add(f);
        }
        return frames;
    }

    /// <summary>Sum of 1 + i + 1000 t over i = 0..239: 240 + 239*240/2 + 240000 t (arithmetic series).</summary>
    private static long Sum(int t) => 240 + 239 * 240 / 2 + 240_000L * t;

    [Fact]
    public void OmeXml_KnownScale_TifffileSeesTyxSeriesWithUmAndMinUnits()
    {
        using var d = new TempDir();
        string path = d["labels.tif"];
        TiffWriter.Write(path, 20, 12, Frames(), TiffWriter.PixelType.UInt16, TiffWriter.OmeXml(20, 12, 3, "uint16", 0.65, 2.5));
        var o = Tifffile(path);
        Assert.True((bool)o["is_ome"]!);
        Assert.Equal("ome", (string?)o["kind"]);
        Assert.Equal("TYX", (string)o["axes"]!);
        Assert.Equal([3, 12, 20], o["shape"]!.AsArray().Select(n => (int)n!));
        Assert.Equal([Sum(0), Sum(1), Sum(2)], o["sums"]!.AsArray().Select(n => (long)n!));
        var p = o["pixels"]!.AsObject();
        // Exact: the values are written with round-trip formatting and parsed back as doubles.
        Assert.Equal(0.65, (double)p["PhysicalSizeX"]!);
        Assert.Equal(0.65, (double)p["PhysicalSizeY"]!);
        Assert.Equal("µm", (string)p["PhysicalSizeXUnit"]!);
        Assert.Equal("µm", (string)p["PhysicalSizeYUnit"]!);
        Assert.Equal(2.5, (double)p["TimeIncrement"]!);
        Assert.Equal("min", (string)p["TimeIncrementUnit"]!);
        Assert.Equal("uint16", (string)p["Type"]!);

        using var movie = LabelMovies.Open(path);
        Assert.Equal(0.65, movie.Info.PixelSizeUm);
        Assert.Equal(2.5, movie.Info.FrameIntervalMin);
        Assert.Equal("OME-XML", movie.Info.PixelSizeSource);
        Assert.Equal("OME-XML", movie.Info.FrameIntervalSource);
    }

    [Theory]
    [InlineData(null, null)]
    [InlineData(double.NaN, 0.0)]
    public void OmeXml_UnknownScale_NoScaleAttributesAndReadersInPixels(double? pixelSizeUm, double? frameIntervalMin)
    {
        using var d = new TempDir();
        string path = d["labels.tif"];
        TiffWriter.Write(path, 20, 12, Frames(), TiffWriter.PixelType.UInt16, TiffWriter.OmeXml(20, 12, 3, "uint16", pixelSizeUm, frameIntervalMin));
        var o = Tifffile(path);
        Assert.Equal("TYX", (string)o["axes"]!);
        var p = o["pixels"]!.AsObject();
        foreach (var name in new[] { "PhysicalSizeX", "PhysicalSizeY", "PhysicalSizeXUnit", "PhysicalSizeYUnit", "TimeIncrement", "TimeIncrementUnit" })
            Assert.False(p.ContainsKey(name), $"{name} written for an unknown scale");

        using var movie = LabelMovies.Open(path);
        Assert.Null(movie.Info.PixelSizeUm);
        Assert.Null(movie.Info.FrameIntervalMin);
    }

    [Fact]
    public void Segment_TifffileOmeInNanometresAndSeconds_LabelsCarrySameScaleInUmAndMin()
    {
        // Corpus/dimensions/README.md: ome_nm_seconds.tif was written by tifffile with PhysicalSizeX/Y = 325 nm and
        // TimeIncrement = 90 s, i.e. 0.325 um and 1.5 min. segment must pass that scale on, in µm and min.
        using var d = new TempDir();
        var r = Support.Cli.Run("segment", Path.Combine(DimensionTests.CorpusDir(), "ome_nm_seconds.tif"), "--out", d["out"]);
        Assert.True(r.ExitCode == 0, r.Stderr + r.Stdout);
        string labels = Path.Combine(d["out"], "labels.tif");
        var o = Tifffile(labels);
        Assert.Equal("TYX", (string)o["axes"]!);
        Assert.Equal([3, 24, 32], o["shape"]!.AsArray().Select(n => (int)n!));
        var p = o["pixels"]!.AsObject();
        // 325 nm -> 0.325 um and 90 s -> 1.5 min are products of doubles: equal to within a few ulps.
        Assert.Equal(0.325, (double)p["PhysicalSizeX"]!, 12);
        Assert.Equal(0.325, (double)p["PhysicalSizeY"]!, 12);
        Assert.Equal("µm", (string)p["PhysicalSizeXUnit"]!);
        Assert.Equal(1.5, (double)p["TimeIncrement"]!, 12);
        Assert.Equal("min", (string)p["TimeIncrementUnit"]!);
        using var movie = LabelMovies.Open(labels);
        Assert.Equal(0.325, movie.Info.PixelSizeUm!.Value, 12);
        Assert.Equal(1.5, movie.Info.FrameIntervalMin!.Value, 12);
    }
}
