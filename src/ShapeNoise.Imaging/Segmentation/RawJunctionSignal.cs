using ShapeNoise.Imaging.Reading;
using ShapeNoise.Outlines;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Segmentation;

/// <summary>The junction signal of each frame of a raw movie (<see cref="JunctionSegmenter.RidgeSignal"/>), read in
/// order as the analysis asks for frames (docs/segmentation.md#sub-pixel-boundaries).</summary>
/// <param name="rawPath">The raw (intensity) movie the labels were segmented from.</param>
/// <param name="options">The segmentation options (cell diameter, ridge smoothing); the pixel size is the raw movie's, as in
/// <c>segment</c>.</param>
/// <param name="selection">Plane and scale selection used when opening the raw movie.</param>
/// <param name="boundarySigmaPx">Per frame, the boundary smoothing the segmentation used (<see cref="SegmentedFrame.BoundarySigmaPx"/>).</param>
public sealed class RawJunctionSignal(string rawPath, SegmentOptions options, MovieSelection? selection = null, IReadOnlyList<double>? boundarySigmaPx = null) : IJunctionSignal, IDisposable
{
    private ILabelMovie? _movie;
    private IEnumerator<LabelFrame>? _frames;
    private SegmentOptions? _options;

    /// <summary>The signal of frame <paramref name="index"/>; null when the raw movie has no such frame.</summary>
    public float[]? Frame(int index)
    {
        if (_movie is null)
        {
            _movie = LabelMovies.Open(rawPath, selection ?? MovieSelection.None);
            _options = (options with { PixelSizeUm = _movie.Info.PixelSizeUm ?? 1 }).Validated();
            _frames = _movie.Frames().GetEnumerator();
        }
        while (_frames!.MoveNext())
        {
            var f = _frames.Current;
            if (f.Index < index) continue;
            return f.Index == index ? JunctionSegmenter.RidgeSignal(f.Labels, f.Width, f.Height, _options!,
                boundarySigmaPx is not null && index < boundarySigmaPx.Count ? boundarySigmaPx[index] : 0) : null;
        }
        return null;
    }

    /// <summary>Closes the raw movie.</summary>
    public void Dispose()
    {
        _frames?.Dispose();
        _movie?.Dispose();
    }
}
