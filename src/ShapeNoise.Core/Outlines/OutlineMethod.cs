namespace ShapeNoise.Outlines;

/// <summary>How a cell's boundary polygon is placed relative to the pixel grid.</summary>
public enum OutlineMethod
{
    /// <summary>Sub-pixel: the 0.5 level of the cell mask after Gaussian smoothing (sigma 1 px), found on each boundary
    /// crack between an inside and an outside pixel centre by linear interpolation. Lowest raw noise floor, but the
    /// smoothing colours the noise, so the high-mode floor estimate under-corrects it (see docs/measures.md).</summary>
    Subpixel,
    /// <summary>The midpoint of each boundary crack (marching squares on the binary mask at level 0.5). Default: its
    /// pixelation noise is close to white, so the high-mode floor corrects it best.</summary>
    Midpoint,
    /// <summary>The pixel-edge (crack) polygon itself: area equals the pixel count.</summary>
    PixelEdge,
}

/// <summary>Why an object did not yield an outline.</summary>
public enum OutlineStatus
{
    /// <summary>The object yielded an outline.</summary>
    Ok,
    /// <summary>The object comes within the border margin of the image edge, so its outline may be cut off (docs/measures.md#outline-definitions).</summary>
    Border,
    /// <summary>The object has fewer pixels than <c>--min-area</c> (docs/measures.md#outline-definitions).</summary>
    Small,
}
