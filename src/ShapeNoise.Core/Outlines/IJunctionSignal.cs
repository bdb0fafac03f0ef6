namespace ShapeNoise.Outlines;

/// <summary>The junction-marker signal of each frame of a raw movie, whose crest the outlines follow
/// (<see cref="RidgeRefinement"/>, docs/segmentation.md#sub-pixel-boundaries). Frames are asked for in increasing order.</summary>
public interface IJunctionSignal
{
    /// <summary>The row-major signal of frame <paramref name="index"/> (the label frame's width × height), or null when
    /// the frame has none (its outlines then stay as traced).</summary>
    float[]? Frame(int index);
}
