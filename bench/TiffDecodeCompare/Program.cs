// Decode comparison: the hand-written reader (ShapeNoise.Imaging.Reading.TiffPages) against BitMiracle.LibTiff.NET on the
// container corpus (tests/ShapeNoise.Imaging.Tests/Reading/Corpus/container) and on benchmark movies.
//   dotnet run --project bench/TiffDecodeCompare -c Release -- <movie.tif> [<movie.tif> ...]
using System.Diagnostics;
using System.Security.Cryptography;
using System.Text.Json.Nodes;
using BitMiracle.LibTiff.Classic;
using ShapeNoise.Imaging.Reading;

string root = AppContext.BaseDirectory;
while (!File.Exists(Path.Combine(root, "ShapeNoise.sln"))) root = Path.GetDirectoryName(root)!;
string corpus = Path.Combine(root, "tests", "ShapeNoise.Imaging.Tests", "Reading", "Corpus", "container");
var expected = JsonNode.Parse(File.ReadAllText(Path.Combine(corpus, "expected.json")))!.AsObject();
var errors = new CollectingHandler();
Tiff.SetErrorHandler(errors);

int agreeDecode = 0, wrongDecode = 0, failedValid = 0, refused = 0, decodedDamaged = 0, crashed = 0;
foreach (var (name, e) in expected)
{
    string file = Path.Combine(corpus, name);
    bool valid = e!["outcome"]!.GetValue<string>() == "decode";
    string outcome;
    try
    {
        var pages = LibTiffLabels(file);
        if (pages is null) { outcome = "refused: " + errors.Last; if (valid) failedValid++; else refused++; }
        else if (valid)
        {
            bool same = Sha(pages) == e["sha256_u32le"]!.GetValue<string>();
            outcome = same ? "decoded, same pixels" : "decoded, DIFFERENT pixels";
            if (same) agreeDecode++; else wrongDecode++;
        }
        else { outcome = $"DECODED ({pages.Count} pages) a file that must be refused"; decodedDamaged++; }
    }
    catch (Exception ex) { outcome = $"exception {ex.GetType().Name}: {ex.Message}"; crashed++; if (valid) failedValid++; }
    Console.WriteLine($"{name,-34} {(valid ? "valid  " : "refuse ")} {outcome}");
}
Console.WriteLine($"LibTiff.NET on {expected.Count} corpus files: valid decoded equal {agreeDecode}, decoded different {wrongDecode}, valid not decoded {failedValid}; " +
                  $"damaged refused {refused}, damaged decoded {decodedDamaged}, exceptions {crashed}");

foreach (var movie in args)
{
    double ours = Enumerable.Range(0, 3).Min(_ => Time(() => { using var t = new TiffPages(movie); long s = 0; for (int i = 0; i < t.Pages.Count; i++) s += t.ReadLabels(i)[^1]; return s; }));
    double lib = Enumerable.Range(0, 3).Min(_ => Time(() => { long s = 0; foreach (var p in LibTiffLabels(movie)!) s += p[^1]; return s; }));
    Console.WriteLine($"{movie}: decode best of 3: hand-written {ours:F3} s, LibTiff.NET {lib:F3} s (ratio {lib / ours:F2})");
}

static double Time(Func<long> f) { var sw = Stopwatch.StartNew(); GC.KeepAlive(f()); return sw.Elapsed.TotalSeconds; }

static string Sha(List<int[]> pages)
{
    var bytes = new byte[pages.Sum(p => p.Length) * 4];
    int k = 0;
    foreach (var p in pages) foreach (var v in p) System.Buffers.Binary.BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(4 * k++), unchecked((uint)v));
    return Convert.ToHexStringLower(SHA256.HashData(bytes));
}

// Pages as labels with the same rules as the product (single-channel integer, 8-64 bit, ids up to 2^32-1); null when
// LibTiff.NET reports an error or the page is not such an image.
static List<int[]>? LibTiffLabels(string file)
{
    using var tif = Tiff.Open(file, "r");
    if (tif is null) return null;
    var pages = new List<int[]>();
    do
    {
        int w = tif.GetField(TiffTag.IMAGEWIDTH)[0].ToInt(), h = tif.GetField(TiffTag.IMAGELENGTH)[0].ToInt();
        int bps = tif.GetFieldDefaulted(TiffTag.BITSPERSAMPLE)[0].ToInt(), spp = tif.GetFieldDefaulted(TiffTag.SAMPLESPERPIXEL)[0].ToInt();
        int fmt = tif.GetFieldDefaulted(TiffTag.SAMPLEFORMAT)[0].ToInt();
        if (spp != 1 || fmt is not (1 or 2) || bps is not (8 or 16 or 32 or 64)) return null;
        if (!tif.IsCodecConfigured((Compression)tif.GetFieldDefaulted(TiffTag.COMPRESSION)[0].ToInt())) return null;
        if ((long)w * h > Array.MaxLength) return null;
        int bytesPer = bps / 8;
        var labels = new int[w * h];
        bool tiled = tif.IsTiled();
        int bw = tiled ? tif.GetField(TiffTag.TILEWIDTH)[0].ToInt() : w;
        int bh = tiled ? tif.GetField(TiffTag.TILELENGTH)[0].ToInt() : Math.Min(h, tif.GetFieldDefaulted(TiffTag.ROWSPERSTRIP)[0].ToInt());
        if (bw <= 0 || bh <= 0) return null;
        var buf = new byte[tiled ? tif.TileSize() : tif.StripSize()];
        int across = tiled ? (w + bw - 1) / bw : 1, down = (h + bh - 1) / bh;
        for (int b = 0; b < across * down; b++)
        {
            int n = tiled ? tif.ReadEncodedTile(b, buf, 0, buf.Length) : tif.ReadEncodedStrip(b, buf, 0, buf.Length);
            if (n < 0) return null;
            int bx = b % across, by = b / across, rows = tiled ? bh : Math.Min(bh, h - by * bh);
            for (int r = 0; r < rows && by * bh + r < h; r++)
            {
                int x0 = bx * bw, cnt = Math.Min(bw, w - x0), o = r * bw * bytesPer;
                if (o + cnt * bytesPer > n) return null;   // short strip: truncated data
                var dst = labels.AsSpan((by * bh + r) * w + x0, cnt);
                var src = buf.AsSpan(o);
                for (int x = 0; x < cnt; x++)   // LibTiff.NET returns samples in host byte order
                {
                    long v = bps switch
                    {
                        8 => fmt == 2 ? (sbyte)src[x] : src[x],
                        16 => fmt == 2 ? BitConverter.ToInt16(src[(2 * x)..]) : BitConverter.ToUInt16(src[(2 * x)..]),
                        32 => fmt == 2 ? BitConverter.ToInt32(src[(4 * x)..]) : BitConverter.ToUInt32(src[(4 * x)..]),
                        _ => BitConverter.ToInt64(src[(8 * x)..]),
                    };
                    if (v < 0 && !(bps == 64 && fmt == 1)) return null;
                    if ((ulong)v > uint.MaxValue) return null;
                    dst[x] = unchecked((int)(uint)v);
                }
            }
        }
        pages.Add(labels);
    } while (tif.ReadDirectory());
    return pages;
}

sealed class CollectingHandler : TiffErrorHandler
{
    public string Last = "";
    public override void ErrorHandler(Tiff tif, string method, string format, params object[] args) => Last = $"{method}: {string.Format(format, args)}";
    public override void ErrorHandlerExt(Tiff tif, object clientData, string method, string format, params object[] args) => Last = $"{method}: {string.Format(format, args)}";
    public override void WarningHandler(Tiff tif, string method, string format, params object[] args) { }
    public override void WarningHandlerExt(Tiff tif, object clientData, string method, string format, params object[] args) { }
}
