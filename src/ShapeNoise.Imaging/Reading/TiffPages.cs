using System.Buffers;
using System.Buffers.Binary;
using System.Diagnostics.CodeAnalysis;
using System.IO.Compression;
using System.Runtime.InteropServices;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Layout of one TIFF page (image file directory).</summary>
public sealed record TiffPage(int Index, int Width, int Height, int BitsPerSample, int SampleFormat, int SamplesPerPixel,
    int Compression, int Predictor, int RowsPerStrip, long[] Offsets, long[] ByteCounts, int TileWidth, int TileHeight,
    string? Description, double XResolution, int ResolutionUnit, double YResolution = 0, int PlanarConfiguration = 1);

/// <summary>
/// A minimal, streaming reader of baseline TIFF and BigTIFF grayscale integer pages: strips or tiles, uncompressed,
/// Deflate, LZW or PackBits, with horizontal-difference predictor; 8-, 16-, 32- or 64-bit unsigned or signed samples.
/// It walks the IFD chain once for the page layouts and decodes one page at a time, so a long movie never sits in
/// memory. It also exposes the first page's ImageDescription, where OME-TIFF keeps its OME-XML.
/// </summary>
/// <remarks>Adobe Systems (1992), TIFF Revision 6.0 specification; Adobe PageMaker 6.0 TIFF Technical Notes (1995) for
/// Deflate; the BigTIFF extension (Aware Systems, 2007). Written here rather than taken from OpenCV because OpenCV reads a
/// multi-page file whole and does not expose the ImageDescription tag (docs/inputs.md, "Container and sample types",
/// records the comparison with BitMiracle.LibTiff.NET). Every size is computed in 64-bit arithmetic and checked against
/// the file length and the limits <see cref="MaxPageBytes"/> and <see cref="MaxPagePixels"/> before anything of that
/// size is allocated; every failure on a damaged file is an <see cref="InputException"/> naming the file.</remarks>
public sealed class TiffPages : IDisposable
{
    /// <summary>Largest decoded page accepted: 2^31 bytes of pixels (width x height x bytes per sample).</summary>
    public const long MaxPageBytes = 1L << 31;

    /// <summary>Largest page accepted in pixels: the longest <c>int[]</c> .NET allocates (<see cref="Array.MaxLength"/>),
    /// since a page becomes one <c>int[]</c> of labels.</summary>
    public static readonly long MaxPagePixels = Array.MaxLength;

    private readonly FileStream _fs;
    private readonly bool _little;
    private readonly bool _big;

    /// <summary>The file read.</summary>
    public string Path { get; }

    /// <summary>File length in bytes.</summary>
    public long FileLength { get; }

    /// <summary>The page layouts, in IFD-chain order.</summary>
    public IReadOnlyList<TiffPage> Pages { get; }

    /// <summary>Opens <paramref name="path"/> and reads every page's layout; throws <see cref="InputException"/> when the file
    /// is not a TIFF or its structure is damaged.</summary>
    public TiffPages(string path)
    {
        Path = path;
        try { _fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.RandomAccess); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException) { throw new InputException(path, $"cannot open: {OneLine(e.Message)}"); }
        try
        {
            FileLength = _fs.Length;
            Span<byte> h = stackalloc byte[16];
            if (FileLength < 8 || Read(0, h[..8]) < 8) throw new InputException(path, "not a TIFF file (shorter than a TIFF header)");
            if (h[0] == 'I' && h[1] == 'I') _little = true;
            else if (h[0] == 'M' && h[1] == 'M') _little = false;
            else throw new InputException(path, "not a TIFF file (no II/MM byte-order mark)");
            int magic = U16(h[2..]);
            ulong first;
            if (magic == 42) first = (ulong)U32(h[4..]);
            else if (magic == 43)
            {
                _big = true;
                if (FileLength < 16 || Read(0, h) < 16) throw new InputException(path, "truncated BigTIFF header");
                if (U16(h[4..]) != 8 || U16(h[6..]) != 0) throw new InputException(path, $"BigTIFF header gives offset size {U16(h[4..])}; only 8-byte offsets exist (corrupt header)");
                first = U64(h[8..]);
            }
            else throw new InputException(path, $"not a TIFF file (magic number {magic})");
            if (first == 0) throw new InputException(path, "TIFF file has no pages (first directory offset is 0)");
            Pages = ReadLayouts(first);
            if (Pages.Count == 0) throw new InputException(path, "TIFF file has no pages");
        }
        catch (Exception e)
        {
            _fs.Dispose();
            if (e is InputException) throw;
            throw new InputException(path, $"corrupt TIFF structure ({e.GetType().Name}: {OneLine(e.Message)})");
        }
    }

    private static string OneLine(string s) => s.ReplaceLineEndings(" ");

    private int Read(long offset, Span<byte> dst)
    {
        int got = 0;
        while (got < dst.Length)
        {
            int n = RandomAccess.Read(_fs.SafeFileHandle, dst[got..], offset + got);
            if (n <= 0) break;
            got += n;
        }
        return got;
    }

    private int U16(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt16LittleEndian(b) : BinaryPrimitives.ReadUInt16BigEndian(b);
    private long U32(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt32LittleEndian(b) : BinaryPrimitives.ReadUInt32BigEndian(b);
    private ulong U64(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt64LittleEndian(b) : BinaryPrimitives.ReadUInt64BigEndian(b);

    private static int TypeSize(int type) => type switch
    {
        1 or 2 or 6 or 7 => 1, 3 or 8 => 2, 4 or 9 or 11 or 13 => 4, 5 or 10 or 12 or 16 or 17 or 18 => 8, _ => 0,
    };

    /// <summary>The tags this reader uses; the others are skipped unread (TIFF 6.0: readers ignore unknown tags).</summary>
    private static bool Used(int tag) => tag is 256 or 257 or 258 or 259 or 270 or 273 or 277 or 278 or 279 or 282 or 283
        or 284 or 296 or 317 or 322 or 323 or 324 or 325 or 339;

    private List<TiffPage> ReadLayouts(ulong firstIfd)
    {
        var pages = new List<TiffPage>();
        var seen = new HashSet<ulong>();
        int entrySize = _big ? 20 : 12, countSize = _big ? 8 : 2, nextSize = _big ? 8 : 4, inline = _big ? 8 : 4;
        Span<byte> cb = stackalloc byte[8];
        ulong ifdU = firstIfd;
        while (ifdU != 0)
        {
            int page = pages.Count + 1;
            if (!seen.Add(ifdU)) throw new InputException(Path, $"page {page}: IFD chain loops back on itself (corrupt file)");
            if (ifdU > (ulong)(FileLength - countSize))
                throw new InputException(Path, $"truncated or corrupt: page {page} directory offset {ifdU} lies beyond the end of the file ({FileLength} bytes)");
            long ifd = (long)ifdU;
            if (Read(ifd, cb[..countSize]) < countSize) throw new InputException(Path, $"truncated: page {page} directory cut short");
            ulong n = _big ? U64(cb) : (ulong)U16(cb);
            long room = FileLength - ifd - countSize;   // bytes after the entry count
            if (n > (ulong)(FileLength / entrySize))
                throw new InputException(Path, $"page {page}: directory claims {n} entries, more than the file's {FileLength} bytes can hold (corrupt directory)");
            long dirBytes = checked((long)n * entrySize + nextSize);
            if (dirBytes > room) throw new InputException(Path, $"truncated: page {page} directory runs past the end of the file ({FileLength} bytes)");
            var dir = new byte[dirBytes];
            if (Read(ifd + countSize, dir) < dir.Length) throw new InputException(Path, $"truncated: page {page} directory cut short");
            var tags = new Dictionary<int, (int Type, long Count, byte[] Raw)>();
            for (int i = 0; i < (int)n; i++)
            {
                var e = dir.AsSpan(i * entrySize, entrySize);
                int tag = U16(e), type = U16(e[2..]);
                if (!Used(tag)) continue;
                ulong countU = _big ? U64(e[4..]) : (ulong)U32(e[4..]);
                int ts = TypeSize(type);
                if (ts == 0) continue;
                if (countU > (ulong)FileLength)
                    throw new InputException(Path, $"page {page}: tag {tag} claims {countU} values, more than the file's {FileLength} bytes can hold (corrupt directory)");
                long count = (long)countU, bytes = count * ts;   // count <= file length, so no overflow
                byte[] raw;
                if (bytes <= inline) raw = e.Slice(_big ? 12 : 8, (int)bytes).ToArray();
                else
                {
                    ulong offU = _big ? U64(e[12..]) : (ulong)U32(e[8..]);
                    if (bytes > FileLength || offU > (ulong)(FileLength - bytes))
                        throw new InputException(Path, $"truncated or corrupt: page {page} tag {tag} data ({bytes} bytes at offset {offU}) lies beyond the end of the file ({FileLength} bytes)");
                    raw = new byte[bytes];
                    if (Read((long)offU, raw) < raw.Length) throw new InputException(Path, $"truncated: page {page} tag {tag} data cut short");
                }
                tags[tag] = (type, count, raw);
            }
            pages.Add(Layout(pages.Count, tags));
            var nx = dir.AsSpan((int)((long)n * entrySize));
            ifdU = _big ? U64(nx) : (ulong)U32(nx);
        }
        return pages;
    }

    /// <summary>The values of a numeric tag; LONG8 values above <see cref="long.MaxValue"/> come back negative (invalid).</summary>
    private long[] Values(Dictionary<int, (int Type, long Count, byte[] Raw)> tags, int tag)
    {
        if (!tags.TryGetValue(tag, out var t)) return [];
        var r = new long[t.Count];
        for (int i = 0; i < t.Count; i++)
            r[i] = t.Type switch
            {
                1 or 7 => t.Raw[i],
                6 => (sbyte)t.Raw[i],
                3 => U16(t.Raw.AsSpan(i * 2)),
                8 => (short)U16(t.Raw.AsSpan(i * 2)),
                4 or 13 => U32(t.Raw.AsSpan(i * 4)),
                9 => (int)U32(t.Raw.AsSpan(i * 4)),
                16 or 17 or 18 => unchecked((long)U64(t.Raw.AsSpan(i * 8))),
                _ => 0,
            };
        return r;
    }

    private TiffPage Layout(int index, Dictionary<int, (int Type, long Count, byte[] Raw)> tags)
    {
        long One(int tag, long dflt) { var v = Values(tags, tag); return v.Length > 0 ? v[0] : dflt; }
        int page = index + 1;
        long w = One(256, 0), h = One(257, 0);
        if (w <= 0 || h <= 0) throw new InputException(Path, $"page {page} has no image size (corrupt TIFF directory)");
        if (w > int.MaxValue || h > int.MaxValue || w * h > MaxPagePixels)
            throw new InputException(Path, $"page {page} is too large: {w} x {h} px exceeds the limit of {MaxPagePixels} px per page (the largest label array .NET can hold)");
        var bps = Values(tags, 258);
        string? desc = null;
        if (tags.TryGetValue(270, out var d)) desc = System.Text.Encoding.UTF8.GetString(d.Raw).TrimEnd('\0');
        double Rational(int tag)
        {
            if (!tags.TryGetValue(tag, out var r) || r.Type != 5 || r.Raw.Length < 8) return 0;
            long num = U32(r.Raw), den = U32(r.Raw.AsSpan(4));
            return den != 0 ? (double)num / den : 0;
        }
        double xres = Rational(282), yres = Rational(283);
        bool tiled = tags.ContainsKey(322) || tags.ContainsKey(324);
        int tw = 0, th = 0, rps;
        if (tiled)
        {
            long tw64 = One(322, 0), th64 = One(323, 0);
            if (tw64 <= 0 || th64 <= 0 || tw64 > int.MaxValue || th64 > int.MaxValue)
                throw new InputException(Path, $"page {page}: tile size {tw64} x {th64} is missing or invalid (corrupt TIFF directory)");
            if (tw64 * th64 > MaxPagePixels)
                throw new InputException(Path, $"page {page}: tiles of {tw64} x {th64} px are too large (limit {MaxPagePixels} px)");
            tw = (int)tw64; th = (int)th64;
            rps = (int)h;
        }
        else
        {
            long r = One(278, h);
            if (r == 0) throw new InputException(Path, $"page {page}: RowsPerStrip is 0 (corrupt TIFF directory; it must be at least 1)");
            rps = r < 0 || r > h ? (int)h : (int)r;   // 2^32-1 (or 2^64-1) means "one strip", TIFF 6.0 section 3
        }
        var offsets = Values(tags, tiled ? 324 : 273);
        var counts = Values(tags, tiled ? 325 : 279);
        string block = tiled ? "tile" : "strip";
        if (offsets.Length == 0) throw new InputException(Path, $"page {page} has no pixel data offsets (corrupt TIFF directory)");
        if (counts.Length != offsets.Length) throw new InputException(Path, $"page {page} has {offsets.Length} {block} offsets but {counts.Length} byte counts (corrupt TIFF directory)");
        for (int i = 0; i < offsets.Length; i++)
        {
            long off = offsets[i], c = counts[i];
            if (off < 0 || c < 0 || c > FileLength || off > FileLength - c)
                throw new InputException(Path, $"truncated or corrupt: page {page} {block} {i + 1} ({(ulong)c} bytes at offset {(ulong)off}) lies beyond the end of the file ({FileLength} bytes)");
        }
        return new TiffPage(index, (int)w, (int)h, bps.Length > 0 ? (int)bps[0] : 1, (int)One(339, 1), (int)One(277, 1),
            (int)One(259, 1), (int)One(317, 1), rps, offsets, counts, tw, th, desc, xres, (int)One(296, 2), yres, (int)One(284, 1));
    }

    /// <summary>The TIFF name of a compression code (TIFF 6.0 section 3 and the TIFF tag registry).</summary>
    public static string CompressionName(int code) => code switch
    {
        1 => "none", 2 => "CCITT modified Huffman RLE", 3 => "CCITT T.4 (Group 3 fax)", 4 => "CCITT T.6 (Group 4 fax)",
        5 => "LZW", 6 => "old-style JPEG", 7 => "JPEG", 8 => "Deflate", 32946 => "Deflate", 32773 => "PackBits",
        9 or 10 => "JBIG", 32771 => "CCITT RLE with word alignment", 34661 => "JBIG", 34676 or 34677 => "SGI Log",
        34712 => "JPEG 2000", 34887 => "LERC", 34892 => "lossy JPEG", 34925 => "LZMA", 34933 => "PNG", 34934 => "JPEG XR",
        50000 => "ZSTD", 50001 => "WebP", 50002 or 52546 => "JPEG XL", _ => "unknown",
    };

    private static bool Supported(int compression) => compression is 1 or 5 or 8 or 32946 or 32773;

    /// <summary>Bound on the output per compressed byte: Deflate 1032:1 (zlib technical details, from memory), LZW 4096:1 (a code of 9 or more bits emits at most
    /// 4096 bytes: TIFF 6.0 section 13, 12-bit table), PackBits 64:1 (128 bytes per 2-byte run, TIFF 6.0 section 9).</summary>
    private static long MaxExpansion(int compression) => compression switch
    {
        1 => 1, 8 or 32946 => 1032, 5 => 4096, 32773 => 64, _ => 1,
    };

    /// <summary>Checks that a page holds single-channel integer labels of 8, 16, 32 or 64 bits in a supported compression,
    /// within the size limits, and that its strips or tiles can cover it; throws a one-line <see cref="InputException"/>
    /// naming the problem otherwise. Nothing of the page's size is allocated.</summary>
    public void RequireIntegerLabels(TiffPage p)
    {
        string where = Pages.Count > 1 ? $"page {p.Index + 1}: " : "";
        if (p.SampleFormat == 3) throw new InputException(Path, $"{where}floating-point pixels ({p.BitsPerSample}-bit); a label image needs integer pixels (8, 16, 32 or 64 bit)");
        if (p.SampleFormat is 5 or 6) throw new InputException(Path, $"{where}complex-valued pixels; a label image needs integer pixels");
        if (p.SamplesPerPixel != 1)
            throw new InputException(Path, $"{where}has {p.SamplesPerPixel} samples per pixel{(p.PlanarConfiguration == 2 ? " in separate planes (planar configuration 2)" : "")} (colour); a label image must be single-channel");
        if (p.BitsPerSample is not (8 or 16 or 32 or 64)) throw new InputException(Path, $"{where}{p.BitsPerSample}-bit pixels; a label image needs 8-, 16-, 32- or 64-bit integer pixels");
        if (p.SampleFormat is not (1 or 2)) throw new InputException(Path, $"{where}unsupported sample format {p.SampleFormat}; a label image needs unsigned (1) or signed (2) integers");
        if (!Supported(p.Compression)) throw new InputException(Path, $"{where}compression {CompressionName(p.Compression)} ({p.Compression}) is not supported; supported: none, LZW, Deflate, PackBits");
        if (p.Predictor == 3) throw new InputException(Path, $"{where}floating-point predictor (3) is not supported; integer labels use no predictor (1) or horizontal differencing (2)");
        if (p.Predictor is not (1 or 2)) throw new InputException(Path, $"{where}unknown predictor {p.Predictor}; supported: 1 (none), 2 (horizontal differencing)");
        long bytesPer = p.BitsPerSample / 8;
        long pageBytes = (long)p.Width * p.Height * bytesPer;
        if (pageBytes > MaxPageBytes)
            throw new InputException(Path, $"{where}too large: {p.Width} x {p.Height} px of {p.BitsPerSample}-bit pixels is {pageBytes} bytes decoded, more than the limit of {MaxPageBytes} bytes (2^31) per page");
        var g = Geometry(p);
        string block = g.Tiled ? "tile" : "strip";
        if (p.Offsets.Length < g.Blocks)
            throw new InputException(Path, g.Tiled
                ? $"{where}tiles do not cover the page: {p.Offsets.Length} tiles of {g.BlockW} x {g.BlockH} px listed, {g.Blocks} needed for {p.Width} x {p.Height} px (corrupt TIFF directory)"
                : $"{where}strips do not cover the page: {p.Offsets.Length} strips of {g.BlockH} rows listed, {g.Blocks} needed for {p.Height} rows (corrupt TIFF directory)");
        long fullBlock = (long)g.BlockW * g.BlockH * bytesPer;
        if (fullBlock > Array.MaxLength) throw new InputException(Path, $"{where}too large: {block}s of {g.BlockW} x {g.BlockH} px are {fullBlock} bytes decoded, more than one buffer can hold ({Array.MaxLength} bytes)");
        long ratio = MaxExpansion(p.Compression);
        for (int bi = 0; bi < g.Blocks; bi++)
        {
            long need = (long)BlockRows(p, g, bi) * g.BlockW * bytesPer, have = p.ByteCounts[bi];
            if (have == 0) throw new InputException(Path, $"{where}{block}s do not cover the page: {block} {bi + 1} has no data (byte count 0)");
            if (have * ratio < need)
                throw new InputException(Path, p.Compression == 1
                    ? $"{where}{block}s do not cover the page: {block} {bi + 1} holds {have} bytes, its {need} bytes of pixels need more (truncated or corrupt)"
                    : $"{where}{block}s do not cover the page: {block} {bi + 1} holds {have} bytes of {CompressionName(p.Compression)} data, which cannot expand to its {need} bytes of pixels (corrupt)");
            if (have > 2 * fullBlock + 1024)
                throw new InputException(Path, $"{where}{block} {bi + 1} byte count {have} exceeds what a {block} of {fullBlock} bytes of pixels can need (corrupt TIFF directory)");
        }
    }

    private readonly record struct BlockGeometry(bool Tiled, int BlockW, int BlockH, int Across, int Down, int Blocks);

    private static BlockGeometry Geometry(TiffPage p)
    {
        bool tiled = p.TileWidth > 0 && p.TileHeight > 0;
        int bw = tiled ? p.TileWidth : p.Width, bh = tiled ? p.TileHeight : p.RowsPerStrip;
        long across = tiled ? ((long)p.Width + bw - 1) / bw : 1, down = ((long)p.Height + bh - 1) / bh;
        return new BlockGeometry(tiled, bw, bh, (int)across, (int)down, (int)checked(across * down));
    }

    /// <summary>Rows stored in block <paramref name="bi"/>: a tile is always whole; the last strip holds the remaining rows.</summary>
    private static int BlockRows(TiffPage p, BlockGeometry g, int bi) =>
        g.Tiled ? g.BlockH : Math.Min(g.BlockH, p.Height - (bi / g.Across) * g.BlockH);

    /// <summary>Decodes page <paramref name="index"/> into integer labels (row-major). Unsigned 32- and 64-bit values up to
    /// 2^32 - 1 are stored bit for bit (<c>unchecked((int)v)</c>: ids above <see cref="int.MaxValue"/> come out negative
    /// and print unsigned in the tables); a larger value or a negative signed value is an <see cref="InputException"/>.</summary>
    public int[] ReadLabels(int index) => ReadLabels(index, null);

    /// <summary>The same, decoded into <paramref name="reuse"/> when it has the page's size (cleared first): a frame array the
    /// caller no longer reads (<see cref="ShapeNoise.Reading.ILabelMovie.Recycle"/>), so a movie is not a fresh
    /// large-object-heap array per page.</summary>
    public int[] ReadLabels(int index, int[]? reuse)
    {
        var p = Pages[index];
        RequireIntegerLabels(p);
        int bytesPer = p.BitsPerSample / 8;
        var g = Geometry(p);
        string block = g.Tiled ? "tile" : "strip";
        int[] labels;
        if (reuse is not null && reuse.LongLength == (long)p.Width * p.Height) { Array.Clear(reuse); labels = reuse; }
        else try { labels = new int[(long)p.Width * p.Height]; }
        catch (OutOfMemoryException) { throw new InputException(Path, $"page {index + 1}: not enough memory for a {p.Width} x {p.Height} px page ({4L * p.Width * p.Height} bytes of labels)"); }
        int rowBytes = g.BlockW * bytesPer;
        // Compressed and inflated blocks in buffers rented for this page and returned at its end (pages of a movie are
        // megabytes each: fresh arrays would land on the large-object heap page after page).
        byte[]? raw = null, inflated = null;
        try
        {
        for (int bi = 0; bi < g.Blocks; bi++)
        {
            int bx = bi % g.Across, by = bi / g.Across;
            int rows = BlockRows(p, g, bi);
            int expected = rows * rowBytes;   // <= Array.MaxLength, checked in RequireIntegerLabels
            try
            {
                int count = (int)Math.Min(p.ByteCounts[bi], p.Compression == 1 ? expected : int.MaxValue);
                Rented(ref raw, count);
                if (Read(p.Offsets[bi], raw.AsSpan(0, count)) < count) throw new InputException(Path, $"truncated: page {index + 1} pixel data cut short");
                int decoded = Decode(p.Compression, raw, count, expected, ref inflated, out var data);
                if (decoded < expected) throw new InputException(Path, $"truncated or corrupt: page {index + 1} {block} {bi + 1} decodes to {decoded} bytes, expected {expected}");
                if (p.Predictor == 2) UndoPredictor(data, g.BlockW, rows, bytesPer);
                int x0 = bx * g.BlockW, n = Math.Min(g.BlockW, p.Width - x0);
                for (int r = 0; r < rows; r++)
                {
                    int y = by * g.BlockH + r;
                    if (y >= p.Height) break;
                    Convert(data.AsSpan(r * rowBytes, n * bytesPer), labels.AsSpan(y * p.Width + x0, n), p, index);
                }
            }
            catch (Exception e) when (e is not InputException and not OutOfMemoryException)
            {
                throw new InputException(Path, $"page {index + 1}: corrupt pixel data in {block} {bi + 1} ({e.GetType().Name}: {OneLine(e.Message)})");
            }
        }
        }
        finally { Return(raw); Return(inflated); }
        return labels;
    }

    /// <summary>Makes <paramref name="buffer"/> a pooled array of at least <paramref name="length"/> bytes (returning a smaller one).</summary>
    private static void Rented([NotNull] ref byte[]? buffer, int length)
    {
        if (buffer is not null && buffer.Length >= length) return;
        Return(buffer);
        buffer = ArrayPool<byte>.Shared.Rent(length);
    }

    private static void Return(byte[]? buffer) { if (buffer is not null) ArrayPool<byte>.Shared.Return(buffer); }

    private void Convert(ReadOnlySpan<byte> src, Span<int> dst, TiffPage p, int index)
    {
        bool signed = p.SampleFormat == 2;
        bool native = _little == BitConverter.IsLittleEndian;
        switch (p.BitsPerSample)
        {
            case 8:
                if (signed) { for (int i = 0; i < dst.Length; i++) { int v = (sbyte)src[i]; if (v < 0) Negative(v, index); dst[i] = v; } }
                else for (int i = 0; i < dst.Length; i++) dst[i] = src[i];
                break;
            case 16:
                if (native && !signed) { var s = MemoryMarshal.Cast<byte, ushort>(src); for (int i = 0; i < dst.Length; i++) dst[i] = s[i]; }
                else if (signed) { for (int i = 0; i < dst.Length; i++) { int v = (short)U16(src[(2 * i)..]); if (v < 0) Negative(v, index); dst[i] = v; } }
                else for (int i = 0; i < dst.Length; i++) dst[i] = U16(src[(2 * i)..]);
                break;
            case 32:
                if (signed) { for (int i = 0; i < dst.Length; i++) { int v = (int)U32(src[(4 * i)..]); if (v < 0) Negative(v, index); dst[i] = v; } }
                else if (native) MemoryMarshal.Cast<byte, int>(src)[..dst.Length].CopyTo(dst);   // bit-reinterpretation of uint32
                else for (int i = 0; i < dst.Length; i++) dst[i] = unchecked((int)U32(src[(4 * i)..]));
                break;
            default:
                for (int i = 0; i < dst.Length; i++)
                {
                    ulong v = U64(src[(8 * i)..]);
                    if (signed && (long)v < 0) Negative((long)v, index);
                    if (v > uint.MaxValue) throw new InputException(Path, $"page {index + 1}: label {v} does not fit in 32 bits (labels are read up to {uint.MaxValue})");
                    dst[i] = unchecked((int)(uint)v);
                }
                break;
        }
    }

    private void Negative(long v, int index) =>
        throw new InputException(Path, $"page {index + 1}: negative label value {v}; labels must be >= 0");

    private void UndoPredictor(byte[] data, int w, int rows, int bytesPer)
    {
        // TIFF 6.0 section 14: each sample is stored as the difference from its left neighbour, in the file's byte order.
        for (int r = 0; r < rows; r++)
        {
            var row = data.AsSpan(r * w * bytesPer, w * bytesPer);
            switch (bytesPer)
            {
                case 1:
                    for (int x = 1; x < w; x++) row[x] = (byte)(row[x] + row[x - 1]);
                    break;
                case 2:
                    for (int x = 1; x < w; x++)
                    {
                        ushort v = (ushort)(U16(row[(2 * x)..]) + U16(row[(2 * x - 2)..]));
                        if (_little) BinaryPrimitives.WriteUInt16LittleEndian(row[(2 * x)..], v); else BinaryPrimitives.WriteUInt16BigEndian(row[(2 * x)..], v);
                    }
                    break;
                case 4:
                    for (int x = 1; x < w; x++)
                    {
                        uint v = unchecked((uint)U32(row[(4 * x)..]) + (uint)U32(row[(4 * x - 4)..]));
                        if (_little) BinaryPrimitives.WriteUInt32LittleEndian(row[(4 * x)..], v); else BinaryPrimitives.WriteUInt32BigEndian(row[(4 * x)..], v);
                    }
                    break;
                default:
                    for (int x = 1; x < w; x++)
                    {
                        ulong v = unchecked(U64(row[(8 * x)..]) + U64(row[(8 * x - 8)..]));
                        if (_little) BinaryPrimitives.WriteUInt64LittleEndian(row[(8 * x)..], v); else BinaryPrimitives.WriteUInt64BigEndian(row[(8 * x)..], v);
                    }
                    break;
            }
        }
    }

    /// <summary>Decodes one block; the output never exceeds <paramref name="expected"/> bytes (a decompression bomb stops there).</summary>
    /// <remarks>Returns the bytes decoded, found in <paramref name="data"/>: <paramref name="raw"/> itself when the block is
    /// stored uncompressed, <paramref name="inflated"/> (a pooled buffer, grown as needed) for Deflate.</remarks>
    private static int Decode(int compression, byte[] raw, int count, int expected, ref byte[]? inflated, out byte[] data)
    {
        switch (compression)
        {
            case 1:
                data = raw;
                return count;
            case 8 or 32946:
                Rented(ref inflated, expected);
                data = inflated;
                return Inflate(raw, count, inflated, expected);
            default:
                data = compression switch
                {
                    32773 => PackBits(raw.AsSpan(0, count), expected),
                    5 => Lzw(raw.AsSpan(0, count), expected),
                    _ => throw new InvalidDataException($"compression {compression}"),
                };
                return data.Length;
        }
    }

    /// <summary>Inflates the first <paramref name="count"/> bytes of <paramref name="raw"/> into <paramref name="outp"/>,
    /// at most <paramref name="expected"/> bytes; returns the bytes written.</summary>
    private static int Inflate(byte[] raw, int count, byte[] outp, int expected)
    {
        using var z = new ZLibStream(new MemoryStream(raw, 0, count), CompressionMode.Decompress);
        int got = 0, n;
        while (got < expected && (n = z.Read(outp, got, expected - got)) > 0) got += n;
        return got;
    }

    /// <summary>PackBits (TIFF 6.0 section 9); a run cut short by the end of the data ends the output there.</summary>
    private static byte[] PackBits(ReadOnlySpan<byte> raw, int expected)
    {
        var o = new byte[expected];
        int i = 0, j = 0;
        while (i < raw.Length && j < expected)
        {
            int n = (sbyte)raw[i++];
            if (n >= 0)
            {
                int c = Math.Min(Math.Min(n + 1, expected - j), raw.Length - i);
                raw.Slice(i, c).CopyTo(o.AsSpan(j));
                i += n + 1; j += c;
            }
            else if (n != -128)
            {
                if (i >= raw.Length) break;
                byte b = raw[i++];
                int c = Math.Min(1 - n, expected - j);
                o.AsSpan(j, c).Fill(b); j += c;
            }
        }
        return j == expected ? o : o[..j];
    }

    /// <summary>TIFF LZW (MSB-first codes, early change), TIFF 6.0 section 13. Each table entry keeps its length and first
    /// byte, so a string is written in place from its last byte back along the prefix chain.</summary>
    private static byte[] Lzw(ReadOnlySpan<byte> raw, int expected)
    {
        var o = new byte[expected];
        int j = 0;
        var prefix = new short[4096]; var suffix = new byte[4096]; var firstOf = new byte[4096]; var length = new int[4096];
        for (int i = 0; i < 256; i++) { prefix[i] = -1; suffix[i] = (byte)i; firstOf[i] = (byte)i; length[i] = 1; }
        int next = 258, width = 9, old = -1, pos = 0;
        ulong acc = 0; int bits = 0;
        while (j < expected)
        {
            while (bits < width && pos < raw.Length) { acc = (acc << 8) | raw[pos++]; bits += 8; }
            if (bits < width) break;
            int code = (int)(acc >> (bits - width)) & ((1 << width) - 1);
            bits -= width;
            if (code == 257) break;
            if (code == 256) { next = 258; width = 9; old = -1; continue; }
            if (old < 0)
            {
                if (code > 255) throw new InvalidDataException("LZW stream starts with a non-literal code");
                o[j++] = (byte)code; old = code; continue;
            }
            int cur;
            byte first;
            if (code < next) { cur = code; first = firstOf[code]; }
            else if (code == next) { cur = old; first = firstOf[old]; }
            else throw new InvalidDataException("LZW code out of range");
            int len = length[cur];
            int at = j + len - 1;
            for (int c = cur; c >= 0; c = prefix[c], at--) if (at < expected) o[at] = suffix[c];
            j = Math.Min(j + len, expected);
            if (code == next && j < expected) o[j++] = first;
            if (next < 4096) { prefix[next] = (short)old; suffix[next] = first; firstOf[next] = firstOf[old]; length[next] = length[old] + 1; next++; }
            old = code;
            if (next + 1 >= (1 << width) && width < 12) width++;
        }
        return j == expected ? o : o[..j];
    }

    /// <summary>Closes the file.</summary>
    public void Dispose() => _fs.Dispose();
}
