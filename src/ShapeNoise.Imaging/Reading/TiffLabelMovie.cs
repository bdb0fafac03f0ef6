using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>A multi-page TIFF label stack (one page a frame), read page by page.</summary>
public sealed class TiffLabelMovie : ILabelMovie
{
    private readonly TiffPages _tiff;
    public MovieInfo Info { get; }
    public IReadOnlyList<string> Files { get; }

    public TiffLabelMovie(string path)
    {
        _tiff = new TiffPages(path);
        var p0 = _tiff.Pages[0];
        foreach (var p in _tiff.Pages)
        {
            _tiff.RequireIntegerLabels(p);
            if (p.Width != p0.Width || p.Height != p0.Height)
                throw new InputException(path, $"page {p.Index + 1} is {p.Width}x{p.Height}, page 1 is {p0.Width}x{p0.Height}");
        }
        var scale = MovieMetadata.FromDescription(path, p0.Description, p0.XResolution);
        string kind = p0.SampleFormat == 2 ? "int" : "uint";
        Info = new MovieInfo(path, p0.Width, p0.Height, _tiff.Pages.Count, scale.PixelSizeUm, scale.FrameIntervalMin,
            $"TIFF, {_tiff.Pages.Count} pages, {kind}{p0.BitsPerSample}, metadata: {scale.Source}");
        Files = [path];
    }

    public IEnumerable<LabelFrame> Frames()
    {
        for (int i = 0; i < _tiff.Pages.Count; i++)
            yield return new LabelFrame(i, Info.Width, Info.Height, _tiff.ReadLabels(i));
    }

    public void Dispose() => _tiff.Dispose();
}
