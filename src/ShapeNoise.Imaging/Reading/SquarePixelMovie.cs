using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>
/// Makes non-square pixels square: every frame is resampled, nearest neighbour, along the axis with the coarser pixel
/// to the finer pixel size, so the whole pipeline sees square pixels of the finer size. With pixel width sx and height
/// sy &gt; sx, output row j (centre at (j + 0.5) sx) takes source row floor((j + 0.5) sx / sy); the height becomes
/// round(H sy / sx). Columns likewise when sx &gt; sy. Labels are copied, never blended.
/// </summary>
internal sealed class SquarePixelMovie : ILabelMovie
{
    private readonly ILabelMovie _inner;
    private readonly int[] _rowOf, _colOf;
    /// <inheritdoc/>
    public MovieInfo Info { get; }
    /// <inheritdoc/>
    public IReadOnlyList<string> Files => _inner.Files;

    /// <summary>Wraps <paramref name="inner"/>, whose <see cref="MovieInfo.PixelSizeYUm"/> must be set.</summary>
    public SquarePixelMovie(ILabelMovie inner)
    {
        _inner = inner;
        var i = inner.Info;
        double sx = i.PixelSizeUm ?? throw new ArgumentException("pixel width unknown"), sy = i.PixelSizeYUm ?? throw new ArgumentException("pixel height unknown");
        double fine = Math.Min(sx, sy);
        int w = sy > sx ? i.Width : Math.Max(1, (int)Math.Round(i.Width * sx / fine));
        int h = sy > sx ? Math.Max(1, (int)Math.Round(i.Height * sy / fine)) : i.Height;
        _colOf = Map(w, i.Width, fine / sx);
        _rowOf = Map(h, i.Height, fine / sy);
        string what = sy > sx ? $"rows {i.Height} -> {h}" : $"columns {i.Width} -> {w}";
        Info = i with
        {
            Width = w, Height = h, PixelSizeUm = fine, PixelSizeYUm = null,
            Resampling = $"pixels are {sx:G6} x {sy:G6} um (width x height): {what}, nearest neighbour, to square pixels of {fine:G6} um",
        };
    }

    /// <summary>Source index of each output index: floor((j + 0.5) * ratio), clamped.</summary>
    private static int[] Map(int n, int source, double ratio)
    {
        var m = new int[n];
        for (int j = 0; j < n; j++) m[j] = Math.Min(source - 1, (int)Math.Floor((j + 0.5) * ratio));
        return m;
    }

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames() => Frames(static _ => true);

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames(Func<int, bool> wanted)
    {
        int w = Info.Width, h = Info.Height, sw = _inner.Info.Width;
        foreach (var f in _inner.Frames(wanted))
        {
            var dst = new int[w * h];
            var src = f.Labels.AsSpan();
            for (int y = 0; y < h; y++)
            {
                var row = src.Slice(_rowOf[y] * sw, sw);
                var o = dst.AsSpan(y * w, w);
                for (int x = 0; x < w; x++) o[x] = row[_colOf[x]];
            }
            yield return new LabelFrame(f.Index, w, h, dst);
        }
    }

    /// <inheritdoc/>
    public void Dispose() => _inner.Dispose();
}

/// <summary>A movie whose <see cref="MovieInfo"/> is replaced (scale given by options); frames pass through.</summary>
internal sealed class RescaledMovie(ILabelMovie inner, MovieInfo info) : ILabelMovie
{
    /// <inheritdoc/>
    public MovieInfo Info { get; } = info;
    /// <inheritdoc/>
    public IReadOnlyList<string> Files => inner.Files;
    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames() => inner.Frames();
    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames(Func<int, bool> wanted) => inner.Frames(wanted);
    /// <inheritdoc/>
    public void Dispose() => inner.Dispose();
}
