using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Which plane of a multi-dimensional file is the movie, and scale values that override the file's metadata
/// (options <c>--series</c>, <c>--channel</c>, <c>--z-plane</c>, <c>--z-is-time</c>, <c>--pixel-size</c>,
/// <c>--frame-interval</c>). Indices are 0-based.</summary>
public sealed record MovieSelection
{
    /// <summary>No option given: a file with one series, channel and z plane opens; any other is refused.</summary>
    public static MovieSelection None { get; } = new();

    /// <summary>Series (OME <c>Image</c>, tifffile series), 0-based; null = the only one.</summary>
    public int? Series { get; init; }
    /// <summary>Channel, 0-based; null = the only one.</summary>
    public int? Channel { get; init; }
    /// <summary>Z plane, 0-based; null = the only one.</summary>
    public int? Z { get; init; }
    /// <summary>The file's z planes are time points (a stack without a time axis, e.g. ImageJ's plain stack of "slices").</summary>
    public bool ZIsTime { get; init; }
    /// <summary>Pixel size (um/px) that overrides the metadata and makes pixels square.</summary>
    public double? PixelSizeUm { get; init; }
    /// <summary>Frame interval (min) that overrides the metadata.</summary>
    public double? FrameIntervalMin { get; init; }

    /// <summary>Throws <see cref="ArgumentException"/> naming the option when a value is out of range.</summary>
    public MovieSelection Validated()
    {
        if (Series is < 0) throw new ArgumentException($"--series must be >= 0 (0-based; got {Series})");
        if (Channel is < 0) throw new ArgumentException($"--channel must be >= 0 (0-based; got {Channel})");
        if (Z is < 0) throw new ArgumentException($"--z-plane must be >= 0 (0-based; got {Z})");
        if (ZIsTime && Z is not null) throw new ArgumentException("--z-plane and --z-is-time exclude each other (--z-plane picks one plane, --z-is-time reads every plane as a frame)");
        if (PixelSizeUm is { } s && !(s > 0 && double.IsFinite(s))) throw new ArgumentException($"--pixel-size must be a positive number (got {s})");
        if (FrameIntervalMin is { } t && !(t > 0 && double.IsFinite(t))) throw new ArgumentException($"--frame-interval must be a positive number (got {t})");
        return this;
    }

    /// <summary>The plane picked from a layout: the page of every frame, in order.</summary>
    /// <param name="Pages">Page index of each frame.</param>
    /// <param name="Scale">Scale of the picked series.</param>
    /// <param name="Plane">What was picked, for provenance, or null when the file has a single plane per frame.</param>
    internal readonly record struct Picked(int[] Pages, MovieMetadata.Scale Scale, string? Plane);

    /// <summary>Picks the frames' pages; refuses a file with several series, channels or z planes when no option says
    /// which, and an option outside the file's range.</summary>
    internal Picked Pick(string path, MovieLayout layout, int pageCount)
    {
        string kind = layout.Kind;
        int si = Index(path, "--series", "series", "series", Series, layout.Series.Count, $"{kind} holds");
        var s = layout.Series[si];
        string where = layout.Series.Count > 1 ? $"{kind} series {si}" : kind;
        int ci = Index(path, "--channel", "channel", "channels", Channel, s.SizeC, $"{where} has");
        int zi;
        bool zAsTime = false;
        if (ZIsTime && s.SizeZ > 1)
        {
            if (s.SizeT > 1) throw new InputException(path, $"--z-is-time: {where} already has {s.SizeT} time points; give --z-plane N (0 to {s.SizeZ - 1}) to pick a z plane");
            zAsTime = true; zi = 0;
        }
        else if (Z is null && s.SizeZ > 1)
        {
            string what = kind == "ImageJ hyperstack" && s.SizeT == 1
                ? $"{where} has {s.SizeZ} slices and no frames (ImageJ calls the pages of a plain stack slices: z planes or time points?)"
                : $"{where} has {s.SizeZ} z planes";
            throw new InputException(path, $"{what}; give --z-is-time if they are time points, or {Alternatives("--z-plane", s.SizeZ)} for one z plane");
        }
        else zi = Index(path, "--z-plane", "z plane", "z planes", Z, s.SizeZ, $"{where} has");

        int frames = zAsTime ? s.SizeZ : s.SizeT;
        var pages = new int[frames];
        for (int t = 0; t < frames; t++)
        {
            int page = zAsTime ? s.Page(0, t, ci) : s.Page(t, zi, ci);
            string plane = zAsTime ? $"(T=0, Z={t}, C={ci})" : $"(T={t}, Z={zi}, C={ci})";
            if (page < 0) throw new InputException(path, $"{where}: the metadata maps no page to plane {plane}");
            if (page >= pageCount) throw new InputException(path, $"{where}: the metadata puts plane {plane} on page {page + 1}, but the file has {pageCount} pages");
            pages[t] = page;
        }
        var parts = new List<string>();
        if (layout.Series.Count > 1) parts.Add($"series {si} of {layout.Series.Count}");
        if (s.SizeC > 1) parts.Add($"channel {ci} of {s.SizeC}");
        if (zAsTime) parts.Add($"{s.SizeZ} z planes read as time points (--z-is-time)");
        else if (s.SizeZ > 1) parts.Add($"z {zi} of {s.SizeZ}");
        return new Picked(pages, s.Scale, parts.Count == 0 ? null : $"{kind}: {string.Join(", ", parts)} (0-based)");
    }

    private static string Alternatives(string option, int size)
        => size == 2 ? $"{option} 0 or {option} 1" : $"{option} N with N from 0 to {size - 1}";

    private static int Index(string path, string option, string one, string many, int? given, int size, string subject)
    {
        if (given is { } g)
        {
            if (g < size) return g;
            string valid = size == 1 ? $"only {option} 0" : $"0 to {size - 1}";
            throw new InputException(path, $"{option} {g} is out of range: {subject} {size} {(size == 1 ? one : many)} (valid: {valid})");
        }
        if (size == 1) return 0;
        throw new InputException(path, $"{subject} {size} {many}; give {Alternatives(option, size)}");
    }
}
