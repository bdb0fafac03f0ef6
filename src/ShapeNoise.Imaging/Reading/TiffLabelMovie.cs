using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>A multi-page TIFF label stack, read page by page: one page a frame, or, for an OME-TIFF, ImageJ hyperstack
/// or tifffile series, the pages of the plane <see cref="MovieSelection"/> picks (<see cref="MovieLayout"/>).</summary>
internal sealed class TiffLabelMovie : ILabelMovie
{
    private readonly TiffPages _tiff;
    private readonly int[] _pages;
    /// <inheritdoc/>
    public MovieInfo Info { get; }
    /// <inheritdoc/>
    public IReadOnlyList<string> Files { get; }

    /// <summary>Opens a file whose every page is a frame of one plane (no option needed).</summary>
    public TiffLabelMovie(string path) : this(path, MovieSelection.None) { }

    /// <summary>Opens the plane <paramref name="selection"/> picks; scale overrides in it are not applied here
    /// (<see cref="LabelMovies.Open(string, MovieSelection)"/> does).</summary>
    public TiffLabelMovie(string path, MovieSelection selection)
    {
        _tiff = new TiffPages(path);
        try
        {
            var layout = MovieLayout.Of(path, _tiff.Pages);
            var pick = selection.Pick(path, layout, _tiff.Pages.Count);
            _pages = pick.Pages;
            var p0 = _tiff.Pages[_pages[0]];
            foreach (int i in _pages)
            {
                var p = _tiff.Pages[i];
                _tiff.RequireIntegerLabels(p);
                if (p.Width != p0.Width || p.Height != p0.Height)
                    throw new InputException(path, $"page {p.Index + 1} is {p.Width}x{p.Height}, page {p0.Index + 1} is {p0.Width}x{p0.Height}");
            }
            var scale = pick.Scale;
            double? sy = scale.PixelSizeUm is { } sx && scale.PixelSizeYUm is { } y && Math.Abs(y - sx) > 1e-6 * sx ? y : null;
            string kind = p0.SampleFormat == 2 ? "int" : "uint";
            string layoutText = layout.Kind == "TIFF" ? "" : $", {layout.Kind}";
            Info = new MovieInfo(path, p0.Width, p0.Height, _pages.Length, scale.PixelSizeUm, scale.FrameIntervalMin,
                $"TIFF, {_tiff.Pages.Count} pages{layoutText}, {kind}{p0.BitsPerSample}, metadata: {scale.Source}",
                scale.PixelSizeSource, scale.FrameIntervalSource, sy, pick.Plane);
        }
        catch { _tiff.Dispose(); throw; }
        Files = [path];
    }

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames() => Frames(static _ => true);

    /// <inheritdoc/>
    public IEnumerable<LabelFrame> Frames(Func<int, bool> wanted)
    {
        for (int i = 0; i < _pages.Length; i++)
            if (wanted(i)) yield return new LabelFrame(i, Info.Width, Info.Height, _tiff.ReadLabels(_pages[i], _spare.TryTake(out var r) ? r : null));
    }

    /// <summary>Frame arrays handed back by <see cref="Recycle"/>, decoded into again (at most <see cref="MaxSpare"/>).</summary>
    private readonly System.Collections.Concurrent.ConcurrentBag<int[]> _spare = [];
    private const int MaxSpare = 3;

    /// <inheritdoc/>
    public void Recycle(int[] labels)
    {
        if (labels.LongLength == (long)Info.Width * Info.Height && _spare.Count < MaxSpare) _spare.Add(labels);
    }

    /// <inheritdoc/>
    public void Dispose() => _tiff.Dispose();
}
