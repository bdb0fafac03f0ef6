using ShapeNoise.Statistics;

namespace ShapeNoise.Nematic;

/// <summary>Headward speeds pooled over +1/2 defect tracks (px/frame; NaN when undefined).</summary>
/// <param name="Headward">Mean over tracks of the defect's own headward speed, with its bootstrap interval.</param>
/// <param name="FlowHeadward">The same for the coarse-grained cell velocity at the core.</param>
/// <param name="FractionHeadward">Fraction of the tracks whose headward speed is positive.</param>
/// <param name="TracksUsed">+1/2 tracks with a finite headward speed.</param>
public readonly record struct HeadwardSummary(Estimate Headward, Estimate FlowHeadward, double FractionHeadward, int TracksUsed);

/// <summary>
/// Per defect observation: its velocity relative to the tissue, the Theil-Sen slope (<see cref="RobustSlope.TheilSen"/>)
/// of r(s) = x_core(s) - D(s) against s over the track's members with |s - t| &lt;= <see cref="SlopeHalfWindowFrames"/>
/// (D the tissue's displacement, <see cref="TissueDrift.Displacement"/>; D = 0 with --keep-drift), only with at least
/// <see cref="MinSlopePoints"/> members in the window; for +1/2 defects the headward speeds v . e_head and
/// v_flow . e_head; per track their means; over +1/2 tracks the mean with a seeded bootstrap interval over tracks
/// (docs/defects.md#drift, docs/measures.md#nematic-field-and-defects).
/// </summary>
public static class HeadwardStatistics
{
    /// <summary>Half width of the window of the defect velocity's line fit (frames on each side).</summary>
    public const int SlopeHalfWindowFrames = 3;
    /// <summary>Fewest track members in the window for a velocity (3: a defect followed for 3 frames has one).</summary>
    public const int MinSlopePoints = 3;

    /// <summary>Observations (sorted by frame, then track id) and tracks of the linked defects.</summary>
    /// <param name="frames">Every frame's defects.</param>
    /// <param name="links">Their tracks.</param>
    /// <param name="tissueShiftPx">The tissue's displacement D per entry of <paramref name="frames"/> (px); null = 0 (lab frame).</param>
    public static (List<DefectObservation> Observations, List<DefectTrack> Tracks) Observe(IReadOnlyList<FrameDefects> frames, DefectLinks links,
        IReadOnlyList<(double X, double Y)>? tissueShiftPx = null)
    {
        if (tissueShiftPx is not null && tissueShiftPx.Count != frames.Count)
            throw new ArgumentException($"{nameof(tissueShiftPx)} has {tissueShiftPx.Count} entries for {frames.Count} frames");
        var frameIndex = new Dictionary<int, int>();
        for (int f = 0; f < frames.Count; f++) frameIndex[frames[f].Frame] = f;
        Defect Get((int Frame, int Index) m) => frames[frameIndex[m.Frame]].Defects[m.Index];
        var observations = new List<DefectObservation>();
        var dtracks = new List<DefectTrack>();
        for (int id = 0; id < links.Tracks.Count; id++)
        {
            var m = links.Tracks[id];
            // Core positions relative to the tissue, r = x_core - D.
            var t = new double[m.Count]; var rx = new double[m.Count]; var ry = new double[m.Count];
            for (int i = 0; i < m.Count; i++)
            {
                var d = Get(m[i]);
                var (sx, sy) = tissueShiftPx is null ? (0.0, 0.0) : tissueShiftPx[frameIndex[m[i].Frame]];
                t[i] = m[i].Frame; rx[i] = d.X - sx; ry[i] = d.Y - sy;
            }
            double sumH = 0, sumF = 0; int nH = 0, nF = 0;
            for (int i = 0; i < m.Count; i++)
            {
                var d = Get(m[i]);
                int lo = i, hi = i;
                while (lo > 0 && m[i].Frame - m[lo - 1].Frame <= SlopeHalfWindowFrames) lo--;
                while (hi < m.Count - 1 && m[hi + 1].Frame - m[i].Frame <= SlopeHalfWindowFrames) hi++;
                double vx = double.NaN, vy = double.NaN;
                if (hi - lo + 1 >= MinSlopePoints)
                {
                    vx = RobustSlope.TheilSen(t.AsSpan(lo, hi - lo + 1), rx.AsSpan(lo, hi - lo + 1));
                    vy = RobustSlope.TheilSen(t.AsSpan(lo, hi - lo + 1), ry.AsSpan(lo, hi - lo + 1));
                }
                var (fx, fy) = frames[frameIndex[m[i].Frame]].CoreFlow[m[i].Index];
                double head = d.Charge == 0.5 ? vx * d.HeadX + vy * d.HeadY : double.NaN;
                double flowHead = d.Charge == 0.5 ? fx * d.HeadX + fy * d.HeadY : double.NaN;
                if (double.IsFinite(head)) { sumH += head; nH++; }
                if (double.IsFinite(flowHead)) { sumF += flowHead; nF++; }
                observations.Add(new DefectObservation(m[i].Frame, id + 1, d, vx, vy, head, fx, fy, flowHead));
            }
            dtracks.Add(new DefectTrack(id + 1, Get(m[0]).Charge, m[0].Frame, m[^1].Frame, m.Count,
                nH > 0 ? sumH / nH : double.NaN, nF > 0 ? sumF / nF : double.NaN) { SpeedSamples = nH, FlowSamples = nF });
        }
        observations.Sort((a, b) => a.Frame != b.Frame ? a.Frame.CompareTo(b.Frame) : a.TrackId.CompareTo(b.TrackId));
        return (observations, dtracks);
    }

    /// <summary>Ratio of the cell flow at the cores to the defects' own speed over the +1/2 observations with both
    /// defined: rho = sum_o |v_flow,o| / sum_o |v_o| (the mean flow speed over the mean defect speed; a ratio of means, so
    /// an observation of a momentarily still defect does not blow it up); NaN without such an observation or when the
    /// defects do not move (docs/defects.md#drift).</summary>
    public static double CoreFlowRatio(IReadOnlyList<DefectObservation> observations)
    {
        double f = 0, v = 0; int n = 0;
        foreach (var o in observations)
        {
            if (o.Defect.Charge != 0.5 || !double.IsFinite(o.Vx) || !double.IsFinite(o.Vy) || !double.IsFinite(o.FlowVx) || !double.IsFinite(o.FlowVy)) continue;
            f += Math.Sqrt(o.FlowVx * o.FlowVx + o.FlowVy * o.FlowVy); v += Math.Sqrt(o.Vx * o.Vx + o.Vy * o.Vy); n++;
        }
        return n > 0 && v > 0 ? f / v : double.NaN;
    }

    /// <summary>
    /// Pools the +1/2 tracks' headward speeds, time-weighted: v = sum_i n_i v_i / sum_i n_i with n_i the track's frames
    /// with a speed (so a 47-frame track counts more than a 9-frame fragment; this is the mean over all observations).
    /// With at least <see cref="Estimate.MinUnits"/> tracks the interval is a percentile bootstrap over tracks; with 2 to 4
    /// tracks it is a moving-block bootstrap over time along the tracks (<see cref="MovingBlockBootstrap"/>, which then
    /// describes the uncertainty of these defects' motion, not the spread between defects); one track is too_few
    /// (docs/defects.md#headward-speed).
    /// </summary>
    public static HeadwardSummary Summarise(IReadOnlyList<DefectTrack> tracks, IReadOnlyList<DefectObservation> observations, int resamples, int seed)
    {
        var plus = new List<DefectTrack>();
        foreach (var t in tracks) if (t.Charge == 0.5) plus.Add(t);
        var headward = Pool(plus, observations, t => (t.HeadwardSpeed, t.SpeedSamples), o => o.HeadwardSpeed, resamples, seed);
        var flowHeadward = Pool(plus, observations, t => (t.FlowHeadwardSpeed, t.FlowSamples), o => o.FlowHeadwardSpeed, resamples, seed);
        int positive = 0, used = 0;
        foreach (var t in plus) if (double.IsFinite(t.HeadwardSpeed)) { used++; if (t.HeadwardSpeed > 0) positive++; }
        return new HeadwardSummary(headward, flowHeadward, used > 0 ? positive / (double)used : double.NaN, used);
    }

    private static Estimate Pool(List<DefectTrack> plus, IReadOnlyList<DefectObservation> observations, Func<DefectTrack, (double Mean, int Samples)> of,
        Func<DefectObservation, double> sample, int resamples, int seed)
    {
        var v = new List<double>(); var w = new List<int>(); var ids = new List<int>();
        foreach (var t in plus)
        {
            var (mean, n) = of(t);
            if (double.IsFinite(mean) && n > 0) { v.Add(mean); w.Add(n); ids.Add(t.Id); }
        }
        int k = v.Count;
        double[] values = v.ToArray(); int[] weights = w.ToArray();
        if (k >= Estimate.MinUnits || k == 0)
            return Bootstrap.Percentile(k, c =>
            {
                double s = 0, d = 0;
                for (int i = 0; i < k; i++) { s += c[i] * weights[i] * values[i]; d += c[i] * weights[i]; }
                return d > 0 ? s / d : double.NaN;
            }, resamples, seed, "defect tracks");
        if (k == 1)
        {
            double only = values[0];
            return new Estimate(only, double.NaN, double.NaN)
            { N = 1, UnitName = "defect tracks", Status = EstimateStatus.TooFew, Reason = "one +1/2 defect track: its speed describes one defect, not the tissue's defects" };
        }
        var series = new List<double[]>();
        foreach (int id in ids)
        {
            var x = new List<double>();
            foreach (var o in observations) if (o.TrackId == id && double.IsFinite(sample(o))) x.Add(sample(o));
            series.Add(x.ToArray());
        }
        // Blocks at least as long as the slope window: speeds within one window share frames (docs/statistics.md#time-blocks).
        return MovingBlockBootstrap.Mean(series, resamples, seed, 2 * SlopeHalfWindowFrames + 1) with { Reason = $"{k} +1/2 defect tracks: interval from blocks in time along the tracks" };
    }
}
