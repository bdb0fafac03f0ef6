namespace ShapeNoise.Outlines;

/// <summary>Options of the outline stage (docs/measures.md#outline-definitions); validated on construction, so an
/// instance always holds values in range. Messages name the property (<c>nameof</c>); the CLI maps them to its flags.</summary>
public sealed record OutlineOptions
{
    /// <summary>Checks and holds the outline options.</summary>
    /// <exception cref="ArgumentException">A value is out of range; the message starts with the property's name.</exception>
    public OutlineOptions(OutlineMethod method = OutlineMethod.Midpoint, int borderMarginPx = 1, int minAreaPx = 30)
    {
        if (minAreaPx < 3) throw new ArgumentException($"{nameof(MinAreaPx)} must be at least 3 px (got {minAreaPx})");
        if (borderMarginPx < 0) throw new ArgumentException($"{nameof(BorderMarginPx)} must be >= 0 (got {borderMarginPx})");
        Method = method; BorderMarginPx = borderMarginPx; MinAreaPx = minAreaPx;
    }

    /// <summary>Outline placement.</summary>
    public OutlineMethod Method { get; }
    /// <summary>Objects within this many px of the image edge are excluded (spec: 1 px).</summary>
    public int BorderMarginPx { get; }
    /// <summary>Objects with fewer pixels are excluded (spec: 30 px).</summary>
    public int MinAreaPx { get; }
}
