using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Reading;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

/// <summary>Folders of PNG frames written by PIL 9.4 (Reading/Corpus/png, made by make_png.py; expected pixels computed there
/// from the numpy arrays written).</summary>
public class FolderLabelMovieTests
{
    private static string PngDir => Path.Combine(Path.GetDirectoryName(TiffContainerTests.CorpusDir)!, "png");
    private static JsonObject Expected => JsonNode.Parse(File.ReadAllText(Path.Combine(PngDir, "expected.json")))!.AsObject();

    private static string Folder(TempDir d, params string[] names)
    {
        string f = d["frames"];
        Directory.CreateDirectory(f);
        foreach (var n in names) File.Copy(Path.Combine(PngDir, n), Path.Combine(f, n));
        return f;
    }

    private static void CheckFrame(LabelFrame frame, string name)
    {
        var e = Expected[name]!;
        Assert.Equal(e["sum"]!.GetValue<long>(), frame.Labels.Sum(v => (long)v));
        foreach (var px in e["pixels"]!.AsArray())
        {
            var a = px!.AsArray().Select(x => x!.GetValue<int>()).ToArray();
            Assert.Equal(a[2], frame.Labels[a[0] * frame.Width + a[1]]);
        }
    }

    [Fact]
    public void Open_IdentityPalettePngs_PaletteIndexIsTheLabel()
    {
        // PIL's mode 'P' PNG carries a 256-entry palette with entry i = (i,i,i) (asserted by make_png.py from the PLTE chunk).
        using var d = new TempDir();
        using var movie = LabelMovies.Open(Folder(d, "palette_identity_0.png", "palette_identity_1.png"));
        var frames = movie.Frames().ToList();
        Assert.Equal(2, frames.Count);
        CheckFrame(frames[0], "palette_identity_0.png");
        CheckFrame(frames[1], "palette_identity_1.png");
    }

    [Fact]
    public void Open_Grey16Pngs_ReadAsWritten()
    {
        using var d = new TempDir();
        using var movie = LabelMovies.Open(Folder(d, "grey16_0.png", "grey16_1.png"));
        var frames = movie.Frames().ToList();
        CheckFrame(frames[0], "grey16_0.png");
        CheckFrame(frames[1], "grey16_1.png");
    }

    [Fact]
    public void Open_QuantizedPalettePng_RefusedAsColourImage()
    {
        // PIL's quantize() reorders the palette: entry 0 is not (0,0,0), so index and grey value disagree.
        using var d = new TempDir();
        var e = Assert.Throws<InputException>(() =>
        {
            using var m = LabelMovies.Open(Folder(d, "palette_quantized.png", "palette_identity_1.png"));
            m.Frames().ToList();
        });
        Assert.Contains("palette_quantized.png", e.Message);
        Assert.Contains("colour", e.Message);
    }

    [Fact]
    public void Open_FolderWithMacOsHiddenFiles_HiddenFilesIgnored()
    {
        // A macOS copy leaves "._name" AppleDouble files (magic 0x00051607, Apple's AppleSingle/AppleDouble formats, from
        // memory) and ".DS_Store" beside the frames; neither is a frame.
        using var d = new TempDir();
        string f = Folder(d, "grey16_0.png", "grey16_1.png");
        byte[] appleDouble = [0x00, 0x05, 0x16, 0x07, 0x00, 0x02, 0x00, 0x00];
        File.WriteAllBytes(Path.Combine(f, "._grey16_0.png"), appleDouble);
        File.WriteAllBytes(Path.Combine(f, "._grey16_1.png"), appleDouble);
        File.WriteAllBytes(Path.Combine(f, ".DS_Store"), [0, 0, 0, 1, 0x42, 0x75, 0x64, 0x31]);
        File.WriteAllBytes(Path.Combine(f, ".hidden.tif"), [1, 2, 3]);
        using var movie = LabelMovies.Open(f);
        Assert.Equal(2, movie.Info.FrameCount);
        Assert.Equal(2, movie.Frames().Count());
    }
}
