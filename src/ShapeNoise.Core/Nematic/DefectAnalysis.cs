using ShapeNoise.Fluctuations;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>One defect in one frame, linked into a defect track (px, frames).</summary>
public sealed record DefectObservation(int Frame, int TrackId, Defect Defect, double Vx, double Vy, double HeadwardSpeed,
    double FlowVx, double FlowVy, double FlowHeadwardSpeed);

/// <summary>A defect followed through frames, with its mean headward speeds (px/frame; NaN when undefined).</summary>
public sealed record DefectTrack(int Id, double Charge, int FirstFrame, int LastFrame, int Frames, double HeadwardSpeed, double FlowHeadwardSpeed);

/// <summary>Mean cell velocity and director around +1/2 defects, in each defect's frame (e_head along +x); offsets in coarse widths.</summary>
public sealed record EnsembleFlow(double StepCoarse, int Half, double[] Vpar, double[] Vperp, double[] Qxx, double[] Qxy, int[] Samples);

/// <summary>Everything the defect stage measured (px, frames).</summary>
public sealed record DefectResult(double CoarsePx, double GridPx, IReadOnlyList<DefectObservation> Observations, IReadOnlyList<DefectTrack> Tracks,
    double PlusPerFrame, double MinusPerFrame, Estimate HeadwardSpeed, Estimate FlowHeadwardSpeed, double FractionHeadward,
    int PlusTracksUsed, int Births, int Deaths, EnsembleFlow Flow)
{
    public static DefectResult Empty => new(double.NaN, double.NaN, [], [], 0, 0, Estimate.NaN, Estimate.NaN, double.NaN, 0, 0, 0,
        new EnsembleFlow(0.5, 6, [], [], [], [], []));
}

/// <summary>
/// Per frame: cell Q and velocities coarse-grained on a grid, defects found and their +1/2 polarity measured; then
/// defects of the same charge linked frame to frame (optimal one-to-one within one coarse width), velocities by central
/// differences, and headward speeds pooled over +1/2 defect tracks with seeded bootstrap intervals (docs/measures.md#nematic-field-and-defects).
/// </summary>
/// <remarks>Headward motion of +1/2 defects as the signature of extensile activity: Giomi L. et al. (2013), Phys. Rev.
/// Lett. 110:228101; Saw T.B. et al. (2017), Nature 544:212-216; Kawaguchi K., Kageyama R. and Sano M. (2017), Nature
/// 545:327-331 (neural progenitors, contractile-like tailward motion vs extensile headward motion).</remarks>
public static class DefectAnalysis
{
    /// <summary>Parses a length option: "2R0" = 2 x R0, otherwise a number in the run's length unit. Returns px.</summary>
    public static double ParseLengthPx(string spec, double r0Px, double pixelSizeUm, string option)
    {
        var t = spec.Trim();
        var ci = System.Globalization.CultureInfo.InvariantCulture;
        if (t.EndsWith("R0", StringComparison.OrdinalIgnoreCase))
        {
            if (double.TryParse(t[..^2], System.Globalization.NumberStyles.Float, ci, out var f) && f > 0) return f * r0Px;
        }
        else if (double.TryParse(t, System.Globalization.NumberStyles.Float, ci, out var v) && v > 0) return v / pixelSizeUm;
        throw new ArgumentException($"{option} must be a positive length or a multiple of R0 such as 2R0 (got '{spec}')");
    }

    /// <summary>Runs the defect stage over every analysed outline.</summary>
    /// <param name="widthPx">Image width.</param><param name="heightPx">Image height.</param>
    /// <param name="cells">Analysed outlines, in frame order.</param><param name="tracks">Their tracks.</param>
    /// <param name="r0Px">Mean cell radius.</param><param name="pixelSizeUm">Pixel size for lengths given in um.</param>
    /// <param name="o">Options.</param>
    /// <param name="velocity">Optional velocity per cell (px/frame) replacing the tracked-centroid velocities, e.g. from optical flow.</param>
    public static DefectResult Run(int widthPx, int heightPx, IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks,
        double r0Px, double pixelSizeUm, AnalysisOptions o, Func<CellRecord, (double Vx, double Vy)>? velocity = null)
    {
        if (cells.Count == 0 || !double.IsFinite(r0Px)) return DefectResult.Empty;
        double coarse = ParseLengthPx(o.CoarseWidth, r0Px, pixelSizeUm, "--coarse");
        double grid = ParseLengthPx(o.GridSpacing, r0Px, pixelSizeUm, "--grid");

        // Cell velocities by central differences along each track (one-sided at the ends), px/frame, looked up per cell
        // through its track (no per-cell table: memory stays proportional to the tracks, not the outlines).
        var trackById = new Dictionary<int, TrackRecord>(tracks.Count);
        foreach (var t in tracks) trackById[t.Id] = t;
        (double Vx, double Vy) Velocity(int trackId, int frame)
        {
            if (!trackById.TryGetValue(trackId, out var t) || t.Frames < 2) return (double.NaN, double.NaN);
            int i = Array.BinarySearch(t.FrameIndex, frame);
            if (i < 0) return (double.NaN, double.NaN);
            int n = t.Frames;
            int a = i > 0 && t.FrameIndex[i - 1] == frame - 1 ? i - 1 : i;
            int b = i < n - 1 && t.FrameIndex[i + 1] == frame + 1 ? i + 1 : i;
            if (a == b) return (double.NaN, double.NaN);
            double df = t.FrameIndex[b] - t.FrameIndex[a];
            return ((t.CentroidX[b] - t.CentroidX[a]) / df, (t.CentroidY[b] - t.CentroidY[a]) / df);
        }

        // Cells arrive in frame order; walk them frame by frame without copying.
        var frameRuns = FrameRuns.Of(cells);
        var perFrame = new List<(int Frame, List<Defect> Defects)>();   // grids are dropped after each frame: memory stays flat
        const int half = 6; double step = 0.5;              // ensemble-flow grid: +-3 coarse widths in steps of half a width
        int side = 2 * half + 1;
        var fVpar = new double[side * side]; var fVperp = new double[side * side]; var fQxx = new double[side * side]; var fQxy = new double[side * side]; var fN = new int[side * side];
        int plus = 0, minus = 0;
        var flowAt = new Dictionary<(int Frame, int Index), (double Vx, double Vy)>();
        // Frames are independent: each is coarse-grained and searched in parallel; the results are then accumulated in
        // frame order, so every sum is taken in the same order as a sequential pass.
        var results = new (List<Defect> Defects, (double Vx, double Vy)[] Flow, List<(int K, double Vpar, double Vperp, double Qxx, double Qxy)> Ensemble)[frameRuns.Count];
        Parallel.For(0, frameRuns.Count, f =>
        {
            var run = frameRuns[f];
            var samples = new CellSample[run.Count];
            for (int i = 0; i < run.Count; i++)
            {
                var c = cells[run.Start + i];
                var (qxx, qxy) = c.Shape.Nematic;
                var (vx0, vy0) = velocity is null ? Velocity(c.TrackId, c.Frame) : velocity(c);
                samples[i] = new CellSample(c.Shape.CentroidX, c.Shape.CentroidY, qxx, qxy, vx0, vy0);
            }
            var field = CoarseGraining.Of(samples, widthPx, heightPx, grid, coarse);
            var defects = DefectFinder.Find(field, widthPx, heightPx, coarse, coarse);
            var flow = new (double, double)[defects.Count];
            var ens = new List<(int, double, double, double, double)>();
            for (int d = 0; d < defects.Count; d++)
            {
                var df = defects[d];
                flow[d] = (field.Sample(field.Vx, df.X, df.Y), field.Sample(field.Vy, df.X, df.Y));
                if (df.Charge != 0.5 || !double.IsFinite(df.HeadX)) continue;
                double hx = df.HeadX, hy = df.HeadY, px = -hy, py = hx;
                double c2 = hx * hx - hy * hy, s2 = 2 * hx * hy;   // cos 2 alpha, sin 2 alpha of the head angle
                for (int b = -half; b <= half; b++)
                    for (int a = -half; a <= half; a++)
                    {
                        double u = a * step * coarse, w = b * step * coarse;
                        double x = df.X + u * hx + w * px, y = df.Y + u * hy + w * py;
                        double vx = field.Sample(field.Vx, x, y), vy = field.Sample(field.Vy, x, y);
                        double qx = field.Sample(field.Qxx, x, y), qy = field.Sample(field.Qxy, x, y);
                        if (!double.IsFinite(vx) || !double.IsFinite(vy) || !double.IsFinite(qx)) continue;
                        ens.Add(((b + half) * side + (a + half), vx * hx + vy * hy, vx * px + vy * py, qx * c2 + qy * s2, -qx * s2 + qy * c2));
                    }
            }
            results[f] = (defects, flow, ens);
        });
        for (int f = 0; f < frameRuns.Count; f++)
        {
            var (defects, flow, ens) = results[f];
            perFrame.Add((frameRuns[f].Frame, defects));
            for (int d = 0; d < defects.Count; d++)
            {
                flowAt[(frameRuns[f].Frame, d)] = flow[d];
                if (defects[d].Charge == 0.5) plus++; else if (defects[d].Charge == -0.5) minus++;
            }
            foreach (var (k, vp, vq, qa, qb) in ens) { fVpar[k] += vp; fVperp[k] += vq; fQxx[k] += qa; fQxy[k] += qb; fN[k]++; }
        }
        for (int k = 0; k < fN.Length; k++)
            if (fN[k] > 0) { fVpar[k] /= fN[k]; fVperp[k] /= fN[k]; fQxx[k] /= fN[k]; fQxy[k] /= fN[k]; }
            else { fVpar[k] = fVperp[k] = fQxx[k] = fQxy[k] = double.NaN; }

        // Link same-charge defects between consecutive frames, one-to-one within one coarse width.
        var trackOf = new Dictionary<(int Frame, int Index), int>();
        var members = new List<List<(int Frame, int Index)>>();
        int births = 0, deaths = 0;
        for (int f = 0; f < perFrame.Count; f++)
        {
            var cur = perFrame[f].Defects;
            bool consecutive = f > 0 && perFrame[f - 1].Frame == perFrame[f].Frame - 1;
            var prev = consecutive ? perFrame[f - 1].Defects : [];
            var linked = new bool[cur.Count];
            var continued = new bool[prev.Count];
            foreach (double charge in cur.Select(d => d.Charge).Concat(prev.Select(d => d.Charge)).Distinct())
            {
                var pi = Enumerable.Range(0, prev.Count).Where(i => prev[i].Charge == charge).ToArray();
                var ci = Enumerable.Range(0, cur.Count).Where(i => cur[i].Charge == charge).ToArray();
                var cost = new double[pi.Length, ci.Length];
                for (int a = 0; a < pi.Length; a++)
                    for (int b = 0; b < ci.Length; b++)
                        cost[a, b] = Math.Sqrt(Sq(prev[pi[a]].X - cur[ci[b]].X) + Sq(prev[pi[a]].Y - cur[ci[b]].Y));
                var match = Assignment.Solve(cost, coarse);
                for (int a = 0; a < pi.Length; a++)
                {
                    if (match[a] < 0) continue;
                    int id = trackOf[(perFrame[f - 1].Frame, pi[a])];
                    trackOf[(perFrame[f].Frame, ci[match[a]])] = id;
                    members[id].Add((perFrame[f].Frame, ci[match[a]]));
                    linked[ci[match[a]]] = true; continued[pi[a]] = true;
                }
            }
            for (int i = 0; i < cur.Count; i++)
            {
                if (linked[i]) continue;
                trackOf[(perFrame[f].Frame, i)] = members.Count;
                members.Add([(perFrame[f].Frame, i)]);
                if (f > 0) births++;
            }
            for (int i = 0; i < prev.Count; i++) if (!continued[i]) deaths++;
        }

        var frameIndex = new Dictionary<int, int>();
        for (int f = 0; f < perFrame.Count; f++) frameIndex[perFrame[f].Frame] = f;
        Defect Get((int Frame, int Index) m) => perFrame[frameIndex[m.Frame]].Defects[m.Index];
        var observations = new List<DefectObservation>();
        var dtracks = new List<DefectTrack>();
        for (int id = 0; id < members.Count; id++)
        {
            var m = members[id];
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
                var (fx, fy) = flowAt[m[i]];
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

        var plusTracks = dtracks.Where(t => t.Charge == 0.5 && double.IsFinite(t.HeadwardSpeed)).ToArray();
        var speeds = plusTracks.Select(t => t.HeadwardSpeed).ToArray();
        var flowTracks = dtracks.Where(t => t.Charge == 0.5 && double.IsFinite(t.FlowHeadwardSpeed)).ToArray();
        var flows = flowTracks.Select(t => t.FlowHeadwardSpeed).ToArray();
        double Mean(double[] x, int[] k) { double s = 0, n = 0; for (int i = 0; i < x.Length; i++) { s += k[i] * x[i]; n += k[i]; } return n > 0 ? s / n : double.NaN; }
        var headward = Bootstrap.Percentile(speeds.Length, k => Mean(speeds, k), o.BootstrapResamples, o.Seed);
        var flowHeadward = Bootstrap.Percentile(flows.Length, k => Mean(flows, k), o.BootstrapResamples, o.Seed);
        double fraction = speeds.Length > 0 ? speeds.Count(v => v > 0) / (double)speeds.Length : double.NaN;
        int frames = perFrame.Count;
        return new DefectResult(coarse, grid, observations, dtracks, frames > 0 ? plus / (double)frames : 0, frames > 0 ? minus / (double)frames : 0,
            headward, flowHeadward, fraction, speeds.Length, births, deaths,
            new EnsembleFlow(step, half, fVpar, fVperp, fQxx, fQxy, fN));
    }

    private static double Sq(double v) => v * v;
}
