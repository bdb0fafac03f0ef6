using ShapeNoise.Shape;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>Defect tracks as lists of (frame, index into that frame's defects), with the births and deaths counted.</summary>
/// <param name="Tracks">Members of each track in frame order; track k gets id k + 1.</param>
/// <param name="Births">Defects after the first frame that continue no defect of the frame before.</param>
/// <param name="Deaths">Defects not continued in the next frame, counted only where the next frame is consecutive (a gap in
/// the frame numbers ends the tracks without counting deaths; the last frame's defects are not deaths).</param>
public sealed record DefectLinks(IReadOnlyList<List<(int Frame, int Index)>> Tracks, int Births, int Deaths);

/// <summary>
/// Links defects of the same charge between consecutive frames: optimal one-to-one assignment by distance
/// (<see cref="Assignment.ByDistance"/>), no link longer than the gate (one coarse width;
/// docs/measures.md#nematic-field-and-defects).
/// </summary>
public static class DefectLinker
{
    /// <summary>Links <paramref name="frames"/> (in frame order, frames without defects included) within <paramref name="gatePx"/>.</summary>
    public static DefectLinks Link(IReadOnlyList<FrameDefects> frames, double gatePx)
    {
        var tracks = new List<List<(int Frame, int Index)>>();
        int births = 0, deaths = 0;
        int[] prevTrack = [];
        for (int f = 0; f < frames.Count; f++)
        {
            var cur = frames[f].Defects;
            bool consecutive = f > 0 && frames[f - 1].Frame == frames[f].Frame - 1;
            var prev = consecutive ? frames[f - 1].Defects : [];
            var curTrack = new int[cur.Count];
            Array.Fill(curTrack, -1);
            var continued = new bool[prev.Count];
            foreach (double charge in Charges(cur, prev))
            {
                var pi = Indices(prev, charge); var ci = Indices(cur, charge);
                var match = Assignment.ByDistance(Positions(prev, pi), Positions(cur, ci), gatePx);
                for (int a = 0; a < pi.Length; a++)
                {
                    if (match[a] < 0) continue;
                    int id = prevTrack[pi[a]];
                    curTrack[ci[match[a]]] = id;
                    tracks[id].Add((frames[f].Frame, ci[match[a]]));
                    continued[pi[a]] = true;
                }
            }
            for (int i = 0; i < cur.Count; i++)
            {
                if (curTrack[i] >= 0) continue;
                curTrack[i] = tracks.Count;
                tracks.Add([(frames[f].Frame, i)]);
                if (f > 0) births++;
            }
            for (int i = 0; i < prev.Count; i++) if (!continued[i]) deaths++;
            prevTrack = curTrack;
        }
        return new DefectLinks(tracks, births, deaths);
    }

    /// <summary>Distinct charges in order of first appearance, current frame first.</summary>
    private static List<double> Charges(List<Defect> cur, List<Defect> prev)
    {
        var charges = new List<double>();
        foreach (var list in new[] { cur, prev })
            foreach (var d in list) if (!charges.Contains(d.Charge)) charges.Add(d.Charge);
        return charges;
    }

    private static int[] Indices(List<Defect> defects, double charge)
    {
        var idx = new List<int>();
        for (int i = 0; i < defects.Count; i++) if (defects[i].Charge == charge) idx.Add(i);
        return idx.ToArray();
    }

    private static Point2[] Positions(List<Defect> defects, int[] idx)
    {
        var p = new Point2[idx.Length];
        for (int i = 0; i < idx.Length; i++) p[i] = new Point2(defects[idx[i]].X, defects[idx[i]].Y);
        return p;
    }
}
