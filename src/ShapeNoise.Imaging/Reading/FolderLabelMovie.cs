using OpenCvSharp;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>A folder of single-frame label images (.tif/.tiff/.png), one file a frame, in natural sort order.</summary>
/// <remarks>PNG files are decoded with OpenCV (imread, IMREAD_UNCHANGED); TIFF files with <see cref="TiffPages"/>.
/// Pixel size and frame interval come from the first TIFF's metadata when it has any.</remarks>
public sealed class FolderLabelMovie : ILabelMovie
{
    public MovieInfo Info { get; }
    public IReadOnlyList<string> Files { get; }

    public FolderLabelMovie(string folder)
    {
        var files = Directory.EnumerateFiles(folder)
            .Where(f => Path.GetExtension(f).ToLowerInvariant() is ".tif" or ".tiff" or ".png")
            .ToList();
        if (files.Count == 0) throw new InputException(folder, "folder holds no .tif, .tiff or .png frames");
        files.Sort(NaturalCompare);
        Files = files;
        var first = ReadFile(files[0], out var scale);
        Info = new MovieInfo(folder, first.Width, first.Height, files.Count, scale.PixelSizeUm, scale.FrameIntervalMin,
            $"folder of {files.Count} {Path.GetExtension(files[0]).TrimStart('.').ToUpperInvariant()} frames, metadata: {scale.Source}");
    }

    public IEnumerable<LabelFrame> Frames()
    {
        for (int i = 0; i < Files.Count; i++)
        {
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

    /// <summary>Reads an 8- or 16-bit single-channel PNG as labels.</summary>
    public static LabelFrame ReadPng(string file)
    {
        if (new FileInfo(file).Length == 0) throw new InputException(file, "empty file");
        using var mat = Cv2.ImRead(file, ImreadModes.Unchanged);
        if (mat.Empty()) throw new InputException(file, "cannot be decoded as an image (corrupt or truncated)");
        if (mat.Channels() != 1) throw new InputException(file, $"has {mat.Channels()} channels (colour); a label image must be single-channel");
        int w = mat.Width, h = mat.Height;
        var labels = new int[w * h];
        if (mat.Depth() == MatType.CV_8U)
        {
            var row = new byte[w];
            for (int y = 0; y < h; y++) { System.Runtime.InteropServices.Marshal.Copy(mat.Ptr(y), row, 0, w); for (int x = 0; x < w; x++) labels[y * w + x] = row[x]; }
        }
        else if (mat.Depth() == MatType.CV_16U)
        {
            var row = new short[w];
            for (int y = 0; y < h; y++) { System.Runtime.InteropServices.Marshal.Copy(mat.Ptr(y), row, 0, w); for (int x = 0; x < w; x++) labels[y * w + x] = (ushort)row[x]; }
        }
        else throw new InputException(file, $"pixel depth {mat.Depth()} is not supported; a label PNG needs 8- or 16-bit integer pixels");
        return new LabelFrame(0, w, h, labels);
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

    public void Dispose() { }
}
