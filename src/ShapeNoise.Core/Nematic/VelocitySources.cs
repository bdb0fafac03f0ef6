using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>
/// Where the cell velocities of the defect stage come from (px/frame), chosen before the run. The defect stage binds the
/// source once to the run's analysed cells and tracks and then asks for the velocity of each cell in its frame.
/// </summary>
public interface IVelocitySource
{
    /// <summary>Binds the source to one run: <paramref name="cells"/> in frame order, with their <paramref name="tracks"/>.
    /// The returned lookup gives a cell's velocity (px/frame; NaN when unknown) and may be called from several threads.</summary>
    Func<CellRecord, (double Vx, double Vy)> Bind(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks);
}

/// <summary>A source already bound to one run (<see cref="IVelocitySource.Bind"/> called once), so that several stages share
/// one binding (an optical-flow source reads the raw movie when bound).</summary>
public sealed class BoundVelocities(Func<CellRecord, (double Vx, double Vy)> velocityOf) : IVelocitySource
{
    /// <summary>The bound lookup.</summary>
    public Func<CellRecord, (double Vx, double Vy)> VelocityOf { get; } = velocityOf;

    /// <inheritdoc/>
    public Func<CellRecord, (double Vx, double Vy)> Bind(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks) => VelocityOf;
}

/// <summary>
/// Velocities from tracked centroids: central differences along the cell's track, (c(t+1) - c(t-1)) / 2, one-sided at
/// the ends or next to a gap, NaN for a cell with no neighbour frame in its track (docs/measures.md#nematic-field-and-defects).
/// </summary>
public sealed class CentroidVelocities : IVelocitySource
{
    /// <summary>The one instance (the source has no state).</summary>
    public static CentroidVelocities Instance { get; } = new();

    /// <inheritdoc/>
    public Func<CellRecord, (double Vx, double Vy)> Bind(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks)
    {
        // Looked up per cell through its track (no per-cell table: memory stays proportional to the tracks, not the outlines).
        var trackById = new Dictionary<int, TrackRecord>(tracks.Count);
        foreach (var t in tracks) trackById[t.Id] = t;
        return c => trackById.TryGetValue(c.TrackId, out var t) ? Of(t, c.Frame) : (double.NaN, double.NaN);
    }

    /// <summary>Velocity of <paramref name="t"/> at <paramref name="frame"/> by central differences (one-sided at the ends).</summary>
    public static (double Vx, double Vy) Of(TrackRecord t, int frame)
    {
        if (t.Frames < 2) return (double.NaN, double.NaN);
        int i = Array.BinarySearch(t.FrameIndex, frame);
        if (i < 0) return (double.NaN, double.NaN);
        int n = t.Frames;
        int a = i > 0 && t.FrameIndex[i - 1] == frame - 1 ? i - 1 : i;
        int b = i < n - 1 && t.FrameIndex[i + 1] == frame + 1 ? i + 1 : i;
        if (a == b) return (double.NaN, double.NaN);
        double df = t.FrameIndex[b] - t.FrameIndex[a];
        return ((t.CentroidX[b] - t.CentroidX[a]) / df, (t.CentroidY[b] - t.CentroidY[a]) / df);
    }
}
