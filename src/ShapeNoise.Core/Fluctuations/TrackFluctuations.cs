using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Fluctuations;

/// <summary>Turns a finished track into its <see cref="TrackRecord"/>: var L and var W over the track (population
/// variance, docs/measures.md#length-and-width-fluctuations) and, for tracks of at least --min-track frames, the contour
/// fluctuations of its body-frame radii (docs/measures.md#contour-variances).</summary>
public static class TrackFluctuations
{
    /// <summary>The track's record. Used = frames &gt;= <paramref name="minTrackFrames"/>; the contour is computed only then
    /// (the Fourier modes are recomputed from the radii rather than kept per outline), with its sector lag sums for lags
    /// 0..<paramref name="maxLagFrames"/> (docs/measures.md#temporal-noise-model). The radii are not kept.</summary>
    public static TrackRecord Of(FinishedTrack track, int minTrackFrames, int maxLagFrames = ContourFluctuations.DefaultMaxLagFrames)
    {
        int n = track.Frames;
        bool used = n >= minTrackFrames;
        double varL = double.NaN, varW = double.NaN;
        if (n >= 2)
        {
            varL = Descriptive.PopulationVariance(track.LengthPx);
            varW = Descriptive.PopulationVariance(track.WidthPx);
        }
        var contour = used ? ContourFluctuations.Of(track.BodyFrameRadiiPx, n, track.Rays, track.FrameIndex, maxLagFrames) : null;
        return new TrackRecord(track.Id, track.FrameIndex[0], track.FrameIndex[^1], track.End, track.FrameIndex, track.LengthPx, track.WidthPx,
            track.Elongation, track.ThetaRad, track.AreaPx2, track.CentroidX, track.CentroidY, contour, varL, varW, used);
    }
}
