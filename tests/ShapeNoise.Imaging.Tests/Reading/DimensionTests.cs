using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Reading;

namespace ShapeNoise.Tests.Reading;

/// <summary>
/// The dimensions corpus (Corpus/dimensions/, written by Python tifffile 2023.2.3 with make_corpus.py): each file's
/// expected outcome in expected.json comes from the arrays handed to tifffile and the writer's documented layout
/// (tifffile docstring: ImageJ hyperstacks in TZCYXS order; OME-TIFF specification / OME Data Model 2016-06:
/// SizeT/SizeZ/SizeC, DimensionOrder, TiffData IFD/PlaneCount, one Image element per series; TIFF 6.0 resolution tags).
/// </summary>
public class DimensionTests
{
    internal static string CorpusDir()
    {
        var d = new DirectoryInfo(AppContext.BaseDirectory);
        while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
        return Path.Combine(d!.FullName, "tests", "ShapeNoise.Imaging.Tests", "Reading", "Corpus", "dimensions");
    }

    private static JsonObject Expected() => JsonNode.Parse(File.ReadAllText(Path.Combine(CorpusDir(), "expected.json")))!.AsObject();

    public static TheoryData<string> Files()
    {
        var t = new TheoryData<string>();
        foreach (var (k, _) in Expected()) t.Add(k);
        return t;
    }

    private static MovieSelection Selection(JsonNode? pick) => new()
    {
        Series = (int?)pick?["series"], Channel = (int?)pick?["channel"], Z = (int?)pick?["z"],
        ZIsTime = (bool?)pick?["z_is_time"] ?? false,
    };

    private static long[] Sums(ILabelMovie m)
    {
        var s = new List<long>();
        foreach (var f in m.Frames()) { long v = 0; foreach (int x in f.Labels) v += x; s.Add(v); }
        return [.. s];
    }

    [Theory]
    [MemberData(nameof(Files))]
    public void Open_CorpusFile_MatchesWriterLayout(string name)
    {
        var e = Expected()[name]!;
        string path = Path.Combine(CorpusDir(), name);
        // Page count as written (tifffile's own TiffFile.pages count, recorded by the generator).
        using (var pages = new TiffPages(path)) Assert.Equal((int)e["pages"]!, pages.Pages.Count);

        if ((string?)e["refused_without"] is { } option)
        {
            // No option given: a file with several planes per frame (or an inconsistent header) is refused, naming what to give.
            var ex = Assert.Throws<InputException>(() => { using var m = LabelMovies.Open(path); });
            Assert.Contains(option, ex.Message);
            Assert.StartsWith(path, ex.Message);
        }
        if (e["pick"] is not { } pick) return;

        using var movie = LabelMovies.Open(path, Selection(pick));
        Assert.Equal((int)e["frames"]!, movie.Info.FrameCount);
        if (e["sums"] is JsonArray sums)
            Assert.Equal(sums.Select(x => (long)x!).ToArray(), Sums(movie));
        if (e["pixel_size_um"] is { } ps)
        {
            Assert.Equal((double)ps, movie.Info.PixelSizeUm!.Value, 6);   // rational tags hold ~9 significant digits
            Assert.Equal((string)e["pixel_size_source"]!, movie.Info.PixelSizeSource);
        }
        if (e["frame_interval_min"] is { } fi)
        {
            Assert.Equal((double)fi, movie.Info.FrameIntervalMin!.Value, 9);
            Assert.Equal((string)e["frame_interval_source"]!, movie.Info.FrameIntervalSource);
        }
        if (e["resampled_height"] is { } rh)
        {
            // Non-square pixels: resampled to square pixels of the finer size; round(24 * 0.65 / 0.5) = 31 rows.
            Assert.Equal((int)rh, movie.Info.Height);
            Assert.Equal((int)e["resampled_width"]!, movie.Info.Width);
            Assert.NotNull(movie.Info.Resampling);
            // With --pixel-size the user declares square pixels: no resampling, the native planes come through unchanged.
            using var native = LabelMovies.Open(path, Selection(pick) with { PixelSizeUm = 0.5 });
            Assert.Equal(24, native.Info.Height);
            Assert.Equal("option", native.Info.PixelSizeSource);
            Assert.Equal(e["native_sums"]!.AsArray().Select(x => (long)x!).ToArray(), Sums(native));
        }
        if (e["out_of_range"] is JsonObject bad)
        {
            var ex = Assert.Throws<InputException>(() => { using var m = LabelMovies.Open(path, Selection(bad)); });
            Assert.Contains("out of range", ex.Message);
            Assert.Contains("valid: 0 to", ex.Message);
        }
    }

    [Fact]
    public void Open_TwoChannelHyperstackWithoutChannel_MessageNamesBothChoices()
    {
        // The brief's wording: "ImageJ hyperstack has 2 channels; give --channel 0 or --channel 1".
        string path = Path.Combine(CorpusDir(), "ij_tzcyx_c2.tif");
        var ex = Assert.Throws<InputException>(() => { using var m = LabelMovies.Open(path); });
        Assert.Equal($"{path}: ImageJ hyperstack has 2 channels; give --channel 0 or --channel 1", ex.Message);
    }

    [Fact]
    public void Open_PlainStackWithZIsTimeAndZ_RejectedAsBadOptions()
    {
        string path = Path.Combine(CorpusDir(), "ij_plain_slices.tif");
        Assert.Throws<ArgumentException>(() => LabelMovies.Open(path, new MovieSelection { Z = 0, ZIsTime = true }));
    }

    [Fact]
    public void Open_HyperstackWithTimeAxisAndZIsTime_Refused()
    {
        // ij_tzyx_z2.tif has frames=3 slices=2: Z is never time when the file has a time axis.
        string path = Path.Combine(CorpusDir(), "ij_tzyx_z2.tif");
        var ex = Assert.Throws<InputException>(() => LabelMovies.Open(path, new MovieSelection { ZIsTime = true }));
        Assert.Contains("--z-plane N", ex.Message);
    }

    [Fact]
    public void Open_FrameIntervalOption_OverridesMetadata()
    {
        // ij_tyx_finterval.tif says finterval=30 s (0.5 min); an option wins and is recorded as the source.
        string path = Path.Combine(CorpusDir(), "ij_tyx_finterval.tif");
        using var m = LabelMovies.Open(path, new MovieSelection { FrameIntervalMin = 2, PixelSizeUm = 0.25 });
        Assert.Equal(2, m.Info.FrameIntervalMin);
        Assert.Equal("option", m.Info.FrameIntervalSource);
        Assert.Equal(0.25, m.Info.PixelSizeUm);
        Assert.Equal("option", m.Info.PixelSizeSource);
    }

    [Fact]
    public void Layout_OmeTiffDataWithFirstC_MapsPlanesToPages()
    {
        // OME-TIFF specification: TiffData IFD="k" FirstC="c" PlaneCount="n" puts n planes, from (Z=0, C=c, T=0) on in
        // DimensionOrder, on pages k..k+n-1. Here XYZTC with two channels written channel-major, channel 1 first.
        const string xml = "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\"><Image ID=\"Image:0\"><Pixels ID=\"Pixels:0\" " +
                           "DimensionOrder=\"XYZTC\" Type=\"uint16\" SizeX=\"4\" SizeY=\"4\" SizeZ=\"1\" SizeC=\"2\" SizeT=\"3\">" +
                           "<TiffData IFD=\"0\" FirstC=\"1\" PlaneCount=\"3\"/><TiffData IFD=\"3\" FirstC=\"0\" PlaneCount=\"3\"/></Pixels></Image></OME>";
        var pages = Enumerable.Range(0, 6).Select(i => new TiffPage(i, 4, 4, 16, 1, 1, 1, 1, 4, [0], [32], 0, 0, i == 0 ? xml : null, 0, 1)).ToList();
        var layout = MovieLayout.Of("x.tif", pages);
        var s = layout.Series.Single();
        Assert.Equal((3, 1, 2), (s.SizeT, s.SizeZ, s.SizeC));
        Assert.Equal([0, 1, 2], new MovieSelection { Channel = 1 }.Pick("x.tif", layout, 6).Pages);
        Assert.Equal([3, 4, 5], new MovieSelection { Channel = 0 }.Pick("x.tif", layout, 6).Pages);
    }

    [Fact]
    public void Layout_OmeTiffDataLeavesPlaneUnmapped_Refused()
    {
        const string xml = "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\"><Image ID=\"Image:0\"><Pixels ID=\"Pixels:0\" " +
                           "DimensionOrder=\"XYZCT\" Type=\"uint16\" SizeX=\"4\" SizeY=\"4\" SizeZ=\"1\" SizeC=\"1\" SizeT=\"3\">" +
                           "<TiffData IFD=\"0\" PlaneCount=\"2\"/></Pixels></Image></OME>";
        var pages = Enumerable.Range(0, 3).Select(i => new TiffPage(i, 4, 4, 16, 1, 1, 1, 1, 4, [0], [32], 0, 0, i == 0 ? xml : null, 0, 1)).ToList();
        var ex = Assert.Throws<InputException>(() => MovieSelection.None.Pick("x.tif", MovieLayout.Of("x.tif", pages), 3));
        Assert.Contains("maps no page to plane (T=2", ex.Message);
    }

    [Fact]
    public void Layout_OmeTiffDataInAnotherFile_Refused()
    {
        const string xml = "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\"><Image ID=\"Image:0\"><Pixels ID=\"Pixels:0\" " +
                           "DimensionOrder=\"XYZCT\" Type=\"uint16\" SizeX=\"4\" SizeY=\"4\" SizeZ=\"1\" SizeC=\"1\" SizeT=\"2\">" +
                           "<TiffData IFD=\"0\" PlaneCount=\"2\"><UUID FileName=\"other.ome.tif\">urn:uuid:1</UUID></TiffData></Pixels></Image></OME>";
        var pages = Enumerable.Range(0, 2).Select(i => new TiffPage(i, 4, 4, 16, 1, 1, 1, 1, 4, [0], [32], 0, 0, i == 0 ? xml : null, 0, 1)).ToList();
        var ex = Assert.Throws<InputException>(() => MovieLayout.Of("x.tif", pages));
        Assert.Contains("other.ome.tif", ex.Message);
    }
}
