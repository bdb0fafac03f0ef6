using System.Buffers.Binary;
using System.IO.Compression;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Layout of one TIFF page (image file directory).</summary>
public sealed record TiffPage(int Index, int Width, int Height, int BitsPerSample, int SampleFormat, int SamplesPerPixel,
    int Compression, int Predictor, int RowsPerStrip, long[] Offsets, long[] ByteCounts, int TileWidth, int TileHeight,
    string? Description, double XResolution, int ResolutionUnit, double YResolution = 0);

/// <summary>
/// A minimal, streaming reader of baseline TIFF and BigTIFF grayscale integer pages: strips or tiles, uncompressed,
/// Deflate, LZW or PackBits, with horizontal-difference predictor. It walks the IFD chain once for the page layouts and
/// decodes one page at a time, so a long movie never sits in memory. It also exposes the first page's ImageDescription,
/// where OME-TIFF keeps its OME-XML.
/// </summary>
/// <remarks>Adobe Systems (1992), TIFF Revision 6.0 specification; Adobe PageMaker 6.0 TIFF Technical Notes (1995) for
/// Deflate; the BigTIFF extension (Aware Systems, 2007). Written here rather than taken from OpenCV because OpenCV reads a
/// multi-page file whole and does not expose the ImageDescription tag.</remarks>
public sealed class TiffPages : IDisposable
{
    private readonly FileStream _fs;
    private readonly bool _little;
    private readonly bool _big;
    public string Path { get; }
    public long FileLength { get; }
    public IReadOnlyList<TiffPage> Pages { get; }

    public TiffPages(string path)
    {
        Path = path;
        try { _fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.RandomAccess); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException) { throw new InputException(path, $"cannot open: {e.Message}"); }
        FileLength = _fs.Length;
        Span<byte> h = stackalloc byte[16];
        if (FileLength < 8 || Read(0, h[..8]) < 8) throw new InputException(path, "not a TIFF file (shorter than a TIFF header)");
        if (h[0] == 'I' && h[1] == 'I') _little = true;
        else if (h[0] == 'M' && h[1] == 'M') _little = false;
        else throw new InputException(path, "not a TIFF file (no II/MM byte-order mark)");
        int magic = U16(h[2..]);
        long first;
        if (magic == 42) first = U32(h[4..]);
        else if (magic == 43)
        {
            _big = true;
            if (Read(0, h) < 16) throw new InputException(path, "truncated BigTIFF header");
            first = (long)U64(h[8..]);
        }
        else throw new InputException(path, $"not a TIFF file (magic number {magic})");
        Pages = ReadLayouts(first);
        if (Pages.Count == 0) throw new InputException(path, "TIFF file has no pages");
    }

    private int Read(long offset, Span<byte> dst) => RandomAccess.Read(_fs.SafeFileHandle, dst, offset);
    private int U16(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt16LittleEndian(b) : BinaryPrimitives.ReadUInt16BigEndian(b);
    private long U32(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt32LittleEndian(b) : BinaryPrimitives.ReadUInt32BigEndian(b);
    private ulong U64(ReadOnlySpan<byte> b) => _little ? BinaryPrimitives.ReadUInt64LittleEndian(b) : BinaryPrimitives.ReadUInt64BigEndian(b);

    private static int TypeSize(int type) => type switch
    {
        1 or 2 or 6 or 7 => 1, 3 or 8 => 2, 4 or 9 or 11 or 13 => 4, 5 or 10 or 12 or 16 or 17 or 18 => 8, _ => 0,
    };

    private List<TiffPage> ReadLayouts(long ifd)
    {
        var pages = new List<TiffPage>();
        var seen = new HashSet<long>();
        int entrySize = _big ? 20 : 12, countSize = _big ? 8 : 2, nextSize = _big ? 8 : 4;
        Span<byte> cb = stackalloc byte[8];
        while (ifd != 0)
        {
            if (!seen.Add(ifd)) throw new InputException(Path, $"page {pages.Count + 1}: IFD chain loops back on itself (corrupt file)");
            if (ifd + countSize > FileLength) throw new InputException(Path, $"truncated: page {pages.Count + 1} directory lies past the end of the file ({FileLength} bytes)");
            Read(ifd, cb[..countSize]);
            long n = _big ? (long)U64(cb) : U16(cb);
            long dirBytes = n * entrySize + nextSize;
            if (ifd + countSize + dirBytes > FileLength) throw new InputException(Path, $"truncated: page {pages.Count + 1} directory runs past the end of the file ({FileLength} bytes)");
            var dir = new byte[dirBytes];
            Read(ifd + countSize, dir);
            var tags = new Dictionary<int, (int Type, long Count, byte[] Raw)>();
            for (int i = 0; i < n; i++)
            {
                var e = dir.AsSpan(i * entrySize, entrySize);
                int tag = U16(e), type = U16(e[2..]);
                long count = _big ? (long)U64(e[4..]) : U32(e[4..]);
                int ts = TypeSize(type);
                if (ts == 0) continue;
                long bytes = count * ts;
                int inline = _big ? 8 : 4;
                byte[] raw;
                if (bytes <= inline) raw = e.Slice(_big ? 12 : 8, (int)bytes).ToArray();
                else
                {
                    long off = _big ? (long)U64(e[12..]) : U32(e[8..]);
                    if (off + bytes > FileLength || bytes > int.MaxValue)
                        throw new InputException(Path, $"truncated: page {pages.Count + 1} tag {tag} data lies past the end of the file ({FileLength} bytes)");
                    raw = new byte[bytes];
                    Read(off, raw);
                }
                tags[tag] = (type, count, raw);
            }
            pages.Add(Layout(pages.Count, tags));
            var nx = dir.AsSpan((int)(n * entrySize));
            ifd = _big ? (long)U64(nx) : U32(nx);
        }
        return pages;
    }

    private long[] Values(Dictionary<int, (int Type, long Count, byte[] Raw)> tags, int tag)
    {
        if (!tags.TryGetValue(tag, out var t)) return [];
        var r = new long[t.Count];
        for (int i = 0; i < t.Count; i++)
            r[i] = t.Type switch
            {
                1 or 7 => t.Raw[i],
                3 => U16(t.Raw.AsSpan(i * 2)),
                4 or 13 => U32(t.Raw.AsSpan(i * 4)),
                16 or 18 => (long)U64(t.Raw.AsSpan(i * 8)),
                _ => 0,
            };
        return r;
    }

    private TiffPage Layout(int index, Dictionary<int, (int Type, long Count, byte[] Raw)> tags)
    {
        long One(int tag, long dflt) { var v = Values(tags, tag); return v.Length > 0 ? v[0] : dflt; }
        int w = (int)One(256, 0), h = (int)One(257, 0);
        if (w <= 0 || h <= 0) throw new InputException(Path, $"page {index + 1} has no image size (corrupt TIFF directory)");
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
        bool tiled = tags.ContainsKey(322);
        var offsets = Values(tags, tiled ? 324 : 273);
        var counts = Values(tags, tiled ? 325 : 279);
        if (offsets.Length == 0) throw new InputException(Path, $"page {index + 1} has no pixel data offsets (corrupt TIFF directory)");
        if (counts.Length != offsets.Length) throw new InputException(Path, $"page {index + 1} has {offsets.Length} data offsets but {counts.Length} byte counts (corrupt TIFF directory)");
        for (int i = 0; i < offsets.Length; i++)
            if (offsets[i] + counts[i] > FileLength)
                throw new InputException(Path, $"truncated: page {index + 1} pixel data ends at byte {offsets[i] + counts[i]} but the file has {FileLength} bytes");
        return new TiffPage(index, w, h, bps.Length > 0 ? (int)bps[0] : 1, (int)One(339, 1), (int)One(277, 1),
            (int)One(259, 1), (int)One(317, 1), (int)Math.Min(One(278, h), h), offsets, counts,
            (int)One(322, 0), (int)One(323, 0), desc, xres, (int)One(296, 2), yres);
    }

    /// <summary>Checks that a page holds single-channel integer labels of 8, 16 or 32 bits; throws a one-line <see cref="InputException"/> otherwise.</summary>
    public void RequireIntegerLabels(TiffPage p)
    {
        string where = Pages.Count > 1 ? $"page {p.Index + 1}: " : "";
        if (p.SampleFormat == 3) throw new InputException(Path, $"{where}floating-point pixels ({p.BitsPerSample}-bit); a label image needs integer pixels (8, 16 or 32 bit)");
        if (p.SamplesPerPixel != 1) throw new InputException(Path, $"{where}has {p.SamplesPerPixel} samples per pixel (colour); a label image must be single-channel");
        if (p.BitsPerSample is not (8 or 16 or 32)) throw new InputException(Path, $"{where}{p.BitsPerSample}-bit pixels; a label image needs 8-, 16- or 32-bit integer pixels");
        if (p.SampleFormat is not (1 or 2)) throw new InputException(Path, $"{where}unsupported sample format {p.SampleFormat}");
        if (p.Compression is not (1 or 5 or 8 or 32946 or 32773)) throw new InputException(Path, $"{where}unsupported TIFF compression {p.Compression} (supported: none, LZW, Deflate, PackBits)");
    }

    /// <summary>Decodes page <paramref name="index"/> into integer labels (row-major).</summary>
    public int[] ReadLabels(int index)
    {
        var p = Pages[index];
        RequireIntegerLabels(p);
        int bytesPer = p.BitsPerSample / 8;
        bool tiled = p.TileWidth > 0 && p.TileHeight > 0;
        int blockW = tiled ? p.TileWidth : p.Width, blockH = tiled ? p.TileHeight : p.RowsPerStrip;
        int across = tiled ? (p.Width + blockW - 1) / blockW : 1;
        int down = (p.Height + blockH - 1) / blockH;
        if (p.Offsets.Length < across * down) throw new InputException(Path, $"page {index + 1} has {p.Offsets.Length} data blocks, expected {across * down} (corrupt TIFF directory)");
        var labels = new int[p.Width * p.Height];
        int rowBytes = blockW * bytesPer;
        for (int bi = 0; bi < across * down; bi++)
        {
            int bx = bi % across, by = bi / across;
            int rows = tiled ? blockH : Math.Min(blockH, p.Height - by * blockH);
            int expected = rows * rowBytes;
            var raw = new byte[p.ByteCounts[bi]];
            if (Read(p.Offsets[bi], raw) < raw.Length) throw new InputException(Path, $"truncated: page {index + 1} pixel data cut short");
            byte[] data;
            try { data = Decode(p.Compression, raw, expected); }
            catch (Exception e) when (e is InvalidDataException or IndexOutOfRangeException or ArgumentException)
            { throw new InputException(Path, $"page {index + 1}: corrupt compressed pixel data ({e.Message})"); }
            if (data.Length < expected) throw new InputException(Path, $"truncated: page {index + 1} block {bi + 1} decodes to {data.Length} bytes, expected {expected}");
            if (p.Predictor == 2) UndoPredictor(data, blockW, rows, bytesPer);
            for (int r = 0; r < rows; r++)
            {
                int y = by * blockH + r;
                if (y >= p.Height) break;
                int x0 = bx * blockW, n = Math.Min(blockW, p.Width - x0);
                var src = data.AsSpan(r * rowBytes, n * bytesPer);
                var dst = labels.AsSpan(y * p.Width + x0, n);
                Convert(src, dst, p, index);
            }
        }
        return labels;
    }

    private void Convert(ReadOnlySpan<byte> src, Span<int> dst, TiffPage p, int index)
    {
        bool signed = p.SampleFormat == 2;
        switch (p.BitsPerSample)
        {
            case 8:
                for (int i = 0; i < dst.Length; i++) dst[i] = signed ? (sbyte)src[i] : src[i];
                break;
            case 16:
                for (int i = 0; i < dst.Length; i++)
                {
                    int v = U16(src[(2 * i)..]);
                    dst[i] = signed ? (short)v : v;
                }
                break;
            default:
                for (int i = 0; i < dst.Length; i++)
                {
                    long v = U32(src[(4 * i)..]);
                    if (signed) v = (int)v;
                    if (v > int.MaxValue) throw new InputException(Path, $"page {index + 1}: label {v} exceeds the supported maximum {int.MaxValue}");
                    dst[i] = (int)v;
                }
                break;
        }
        for (int i = 0; i < dst.Length; i++)
            if (dst[i] < 0) throw new InputException(Path, $"page {index + 1}: negative label value {dst[i]}; labels must be >= 0");
    }

    private void UndoPredictor(byte[] data, int w, int rows, int bytesPer)
    {
        for (int r = 0; r < rows; r++)
        {
            int o = r * w * bytesPer;
            for (int x = 1; x < w; x++)
            {
                int a = o + x * bytesPer, b = a - bytesPer;
                switch (bytesPer)
                {
                    case 1: data[a] = (byte)(data[a] + data[b]); break;
                    case 2:
                    {
                        int v = U16(data.AsSpan(a)) + U16(data.AsSpan(b));
                        if (_little) BinaryPrimitives.WriteUInt16LittleEndian(data.AsSpan(a), (ushort)v);
                        else BinaryPrimitives.WriteUInt16BigEndian(data.AsSpan(a), (ushort)v);
                        break;
                    }
                    default:
                    {
                        uint v = (uint)U32(data.AsSpan(a)) + (uint)U32(data.AsSpan(b));
                        if (_little) BinaryPrimitives.WriteUInt32LittleEndian(data.AsSpan(a), v);
                        else BinaryPrimitives.WriteUInt32BigEndian(data.AsSpan(a), v);
                        break;
                    }
                }
            }
        }
    }

    private static byte[] Decode(int compression, byte[] raw, int expected) => compression switch
    {
        1 => raw,
        8 or 32946 => Inflate(raw, expected),
        32773 => PackBits(raw, expected),
        5 => Lzw(raw, expected),
        _ => throw new ArgumentException($"compression {compression}"),
    };

    private static byte[] Inflate(byte[] raw, int expected)
    {
        using var z = new ZLibStream(new MemoryStream(raw), CompressionMode.Decompress);
        var outp = new byte[expected];
        int got = 0, n;
        while (got < expected && (n = z.Read(outp, got, expected - got)) > 0) got += n;
        return got == expected ? outp : outp[..got];
    }

    private static byte[] PackBits(byte[] raw, int expected)
    {
        var o = new byte[expected];
        int i = 0, j = 0;
        while (i < raw.Length && j < expected)
        {
            int n = (sbyte)raw[i++];
            if (n >= 0) { int c = Math.Min(n + 1, expected - j); Array.Copy(raw, i, o, j, c); i += n + 1; j += c; }
            else if (n != -128) { byte b = raw[i++]; int c = Math.Min(1 - n, expected - j); o.AsSpan(j, c).Fill(b); j += c; }
        }
        return j == expected ? o : o[..j];
    }

    /// <summary>TIFF LZW (MSB-first codes, early change), TIFF 6.0 section 13.</summary>
    private static byte[] Lzw(byte[] raw, int expected)
    {
        var o = new byte[expected];
        int j = 0;
        var prefix = new int[4096]; var suffix = new byte[4096]; var length = new int[4096];
        for (int i = 0; i < 256; i++) { prefix[i] = -1; suffix[i] = (byte)i; length[i] = 1; }
        int next = 258, width = 9, old = -1;
        long bitPos = 0, totalBits = (long)raw.Length * 8;
        var stack = new byte[4096];
        while (bitPos + width <= totalBits && j < expected)
        {
            int code = 0;
            for (int b = 0; b < width; b++, bitPos++) code = (code << 1) | ((raw[bitPos >> 3] >> (7 - (int)(bitPos & 7))) & 1);
            if (code == 257) break;
            if (code == 256) { next = 258; width = 9; old = -1; continue; }
            int cur = code;
            byte first;
            if (old < 0) { if (code > 255) throw new InvalidDataException("LZW stream starts with a non-literal code"); o[j++] = (byte)code; old = code; continue; }
            int sp = 0;
            if (code < next) { cur = code; }
            else if (code == next) { cur = old; }
            else throw new InvalidDataException("LZW code out of range");
            int c = cur;
            while (c >= 0) { stack[sp++] = suffix[c]; c = prefix[c]; }
            first = stack[sp - 1];
            for (int k = sp - 1; k >= 0 && j < expected; k--) o[j++] = stack[k];
            if (code == next && j < expected) o[j++] = first;
            if (next < 4096) { prefix[next] = old; suffix[next] = first; length[next] = length[old] + 1; next++; }
            old = code;
            if (next + 1 >= (1 << width) && width < 12) width++;
        }
        return j == expected ? o : o[..j];
    }

    public void Dispose() => _fs.Dispose();
}
