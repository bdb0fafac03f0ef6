namespace ShapeNoise.Reading;

/// <summary>One frame of a label movie: 0 = background, any other value = one object. Row-major, Width x Height.</summary>
public sealed class LabelFrame(int index, int width, int height, int[] labels)
{
    /// <summary>Zero-based frame number in the movie.</summary>
    public int Index { get; } = index;
    /// <summary>Frame width (px).</summary>
    public int Width { get; } = width;
    /// <summary>Frame height (px).</summary>
    public int Height { get; } = height;
    /// <summary>Row-major label values, <c>Labels[y * Width + x]</c>; length Width x Height (checked).</summary>
    public int[] Labels { get; } = labels.Length == width * height ? labels
        : throw new ArgumentException($"label array has {labels.Length} values, expected {width}x{height}");
}

/// <summary>What is known about a movie before its pixels are read.</summary>
/// <param name="Path">File or folder the frames come from.</param>
/// <param name="Width">Frame width in px.</param>
/// <param name="Height">Frame height in px.</param>
/// <param name="FrameCount">Number of frames.</param>
/// <param name="PixelSizeUm">Pixel size from metadata (um/px), or null.</param>
/// <param name="FrameIntervalMin">Frame interval from metadata (min), or null.</param>
/// <param name="Format">Human-readable description of the container and pixel type.</param>
/// <param name="PixelSizeSource">Where <paramref name="PixelSizeUm"/> came from: "option", "OME-XML", "ImageJ header",
/// "TIFF resolution tags" or "none".</param>
/// <param name="FrameIntervalSource">Where <paramref name="FrameIntervalMin"/> came from (same vocabulary).</param>
/// <param name="PixelSizeYUm">Pixel height (um/px) when it differs from the width (non-square pixels), else null.</param>
/// <param name="Plane">Which plane of a multi-dimensional file the frames are (e.g. "series 0, channel 1 of 2, z 0 of 1"), or null.</param>
/// <param name="Resampling">What was done to make pixels square (e.g. "rows resampled 24 -> 31 px, nearest neighbour"), or null.</param>
public sealed record MovieInfo(string Path, int Width, int Height, int FrameCount,
    double? PixelSizeUm, double? FrameIntervalMin, string Format,
    string PixelSizeSource = "none", string FrameIntervalSource = "none", double? PixelSizeYUm = null,
    string? Plane = null, string? Resampling = null);

/// <summary>A stream of label frames, read one at a time so memory does not grow with the movie length.</summary>
public interface ILabelMovie : IDisposable
{
    /// <summary>Size, frame count, calibration and format, known before any pixel is read.</summary>
    MovieInfo Info { get; }
    /// <summary>The frames in order; each is read when enumerated.</summary>
    IEnumerable<LabelFrame> Frames();
    /// <summary>The frames whose index <paramref name="wanted"/> accepts, in order; a format that can seek does not decode
    /// the others (the report's overlays need three frames of the movie, not all of them).</summary>
    IEnumerable<LabelFrame> Frames(Func<int, bool> wanted) => Frames().Where(f => wanted(f.Index));
    /// <summary>The files this movie reads, for provenance.</summary>
    IReadOnlyList<string> Files { get; }
    /// <summary>The caller will not read <paramref name="labels"/> (a frame's <see cref="LabelFrame.Labels"/>) again: the movie
    /// may decode a later frame into it. Default: nothing (the array is left to the garbage collector).</summary>
    void Recycle(int[] labels) { }
}

/// <summary>Bad input: names the file and says what is wrong with it, in one line.</summary>
public sealed class InputException(string path, string problem) : Exception($"{path}: {problem}")
{
    /// <summary>The file or folder the problem is in.</summary>
    public string PathName { get; } = path;
    /// <summary>What is wrong with the input, in one line without the path.</summary>
    public string Problem { get; } = problem;
}

/// <summary>The output folder cannot be written.</summary>
public sealed class OutputException(string path, string problem) : Exception($"{path}: {problem}")
{
    /// <summary>The output file or folder that cannot be written.</summary>
    public string PathName { get; } = path;
}
