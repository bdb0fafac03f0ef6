using OpenCvSharp;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>A folder of single-frame label images (.tif/.tiff/.png), one file a frame, in natural sort order.</summary>
/// <remarks>PNG files are decoded with OpenCV (imread, IMREAD_UNCHANGED; palette PNGs only with the identity palette); TIFF
/// files with <see cref="TiffPages"/>. Hidden files (names starting with '.') are skipped.
/// Pixel size and frame interval come from the first TIFF's metadata when it has any.</remarks>
internal sealed class FolderLabelMovie : ILabelMovie
{
    /// <inheritdoc/>
    public MovieInfo Info { get; }
    /// <inheritdoc/>
    public IReadOnlyList<string> Files { get; }

    /// <summary>Lists the frames of <paramref name="folder"/> and reads the first for size and metadata; throws <see cref="InputException"/> when the folder holds no frames.</summary>
    public FolderLabelMovie(string folder)
    {
        // Hidden files are not frames: macOS leaves "._name" AppleDouble files beside copies, and ".DS_Store".
        var files = Directory.EnumerateFiles(folder)
            .Where(f => !Path.GetFileName(f).StartsWith('.') && Path.GetExtension(f).ToLowerInvariant() is ".tif" or ".tiff" or ".png")
            .ToList();
        if (files.Count == 0) throw new InputException(folder, "folder holds no .tif, .tiff or .png frames");
        files.Sort(NaturalCompare);
        Files = files;
        var first = ReadFile(files[0], out var scale);
        Info = new MovieInfo(folder, first.Width, first.Height, files.Count, scale.PixelSizeUm, scale.FrameIntervalMin,
            $"folder of {files.Count} {Path.GetExtension(files[0]).TrimStart('.').ToUpperInvariant()} frames, metadata: {scale.Source}");
    }

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames() => Frames(static _ => true);

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames(Func<int, bool> wanted)
    {
        for (int i = 0; i < Files.Count; i++)
        {
            if (!wanted(i)) continue;
            var f = ReadFile(Files[i], out _);
            if (f.Width != Info.Width || f.Height != Info.Height)
                throw new InputException(Files[i], $"is {f.Width}x{f.Height}, the first frame is {Info.Width}x{Info.Height}");
            yield return new LabelFrame(i, f.Width, f.Height, f.Labels);
        }
    }

    private static LabelFrame ReadFile(string file, out MovieMetadata.Scale scale)
    {
        if (Path.GetExtension(file).ToLowerInvariant() is ".tif" or ".tiff")
        {
            using var t = new TiffPages(file);
            if (t.Pages.Count > 1) throw new InputException(file, $"has {t.Pages.Count} pages; a folder movie needs one frame per file");
            var p = t.Pages[0];
            scale = MovieMetadata.FromDescription(file, p.Description, p.XResolution);
            return new LabelFrame(0, p.Width, p.Height, t.ReadLabels(0));
        }
        scale = new MovieMetadata.Scale(null, null, "none");
        return ReadPng(file);
    }

    /// <summary>Reads an 8- or 16-bit greyscale PNG, or a palette PNG whose palette is the identity grey ramp (entry i =
    /// (i, i, i), what PIL writes for a mode 'P' image), as labels; the palette index is the label.</summary>
    /// <remarks>PNG specification (W3C, 2003), sections 5.3 (chunk layout), 11.2.2 (IHDR: bit depth at byte 8, colour
    /// type at byte 9 of its data) and 11.2.3 (PLTE). OpenCV's imread expands a palette to BGR, so the index is taken
    /// back from the blue channel, which equals it exactly when the palette is the identity.</remarks>
    public static LabelFrame ReadPng(string file)
    {
        if (new FileInfo(file).Length == 0) throw new InputException(file, "empty file");
        var (colourType, palette) = PngHeader(file);
        if (colourType == 3)
        {
            if (palette is null) throw new InputException(file, "palette PNG without a PLTE chunk (corrupt file)");
            for (int i = 0; i < palette.Length / 3; i++)
                if (palette[3 * i] != i || palette[3 * i + 1] != i || palette[3 * i + 2] != i)
                    throw new InputException(file, $"is a colour (palette) image: palette entry {i} is ({palette[3 * i]},{palette[3 * i + 1]},{palette[3 * i + 2]}), " +
                        $"not ({i},{i},{i}); a label PNG must be greyscale (8 or 16 bit) or have the identity palette");
        }
        using var mat = Cv2.ImRead(file, ImreadModes.Unchanged);
        if (mat.Empty()) throw new InputException(file, "cannot be decoded as an image (corrupt or truncated)");
        int channels = mat.Channels();
        if (channels != 1 && !(colourType == 3 && channels is 3 or 4 && mat.Depth() == MatType.CV_8U))
            throw new InputException(file, $"has {channels} channels (colour); a label image must be single-channel");
        int w = mat.Width, h = mat.Height;
        var labels = new int[w * h];
        if (mat.Depth() == MatType.CV_8U)
        {
            var row = new byte[w * channels];
            for (int y = 0; y < h; y++)
            {
                System.Runtime.InteropServices.Marshal.Copy(mat.Ptr(y), row, 0, row.Length);
                for (int x = 0; x < w; x++) labels[y * w + x] = row[x * channels];   // channel 0 (blue) = the index for an identity palette
            }
        }
        else if (mat.Depth() == MatType.CV_16U)
        {
            var row = new short[w];
            for (int y = 0; y < h; y++) { System.Runtime.InteropServices.Marshal.Copy(mat.Ptr(y), row, 0, w); for (int x = 0; x < w; x++) labels[y * w + x] = (ushort)row[x]; }
        }
        else throw new InputException(file, $"pixel depth {mat.Depth()} is not supported; a label PNG needs 8- or 16-bit integer pixels");
        return new LabelFrame(0, w, h, labels);
    }

    /// <summary>The IHDR colour type and the PLTE entries (null when absent) of a PNG, read from the chunks before the
    /// first IDAT; (-1, null) when the file is not a well-formed PNG (OpenCV then reports it).</summary>
    private static (int ColourType, byte[]? Palette) PngHeader(string file)
    {
        try
        {
            using var fs = new FileStream(file, FileMode.Open, FileAccess.Read, FileShare.Read);
            Span<byte> head = stackalloc byte[8];
            if (fs.Read(head) < 8 || !head.SequenceEqual((ReadOnlySpan<byte>)[137, 80, 78, 71, 13, 10, 26, 10])) return (-1, null);
            int colourType = -1;
            byte[]? palette = null;
            for (int k = 0; k < 10_000; k++)
            {
                if (fs.Read(head) < 8) break;
                long n = System.Buffers.Binary.BinaryPrimitives.ReadUInt32BigEndian(head);
                string type = System.Text.Encoding.ASCII.GetString(head[4..]);
                if (type is "IDAT" or "IEND") break;
                if ((type == "IHDR" && n == 13) || (type == "PLTE" && n <= 768 && n % 3 == 0))
                {
                    var data = new byte[n];
                    if (fs.Read(data) < n) break;
                    if (type == "IHDR") colourType = data[9]; else palette = data;
                    fs.Seek(4, SeekOrigin.Current);
                }
                else fs.Seek(n + 4, SeekOrigin.Current);
            }
            return (colourType, palette);
        }
        catch (IOException) { return (-1, null); }
    }

    /// <summary>Natural order: digit runs compare by value ("frame2" before "frame10").</summary>
    public static int NaturalCompare(string? a, string? b)
    {
        a ??= ""; b ??= "";
        int i = 0, j = 0;
        while (i < a.Length && j < b.Length)
        {
            if (char.IsDigit(a[i]) && char.IsDigit(b[j]))
            {
                int si = i, sj = j;
                while (i < a.Length && char.IsDigit(a[i])) i++;
                while (j < b.Length && char.IsDigit(b[j])) j++;
                var na = a[si..i].TrimStart('0'); var nb = b[sj..j].TrimStart('0');
                int c = na.Length != nb.Length ? na.Length.CompareTo(nb.Length) : string.CompareOrdinal(na, nb);
                if (c != 0) return c;
            }
            else
            {
                int c = char.ToLowerInvariant(a[i]).CompareTo(char.ToLowerInvariant(b[j]));
                if (c != 0) return c;
                i++; j++;
            }
        }
        return (a.Length - i).CompareTo(b.Length - j);
    }

    /// <inheritdoc/>
    public void Dispose() { }
}
