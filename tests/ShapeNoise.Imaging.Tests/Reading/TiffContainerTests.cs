using System.Security.Cryptography;
using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Reading;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

/// <summary>
/// The container conformance corpus (Reading/Corpus/container, made by its make_corpus.py): files written by Python
/// tifffile 2023.2.3 and libtiff 4.5's tiffcp in the layouts their documentation describes (tifffile's imwrite
/// docstring: compression, predictor, tile, bigtiff, byteorder, rowsperstrip; man tiffcp: -r, -c lzw:2, -c packbits,
/// -t), plus damaged files patched at the IFD positions the TIFF 6.0 specification (section 2) and the BigTIFF
/// specification give. The expected pixels are computed by the generator from the numpy array it wrote (and that
/// tifffile read back); the damaged files' expected problem keyword is in expected.json.
/// </summary>
public class TiffContainerTests
{
    internal static string CorpusDir
    {
        get
        {
            var d = new DirectoryInfo(AppContext.BaseDirectory);
            while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
            if (d is null) throw new InvalidOperationException("ShapeNoise.sln not found above the test assembly");
            return Path.Combine(d.FullName, "tests", "ShapeNoise.Imaging.Tests", "Reading", "Corpus", "container");
        }
    }

    private static JsonObject Expected => JsonNode.Parse(File.ReadAllText(Path.Combine(CorpusDir, "expected.json")))!.AsObject();

    public static TheoryData<string> ValidFiles()
    {
        var t = new TheoryData<string>();
        foreach (var (k, v) in Expected) if (v!["outcome"]!.GetValue<string>() == "decode") t.Add(k);
        return t;
    }

    public static TheoryData<string> DamagedFiles()
    {
        var t = new TheoryData<string>();
        foreach (var (k, v) in Expected) if (v!["outcome"]!.GetValue<string>() == "refuse") t.Add(k);
        return t;
    }

    /// <summary>Decodes every page the way the movie readers do (layout checks, then the pixels); with
    /// <paramref name="reuse"/>, each page into the previous page's array (copied out first), as a movie decodes into the
    /// frames the analysis hands back.</summary>
    internal static List<int[]> DecodeAll(string path, out int width, out int height, bool reuse = false)
    {
        using var t = new TiffPages(path);
        var pages = new List<int[]>();
        foreach (var p in t.Pages) t.RequireIntegerLabels(p);
        int[]? spare = null;
        for (int i = 0; i < t.Pages.Count; i++)
        {
            var page = t.ReadLabels(i, reuse ? spare : null);
            pages.Add(reuse ? (int[])page.Clone() : page);
            spare = page;
        }
        width = t.Pages[0].Width; height = t.Pages[0].Height;
        return pages;
    }

    [Fact]
    public void Corpus_ExpectedJson_ListsEveryTiffInTheFolder()
    {
        var listed = Expected.Select(kv => kv.Key).OrderBy(x => x, StringComparer.Ordinal).ToArray();
        var onDisk = Directory.GetFiles(CorpusDir, "*.tif").Select(Path.GetFileName).OrderBy(x => x, StringComparer.Ordinal).ToArray();
        Assert.Equal(onDisk, listed);
        Assert.True(listed.Length >= 40);
    }

    [Theory]
    [MemberData(nameof(ValidFiles))]
    public void Read_CorpusFile_DecodesToTheWrittenPixels(string name)
    {
        Check(name, reuse: false);
        Check(name, reuse: true);   // decoded into the previous page's array: the same pixels
    }

    private static void Check(string name, bool reuse)
    {
        // Expected values: computed by make_corpus.py from the numpy array tifffile wrote (tifffile read it back equal).
        var e = Expected[name]!;
        var pages = DecodeAll(Path.Combine(CorpusDir, name), out int w, out int h, reuse);
        var shape = e["shape"]!.AsArray().Select(x => x!.GetValue<int>()).ToArray();
        Assert.Equal(shape, new[] { pages.Count, h, w });
        // Labels are compared as unsigned 32-bit values: ids above 2^31 - 1 are stored bit for bit in int.
        var bytes = new byte[pages.Count * w * h * 4];
        decimal sum = 0;
        int k = 0;
        foreach (var pg in pages)
            foreach (var v in pg)
            {
                uint u = unchecked((uint)v);
                sum += u;
                System.Buffers.Binary.BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(4 * k++), u);
            }
        Assert.Equal(e["sum"]!.GetValue<decimal>(), sum);
        Assert.Equal(e["sha256_u32le"]!.GetValue<string>(), Convert.ToHexStringLower(SHA256.HashData(bytes)));
        foreach (var px in e["pixels"]!.AsArray())
        {
            var a = px!.AsArray().Select(x => x!.GetValue<long>()).ToArray();
            Assert.Equal(a[3], (long)unchecked((uint)pages[(int)a[0]][a[1] * w + a[2]]));
        }
    }

    [Theory]
    [MemberData(nameof(DamagedFiles))]
    public void Read_DamagedOrUnsupportedCorpusFile_InputExceptionNamesFileAndProblem(string name)
    {
        // Expected keyword: expected.json, chosen by make_corpus.py for the damage it made (README.md lists them).
        string problem = Expected[name]!["problem"]!.GetValue<string>();
        long before = GC.GetAllocatedBytesForCurrentThread();
        var ex = Assert.Throws<InputException>(() => DecodeAll(Path.Combine(CorpusDir, name), out _, out _));
        long allocated = GC.GetAllocatedBytesForCurrentThread() - before;
        Assert.Contains(name, ex.Message);
        Assert.Contains(problem, ex.Message);
        Assert.DoesNotContain("\n", ex.Message);
        // The claimed size is never allocated: a refusal costs far less than the smallest claimed page (20000^2 px).
        Assert.True(allocated < 16 << 20, $"{allocated} bytes allocated before refusing");
    }

    [Theory]
    [InlineData("claims_100000x100000.tif", "too large")]
    [InlineData("claims_50000x50000.tif", "too large")]
    [InlineData("rowsperstrip0.tif", "RowsPerStrip")]
    [InlineData("bigtiff_ifd_offset_huge.tif", "beyond the end")]
    [InlineData("int64_too_big.tif", "does not fit in 32 bits")]
    [InlineData("tiffcp_jpeg.tif", "compression JPEG (7) is not supported; supported: none, LZW, Deflate, PackBits")]
    public void Open_DamagedFileThroughTheCliEntryPoint_InputException(string name, string problem)
    {
        // LabelMovies.Open is what `analyze` calls; InputException is its exit 2.
        var ex = Assert.Throws<InputException>(() =>
        {
            using var m = LabelMovies.Open(Path.Combine(CorpusDir, name));
            foreach (var f in m.Frames()) GC.KeepAlive(f);
        });
        Assert.Contains(problem, ex.Message);
    }

    [Fact]
    public void Read_Int64FitsCorpusFile_IdAbove2p31StoredBitForBit()
    {
        // int64_fits.tif holds 4294967295 and 3000000000 (make_corpus.py, ids64): both above int.MaxValue.
        var pages = DecodeAll(Path.Combine(CorpusDir, "int64_fits.tif"), out _, out _);
        var values = pages.SelectMany(p => p).Select(v => unchecked((uint)v)).ToHashSet();
        Assert.Contains(4_294_967_295u, values);
        Assert.Contains(3_000_000_000u, values);
    }

    [Fact]
    public void Read_SameLabelsInSixLayouts_IdenticalPages()
    {
        // One numpy array (make_corpus.py, u16) written by tifffile and tiffcp in different containers decodes the same.
        var names = new[] { "uint16_pages.tif", "bigtiff.tif", "tiled.tif", "tiffcp_lzw_pred2.tif", "tiffcp_packbits.tif", "bigendian_deflate_pred2.tif" };
        var reference = DecodeAll(Path.Combine(CorpusDir, names[0]), out _, out _);
        foreach (var n in names[1..]) Assert.Equal(reference, DecodeAll(Path.Combine(CorpusDir, n), out _, out _));
    }
}
