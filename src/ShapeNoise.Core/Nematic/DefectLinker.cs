using ShapeNoise.Shape;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>Defect tracks as lists of (frame, index into that frame's defects), with the births and deaths counted.</summary>
/// <param name="Tracks">Members of each track in frame order; track k gets id k + 1. A bridged track skips the frames in
/// which its defect was lost.</param>
/// <param name="Births">Defects after the first frame that continue no track (neither of the frame before nor across a
/// break of up to <see cref="DefectLinker.MaxBreakFrames"/> frames).</param>
/// <param name="Deaths">Tracks that end before the last frame, counted only where the frame after their last one is
/// consecutive (a gap in the frame numbers ends the tracks without counting deaths; the last frame's defects are not deaths).</param>
public sealed record DefectLinks(IReadOnlyList<List<(int Frame, int Index)>> Tracks, int Births, int Deaths);

/// <summary>
/// Links defects of the same charge frame to frame: optimal one-to-one assignment by distance
/// (<see cref="Assignment.ByDistance"/>), no link longer than the gate (one coarse width;
/// docs/measures.md#nematic-field-and-defects). A defect lost for up to <see cref="MaxBreakFrames"/> frames continues
/// its track when one of the same charge is found again within g x k of where it was last seen, k = frames since then
/// (docs/defects.md#drift): first links to the frame before, then across breaks of 1, then 2 missing frames, each an
/// optimal assignment of the defects still unlinked. Distances are measured relative to the tissue when its
/// displacement is given (x - D(t), <see cref="TissueDrift.Displacement"/>).
/// </summary>
public static class DefectLinker
{
    /// <summary>Longest break (frames in which a defect is not found) that its track bridges.</summary>
    public const int MaxBreakFrames = 2;

    /// <summary>Links <paramref name="frames"/> (in frame order, frames without defects included) within <paramref name="gatePx"/>.</summary>
    /// <param name="frames">Every frame's defects.</param>
    /// <param name="gatePx">Gate g of a link to the frame before; a link across k - 1 missing frames has gate k g.</param>
    /// <param name="tissueShiftPx">The tissue's displacement D per entry of <paramref name="frames"/>, subtracted from every
    /// position before distances are taken; null = positions as found.</param>
    /// <param name="maxBreakFrames">Longest bridged break (0 = frame-to-frame links only).</param>
    public static DefectLinks Link(IReadOnlyList<FrameDefects> frames, double gatePx, IReadOnlyList<(double X, double Y)>? tissueShiftPx = null,
        int maxBreakFrames = MaxBreakFrames)
    {
        if (tissueShiftPx is not null && tissueShiftPx.Count != frames.Count)
            throw new ArgumentException($"{nameof(tissueShiftPx)} has {tissueShiftPx.Count} entries for {frames.Count} frames");
        var tracks = new List<List<(int Frame, int Index)>>();
        var lastEntry = new List<int>();          // per track: the entry of frames holding its last member
        var trackOf = new int[frames.Count][];
        int births = 0;
        for (int f = 0; f < frames.Count; f++)
        {
            var cur = frames[f].Defects;
            var curTrack = new int[cur.Count];
            Array.Fill(curTrack, -1);
            for (int k = 1; k <= maxBreakFrames + 1 && f - k >= 0; k++)
            {
                int e = f - k;
                // Only across frames that were all analysed: a gap in the frame numbers ends the tracks.
                if (frames[f].Frame - frames[e].Frame != k) break;
                var prev = frames[e].Defects;
                foreach (double charge in Charges(cur, prev))
                {
                    // Candidates: defects of entry e that end their track there (not continued since), and unlinked current ones.
                    var pi = Indices(prev, charge, i => lastEntry[trackOf[e][i]] == e);
                    var ci = Indices(cur, charge, i => curTrack[i] < 0);
                    if (pi.Length == 0 || ci.Length == 0) continue;
                    var match = Assignment.ByDistance(Positions(prev, pi, Shift(tissueShiftPx, e)), Positions(cur, ci, Shift(tissueShiftPx, f)), k * gatePx);
                    for (int a = 0; a < pi.Length; a++)
                    {
                        if (match[a] < 0) continue;
                        int id = trackOf[e][pi[a]];
                        curTrack[ci[match[a]]] = id;
                        tracks[id].Add((frames[f].Frame, ci[match[a]]));
                        lastEntry[id] = f;
                    }
                }
            }
            for (int i = 0; i < cur.Count; i++)
            {
                if (curTrack[i] >= 0) continue;
                curTrack[i] = tracks.Count;
                tracks.Add([(frames[f].Frame, i)]);
                lastEntry.Add(f);
                if (f > 0) births++;
            }
            trackOf[f] = curTrack;
        }
        int deaths = 0;
        foreach (int e in lastEntry)
            if (e + 1 < frames.Count && frames[e + 1].Frame == frames[e].Frame + 1) deaths++;
        return new DefectLinks(tracks, births, deaths);
    }

    private static (double X, double Y) Shift(IReadOnlyList<(double X, double Y)>? shift, int entry) => shift is null ? (0, 0) : shift[entry];

    /// <summary>Distinct charges in order of first appearance, current frame first.</summary>
    private static List<double> Charges(List<Defect> cur, List<Defect> prev)
    {
        var charges = new List<double>();
        foreach (var list in new[] { cur, prev })
            foreach (var d in list) if (!charges.Contains(d.Charge)) charges.Add(d.Charge);
        return charges;
    }

    private static int[] Indices(List<Defect> defects, double charge, Func<int, bool> keep)
    {
        var idx = new List<int>();
        for (int i = 0; i < defects.Count; i++) if (defects[i].Charge == charge && keep(i)) idx.Add(i);
        return idx.ToArray();
    }

    private static Point2[] Positions(List<Defect> defects, int[] idx, (double X, double Y) shift)
    {
        var p = new Point2[idx.Length];
        for (int i = 0; i < idx.Length; i++) p[i] = new Point2(defects[idx[i]].X - shift.X, defects[idx[i]].Y - shift.Y);
        return p;
    }
}
