using ShapeNoise.Reading;
using ShapeNoise.Synthesis;

namespace ShapeNoise.Tests.Support;

/// <summary>A label movie held in memory, for tests that need no image files.</summary>
public sealed class MemoryMovie(int width, int height, IReadOnlyList<int[]> frames, double? pixelSizeUm = null, double? frameIntervalMin = null) : ILabelMovie
{
    public MovieInfo Info { get; } = new("memory", width, height, frames.Count, pixelSizeUm, frameIntervalMin, "in-memory");
    public IReadOnlyList<string> Files { get; } = [];
    public IEnumerable<LabelFrame> Frames() { for (int i = 0; i < frames.Count; i++) yield return new LabelFrame(i, width, height, frames[i]); }
    public void Dispose() { }

    public static MemoryMovie Of(EllipseMovie e, bool withUnits = false)
    {
        var f = new int[e.Options.Frames][];
        for (int t = 0; t < f.Length; t++) f[t] = e.RenderFrame(t);
        return new MemoryMovie(e.Width, e.Height, f, withUnits ? e.Options.PixelSizeUm : null, withUnits ? e.Options.FrameIntervalMin : null);
    }
}
