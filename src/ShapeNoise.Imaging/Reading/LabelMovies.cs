using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Opens a label movie from a path: a multi-page TIFF, or a folder of single-frame TIFF/PNG files.</summary>
public static class LabelMovies
{
    /// <summary>Opens a movie with no plane or scale option (<see cref="MovieSelection.None"/>).</summary>
    public static ILabelMovie Open(string path) => Open(path, MovieSelection.None);

    /// <summary>Opens the plane <paramref name="selection"/> picks, applies its scale overrides (source "option"; a
    /// given pixel size makes pixels square), and resamples non-square pixels to square ones (<see cref="SquarePixelMovie"/>).</summary>
    public static ILabelMovie Open(string path, MovieSelection selection)
    {
        selection.Validated();
        ILabelMovie movie;
        if (Directory.Exists(path))
        {
            foreach (var (option, v) in new[] { ("--series", selection.Series), ("--channel", selection.Channel), ("--z-plane", selection.Z) })
                if (v is > 0) throw new InputException(path, $"{option} {v} is out of range: a folder of frames has one plane per frame (valid: only {option} 0)");
            movie = new FolderLabelMovie(path);
        }
        else
        {
            if (!File.Exists(path)) throw new InputException(path, "no such file or folder");
            var ext = Path.GetExtension(path).ToLowerInvariant();
            if (ext == ".png") throw new InputException(path, "a single PNG is one frame; fluctuations need a movie (give a folder of frames or a multi-page TIFF)");
            if (ext is not (".tif" or ".tiff")) throw new InputException(path, $"unsupported input type '{ext}' (expected a multi-page .tif or a folder of .tif/.png frames)");
            movie = new TiffLabelMovie(path, selection);
        }
        var info = movie.Info;
        if (selection.PixelSizeUm is { } s)
            info = info with
            {
                PixelSizeUm = s, PixelSizeSource = "option", PixelSizeYUm = null,
                Resampling = info.PixelSizeYUm is { } y
                    ? $"not resampled: --pixel-size {s:G6} sets square pixels (the metadata said {info.PixelSizeUm:G6} x {y:G6} um, width x height)" : null,
            };
        if (selection.FrameIntervalMin is { } t) info = info with { FrameIntervalMin = t, FrameIntervalSource = "option" };
        if (!ReferenceEquals(info, movie.Info)) movie = new RescaledMovie(movie, info);
        return info.PixelSizeYUm is null ? movie : new SquarePixelMovie(movie);
    }
}
