using ShapeNoise.Tracking;

namespace ShapeNoise.Fluctuations;

/// <summary>
/// Fragments left after gap closing (docs/measures.md#one-frame-errors): a track that ends Lost, Merge or Division is a
/// fragment when another track starts within <c>max(G, 1) + 1</c> frames after its last outline (G = --max-gap) with its
/// first centroid within the ended track's radius sqrt(A/pi) of its last centroid. A true division whose daughter starts
/// next to the mother counts too; the count is a quality check (how often the tracker broke a cell in two tracks), not a
/// measure of divisions.
/// </summary>
public static class TrackFragments
{
    /// <summary>Number of fragments among <paramref name="tracks"/> for gap window <paramref name="maxGapFrames"/>.</summary>
    public static int Count(IReadOnlyList<TrackRecord> tracks, int maxGapFrames)
    {
        int window = Math.Max(maxGapFrames, 1) + 1;
        var byStart = new Dictionary<int, List<TrackRecord>>();
        foreach (var t in tracks)
        {
            if (t.Frames == 0) continue;
            if (!byStart.TryGetValue(t.FirstFrame, out var l)) byStart[t.FirstFrame] = l = [];
            l.Add(t);
        }
        int n = 0;
        foreach (var t in tracks)
        {
            if (t.Frames == 0 || t.End is not (TrackEnd.Lost or TrackEnd.Merge or TrackEnd.Division)) continue;
            double x = t.CentroidX[^1], y = t.CentroidY[^1], r = Math.Sqrt(Math.Max(t.AreaPx2[^1], 0) / Math.PI);
            bool found = false;
            for (int f = t.FrameIndex[^1] + 1; f <= t.FrameIndex[^1] + window && !found; f++)
                if (byStart.TryGetValue(f, out var starts))
                    foreach (var s in starts)
                    {
                        double dx = s.CentroidX[0] - x, dy = s.CentroidY[0] - y;
                        if (s.Id != t.Id && dx * dx + dy * dy <= r * r) { found = true; break; }
                    }
            if (found) n++;
        }
        return n;
    }
}
