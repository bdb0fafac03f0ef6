using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Opens a label movie from a path: a multi-page TIFF, or a folder of single-frame TIFF/PNG files.</summary>
public static class LabelMovies
{
    public static ILabelMovie Open(string path)
    {
        if (Directory.Exists(path)) return new FolderLabelMovie(path);
        if (!File.Exists(path)) throw new InputException(path, "no such file or folder");
        var ext = Path.GetExtension(path).ToLowerInvariant();
        if (ext is ".tif" or ".tiff") return new TiffLabelMovie(path);
        if (ext == ".png") throw new InputException(path, "a single PNG is one frame; fluctuations need a movie (give a folder of frames or a multi-page TIFF)");
        throw new InputException(path, $"unsupported input type '{ext}' (expected a multi-page .tif or a folder of .tif/.png frames)");
    }
}
