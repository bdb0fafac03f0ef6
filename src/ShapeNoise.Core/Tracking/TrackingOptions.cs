namespace ShapeNoise.Tracking;

/// <summary>Options of the tracking stage (docs/measures.md#track-definitions); validated on construction, so an
/// instance always holds values in range. Messages name the property (<c>nameof</c>); the CLI maps them to its flags.</summary>
public sealed record TrackingOptions
{
    /// <summary>Checks and holds the tracking options.</summary>
    /// <exception cref="ArgumentException">A value is out of range; the message starts with the property's name.</exception>
    public TrackingOptions(double linkOverlapFraction = 0.25, int maxGapFrames = 2, int minTrackFrames = 10)
    {
        if (minTrackFrames < 3) throw new ArgumentException($"{nameof(MinTrackFrames)} must be at least 3 frames (got {minTrackFrames})");
        if (maxGapFrames < 0) throw new ArgumentException($"{nameof(MaxGapFrames)} must be >= 0 frames (got {maxGapFrames})");
        if (!(linkOverlapFraction > 0 && linkOverlapFraction <= 1))
            throw new ArgumentException($"{nameof(LinkOverlapFraction)} must be in (0, 1] (got {linkOverlapFraction})");
        LinkOverlapFraction = linkOverlapFraction; MaxGapFrames = maxGapFrames; MinTrackFrames = minTrackFrames;
    }

    /// <summary>Overlap fraction f that makes two masks of consecutive frames candidates for the same cell.</summary>
    public double LinkOverlapFraction { get; }
    /// <summary>A track lost, merged or split for at most this many frames resumes when its cell reappears near its last
    /// position (default 2; docs/measures.md#one-frame-errors).</summary>
    public int MaxGapFrames { get; }
    /// <summary>Only tracks with at least this many frames enter the statistics (spec: 10).</summary>
    public int MinTrackFrames { get; }
}
