using ShapeNoise.Statistics;

namespace ShapeNoise.Nematic;

/// <summary>Headward speeds pooled over +1/2 defect tracks (px/frame; NaN when undefined).</summary>
/// <param name="Headward">Mean over tracks of the defect's own headward speed, with its bootstrap interval.</param>
/// <param name="FlowHeadward">The same for the coarse-grained cell velocity at the core.</param>
/// <param name="FractionHeadward">Fraction of the tracks whose headward speed is positive.</param>
/// <param name="TracksUsed">+1/2 tracks with a finite headward speed.</param>
public readonly record struct HeadwardSummary(Estimate Headward, Estimate FlowHeadward, double FractionHeadward, int TracksUsed);

/// <summary>
/// Per defect observation: its velocity by central differences along its track (v = (x(t+1) - x(t-1)) / 2, only with
/// both neighbours present), and for +1/2 defects the headward speeds v . e_head and v_flow . e_head; per track their
/// means; over +1/2 tracks the mean with a seeded bootstrap interval over tracks (docs/measures.md#nematic-field-and-defects).
/// </summary>
public static class HeadwardStatistics
{
    /// <summary>Observations (sorted by frame, then track id) and tracks of the linked defects.</summary>
    public static (List<DefectObservation> Observations, List<DefectTrack> Tracks) Observe(IReadOnlyList<FrameDefects> frames, DefectLinks links)
    {
        var frameIndex = new Dictionary<int, int>();
        for (int f = 0; f < frames.Count; f++) frameIndex[frames[f].Frame] = f;
        Defect Get((int Frame, int Index) m) => frames[frameIndex[m.Frame]].Defects[m.Index];
        var observations = new List<DefectObservation>();
        var dtracks = new List<DefectTrack>();
        for (int id = 0; id < links.Tracks.Count; id++)
        {
            var m = links.Tracks[id];
            double sumH = 0, sumF = 0; int nH = 0, nF = 0;
            for (int i = 0; i < m.Count; i++)
            {
                var d = Get(m[i]);
                double vx = double.NaN, vy = double.NaN;
                if (i > 0 && i < m.Count - 1 && m[i + 1].Frame - m[i - 1].Frame == 2)
                {
                    var a = Get(m[i - 1]); var b = Get(m[i + 1]);
                    vx = (b.X - a.X) / 2; vy = (b.Y - a.Y) / 2;
                }
                var (fx, fy) = frames[frameIndex[m[i].Frame]].CoreFlow[m[i].Index];
                double head = d.Charge == 0.5 ? vx * d.HeadX + vy * d.HeadY : double.NaN;
                double flowHead = d.Charge == 0.5 ? fx * d.HeadX + fy * d.HeadY : double.NaN;
                if (double.IsFinite(head)) { sumH += head; nH++; }
                if (double.IsFinite(flowHead)) { sumF += flowHead; nF++; }
                observations.Add(new DefectObservation(m[i].Frame, id + 1, d, vx, vy, head, fx, fy, flowHead));
            }
            dtracks.Add(new DefectTrack(id + 1, Get(m[0]).Charge, m[0].Frame, m[^1].Frame, m.Count,
                nH > 0 ? sumH / nH : double.NaN, nF > 0 ? sumF / nF : double.NaN));
        }
        observations.Sort((a, b) => a.Frame != b.Frame ? a.Frame.CompareTo(b.Frame) : a.TrackId.CompareTo(b.TrackId));
        return (observations, dtracks);
    }

    /// <summary>Pools the +1/2 tracks' headward speeds: mean over tracks with a percentile bootstrap over tracks
    /// (<see cref="Bootstrap.Percentile(int, Func{int[], double}, int, int, string)"/>, <see cref="Descriptive.WeightedMean"/>).</summary>
    public static HeadwardSummary Summarise(IReadOnlyList<DefectTrack> tracks, int resamples, int seed)
    {
        var speeds = new List<double>(); var flows = new List<double>();
        foreach (var t in tracks)
        {
            if (t.Charge != 0.5) continue;
            if (double.IsFinite(t.HeadwardSpeed)) speeds.Add(t.HeadwardSpeed);
            if (double.IsFinite(t.FlowHeadwardSpeed)) flows.Add(t.FlowHeadwardSpeed);
        }
        double[] s = speeds.ToArray(), fl = flows.ToArray();
        var headward = Bootstrap.Percentile(s.Length, k => Descriptive.WeightedMean(s, k), resamples, seed, "defect tracks");
        var flowHeadward = Bootstrap.Percentile(fl.Length, k => Descriptive.WeightedMean(fl, k), resamples, seed, "defect tracks");
        int positive = 0;
        foreach (var v in s) if (v > 0) positive++;
        double fraction = s.Length > 0 ? positive / (double)s.Length : double.NaN;
        return new HeadwardSummary(headward, flowHeadward, fraction, s.Length);
    }
}
