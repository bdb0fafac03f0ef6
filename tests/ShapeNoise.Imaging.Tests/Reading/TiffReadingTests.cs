using OpenCvSharp;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Reading;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

public class TiffReadingTests
{
    private static int[] RandomLabels(int n, int max, int seed)
    {
        var rng = new Random(seed);
        return Enumerable.Range(0, n).Select(_ => rng.Next(max + 1)).ToArray();
    }

    [Fact]
    public void FramesWanted_FivePageStack_ReturnsOnlyThoseFramesWithTheirPixels()
    {
        using var d = new TempDir();
        int w = 19, h = 11;
        var pages = Enumerable.Range(0, 5).Select(i => RandomLabels(w * h, 60000, 40 + i)).ToList();
        TiffWriter.Write(d["a.tif"], w, h, pages, TiffWriter.PixelType.UInt16, null, true);
        using var movie = LabelMovies.Open(d["a.tif"]);
        var got = movie.Frames(i => i is 1 or 4).ToList();
        Assert.Equal([1, 4], got.Select(f => f.Index));
        Assert.Equal(pages[1], got[0].Labels);
        Assert.Equal(pages[4], got[1].Labels);
    }

    [Theory]
    [InlineData(TiffWriter.PixelType.UInt8, 255, true)]
    [InlineData(TiffWriter.PixelType.UInt16, 65535, true)]
    [InlineData(TiffWriter.PixelType.UInt16, 65535, false)]
    [InlineData(TiffWriter.PixelType.UInt32, 2_000_000_000, true)]
    public void Read_WrittenStack_ReturnsSameLabelsPageByPage(TiffWriter.PixelType type, int max, bool deflate)
    {
        using var d = new TempDir();
        int w = 37, h = 23;
        var pages = Enumerable.Range(0, 5).Select(i => RandomLabels(w * h, max, i)).ToList();
        TiffWriter.Write(d["a.tif"], w, h, pages, type, null, deflate);
        using var movie = LabelMovies.Open(d["a.tif"]);
        Assert.Equal(5, movie.Info.FrameCount);
        int t = 0;
        foreach (var f in movie.Frames()) Assert.Equal(pages[t++], f.Labels);
    }

    [Fact]
    public void Read_OmeXml_GivesPixelSizeAndFrameIntervalInUmAndMin()
    {
        using var d = new TempDir();
        var xml = TiffWriter.OmeXml(8, 8, 2, "uint16", 0.65, 0.5);   // written as 0.65 µm and 30 s
        TiffWriter.Write(d["m.tif"], 8, 8, [new int[64], new int[64]], TiffWriter.PixelType.UInt16, xml);
        using var movie = LabelMovies.Open(d["m.tif"]);
        Assert.Equal(0.65, movie.Info.PixelSizeUm!.Value, 12);
        Assert.Equal(0.5, movie.Info.FrameIntervalMin!.Value, 12);
    }

    [Fact]
    public void Metadata_OmeNanometresAndMilliseconds_ConvertedToUmAndMin()
    {
        const string xml = "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\"><Image ID=\"Image:0\"><Pixels ID=\"Pixels:0\" " +
                           "DimensionOrder=\"XYZCT\" Type=\"uint16\" SizeX=\"4\" SizeY=\"4\" SizeZ=\"1\" SizeC=\"1\" SizeT=\"3\" " +
                           "PhysicalSizeX=\"325\" PhysicalSizeXUnit=\"nm\" TimeIncrement=\"90000\" TimeIncrementUnit=\"ms\"/></Image></OME>";
        var s = MovieMetadata.FromDescription("x.tif", xml, 0);
        Assert.Equal(0.325, s.PixelSizeUm!.Value, 12);
        Assert.Equal(1.5, s.FrameIntervalMin!.Value, 12);
    }

    [Fact]
    public void Read_NoMetadata_LeavesUnitsUnknown()
    {
        using var d = new TempDir();
        TiffWriter.Write(d["n.tif"], 4, 4, [new int[16], new int[16]]);
        using var movie = LabelMovies.Open(d["n.tif"]);
        Assert.Null(movie.Info.PixelSizeUm);
        Assert.Null(movie.Info.FrameIntervalMin);
    }

    [Theory]
    [InlineData(5)]      // LZW
    [InlineData(32773)]  // PackBits
    [InlineData(8)]      // Deflate
    public void Read_TiffWrittenByOpenCv_MatchesOpenCvDecode(int compression)
    {
        // Reference library: OpenCV (libtiff inside) writes the file and decodes it; our reader must agree pixel for pixel.
        using var d = new TempDir();
        var labels = RandomLabels(61 * 47, 300, 3);
        for (int i = 0; i < labels.Length; i++) labels[i] = labels[i] < 150 ? 0 : labels[i]; // runs of background, as in label images
        using var mat = new Mat(47, 61, MatType.CV_16UC1);
        for (int y = 0; y < 47; y++) for (int x = 0; x < 61; x++) mat.Set(y, x, (ushort)labels[y * 61 + x]);
        Assert.True(Cv2.ImWrite(d["cv.tif"], mat, new ImageEncodingParam(ImwriteFlags.TiffCompression, compression)));
        using var back = Cv2.ImRead(d["cv.tif"], ImreadModes.Unchanged);
        using var movie = new TiffLabelMovie(d["cv.tif"]);
        var ours = movie.Frames().Single().Labels;
        for (int y = 0; y < 47; y++) for (int x = 0; x < 61; x++) Assert.Equal(back.Get<ushort>(y, x), ours[y * 61 + x]);
    }

    [Fact]
    public void Read_PngFolder_NaturalOrder()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["f"]);
        foreach (var i in new[] { 1, 2, 10 })
        {
            using var mat = new Mat(5, 6, MatType.CV_16UC1, new Scalar(i * 100));
            Cv2.ImWrite(Path.Combine(d["f"], $"frame{i}.png"), mat);
        }
        using var movie = LabelMovies.Open(d["f"]);
        Assert.Equal([100, 200, 1000], movie.Frames().Select(f => f.Labels[0]).ToArray());
    }

    [Fact]
    public void Read_TruncatedTiff_OneLineErrorNamesFileAndProblem()
    {
        using var d = new TempDir();
        TiffWriter.Write(d["t.tif"], 64, 64, Enumerable.Range(0, 3).Select(i => RandomLabels(64 * 64, 9, i)), TiffWriter.PixelType.UInt16, null, false);
        var bytes = File.ReadAllBytes(d["t.tif"]);
        File.WriteAllBytes(d["t.tif"], bytes[..(bytes.Length / 2)]);
        var e = Assert.Throws<InputException>(() => { using var m = LabelMovies.Open(d["t.tif"]); m.Frames().ToList(); });
        Assert.Contains("t.tif", e.Message);
        Assert.Contains("truncated", e.Message);
        Assert.DoesNotContain("\n", e.Message);
    }

    [Fact]
    public void Read_FloatTiff_RejectedAsFloatingPoint()
    {
        using var d = new TempDir();
        TiffWriter.Write(d["f.tif"], 4, 4, [new int[16], new int[16]], TiffWriter.PixelType.Float32);
        var e = Assert.Throws<InputException>(() => LabelMovies.Open(d["f.tif"]));
        Assert.Contains("floating-point", e.Message);
    }

    [Fact]
    public void Read_NotATiff_Rejected()
    {
        using var d = new TempDir();
        File.WriteAllText(d["x.tif"], "hello, not an image");
        var e = Assert.Throws<InputException>(() => LabelMovies.Open(d["x.tif"]));
        Assert.Contains("not a TIFF", e.Message);
    }
}

public class ImageJHeaderTests
{
    [Fact]
    public void Metadata_ImageJHeader_UsesXResolutionAndFinterval()
    {
        // ImageJ stores the pixel size as XResolution (pixels per unit) and the frame interval as finterval in seconds
        // (common practice of ImageJ/Fiji TIFF headers).
        var s = MovieMetadata.FromDescription("x.tif", "ImageJ=1.54f\nimages=10\nframes=10\nunit=micron\nfinterval=30\n", 2.0);
        Assert.Equal(0.5, s.PixelSizeUm!.Value, 12);
        Assert.Equal(0.5, s.FrameIntervalMin!.Value, 12);
    }
}
