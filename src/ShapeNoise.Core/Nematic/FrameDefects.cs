namespace ShapeNoise.Nematic;

/// <summary>One ensemble-flow sample about one +1/2 defect: grid slot and the rotated velocity and Q (px/frame).</summary>
/// <param name="Index">Slot (b + H) x side + (a + H) of the sample at offset (a, b) steps (H = half steps).</param>
/// <param name="Vpar">v . e_head.</param><param name="Vperp">v . e_perp, e_perp = e_head turned by +90 degrees.</param>
/// <param name="Qxx">Qxx in the defect's frame.</param><param name="Qxy">Qxy in the defect's frame.</param>
public readonly record struct EnsembleSample(int Index, double Vpar, double Vperp, double Qxx, double Qxy);

/// <summary>One frame's defects, the coarse-grained cell velocity at each core (px/frame), and its ensemble-flow samples.</summary>
/// <param name="Frame">Frame index.</param><param name="Defects">Defects found.</param>
/// <param name="CoreFlow">Coarse-grained velocity at each defect's core, in <paramref name="Defects"/> order.</param>
/// <param name="Ensemble">Ensemble-flow samples of the frame's +1/2 defects, in defect then grid order.</param>
public sealed record FrameDefects(int Frame, List<Defect> Defects, (double Vx, double Vy)[] CoreFlow, List<EnsembleSample> Ensemble)
{
    /// <summary>Local alignment of the frame (docs/defects.md#where-defects-apply): A = sum_k w_k |Q_k| / sum_k w_k &lt;|Q_c|&gt;_k
    /// over the grid nodes at least one coarse width from the border, with Q_k the coarse-grained cell nematic tensor and
    /// &lt;|Q_c|&gt;_k the coarse-grained magnitude of the cells' own tensors: 1 when the cells within a coarse width share
    /// one axis, about 1 / sqrt(N_eff) for random axes (N_eff cells under the kernel). NaN without cells.</summary>
    public double Alignment { get; init; } = double.NaN;

    /// <summary>The frame's tissue velocity u (<see cref="TissueDrift.Of"/>, before any removal); NaN until set by
    /// <see cref="DefectAnalysis.FindPerFrame"/> (docs/defects.md#drift).</summary>
    public TissueDriftFrame TissueVelocity { get; init; } = new(Frame, double.NaN, double.NaN, 0);

    /// <summary>
    /// Coarse-grains <paramref name="samples"/> (Gaussian width <paramref name="coarsePx"/>, grid <paramref name="gridPx"/>),
    /// finds the defects (none within one coarse width of the border; polarity over a disc of one coarse width), samples
    /// the velocity field at each core and the ensemble flow about each +1/2 defect (docs/measures.md#nematic-field-and-defects).
    /// </summary>
    public static FrameDefects Find(int frame, ReadOnlySpan<CellSample> samples, int widthPx, int heightPx, double gridPx, double coarsePx, EnsembleFlowGrid ensemble)
    {
        var field = CoarseGraining.Of(samples, widthPx, heightPx, gridPx, coarsePx);
        var defects = DefectFinder.Find(field, widthPx, heightPx, coarsePx, coarsePx);
        var flow = new (double, double)[defects.Count];
        var ens = new List<EnsembleSample>();
        for (int d = 0; d < defects.Count; d++)
        {
            var df = defects[d];
            flow[d] = (field.Sample(field.Vx, df.X, df.Y), field.Sample(field.Vy, df.X, df.Y));
            if (df.Charge != 0.5 || !double.IsFinite(df.HeadX)) continue;
            EnsembleFlowAccumulator.Sample(field, df, coarsePx, ensemble, ens);
        }
        var result = new FrameDefects(frame, defects, flow, ens) { Alignment = AlignmentOf(field, samples, widthPx, heightPx, gridPx, coarsePx) };
        CoarseGraining.Release(field);   // read for the last time above (the defects and samples hold values, not the arrays)
        return result;
    }

    /// <summary>See <see cref="Alignment"/>: the magnitudes are coarse-grained with the same kernel as Q (on the grid and
    /// weights of <paramref name="field"/>).</summary>
    public static double AlignmentOf(NematicGrid field, ReadOnlySpan<CellSample> samples, int widthPx, int heightPx, double gridPx, double coarsePx)
    {
        var mags = new double[samples.Length];
        for (int i = 0; i < samples.Length; i++) mags[i] = Math.Sqrt(samples[i].Qxx * samples[i].Qxx + samples[i].Qxy * samples[i].Qxy);
        var m = CoarseGraining.MeanOf(samples, mags, field, coarsePx);
        double num = 0, den = 0;
        for (int j = 0; j < field.Ny; j++)
            for (int i = 0; i < field.Nx; i++)
            {
                double x = i * gridPx, y = j * gridPx;
                if (x < coarsePx || y < coarsePx || x > widthPx - coarsePx || y > heightPx - coarsePx) continue;
                int k = j * field.Nx + i;
                double w = field.Weight[k];
                if (!(w > 1e-9)) continue;
                num += w * 0.5 * field.Order(k); den += w * m[k];
            }
        return den > 0 ? num / den : double.NaN;
    }
}

/// <summary>
/// Mean cell velocity and Q around +1/2 defects in each defect's frame (e_head along +x): the sample at offset (u, w)
/// = (a, b) x step x coarse width is taken at x = core + u e_head + w e_perp (e_perp = e_head turned by +90 degrees), with
/// v_par = v . e_head, v_perp = v . e_perp and Q rotated by -alpha (alpha the head angle), and averaged slot by slot
/// (docs/measures.md#nematic-field-and-defects).
/// </summary>
public sealed class EnsembleFlowAccumulator(EnsembleFlowGrid grid)
{
    private readonly double[] vpar = new double[grid.Side * grid.Side], vperp = new double[grid.Side * grid.Side];
    private readonly double[] qxx = new double[grid.Side * grid.Side], qxy = new double[grid.Side * grid.Side];
    private readonly int[] count = new int[grid.Side * grid.Side];

    /// <summary>Appends to <paramref name="into"/> the samples about +1/2 defect <paramref name="df"/> (unit head) where
    /// the velocity and Q of <paramref name="field"/> are defined, in row (b) then column (a) order.</summary>
    public static void Sample(NematicGrid field, Defect df, double coarsePx, EnsembleFlowGrid grid, List<EnsembleSample> into)
    {
        int half = grid.HalfSteps, side = grid.Side; double step = grid.StepCoarseWidths;
        double hx = df.HeadX, hy = df.HeadY, px = -hy, py = hx;
        double c2 = hx * hx - hy * hy, s2 = 2 * hx * hy;   // cos 2 alpha, sin 2 alpha of the head angle
        for (int b = -half; b <= half; b++)
            for (int a = -half; a <= half; a++)
            {
                double u = a * step * coarsePx, w = b * step * coarsePx;
                double x = df.X + u * hx + w * px, y = df.Y + u * hy + w * py;
                double vx = field.Sample(field.Vx, x, y), vy = field.Sample(field.Vy, x, y);
                double qx = field.Sample(field.Qxx, x, y), qy = field.Sample(field.Qxy, x, y);
                if (!double.IsFinite(vx) || !double.IsFinite(vy) || !double.IsFinite(qx)) continue;
                into.Add(new EnsembleSample((b + half) * side + (a + half), vx * hx + vy * hy, vx * px + vy * py, qx * c2 + qy * s2, -qx * s2 + qy * c2));
            }
    }

    /// <summary>Adds samples to their slots (call in frame order: the sums are then those of a sequential pass).</summary>
    public void Add(IReadOnlyList<EnsembleSample> samples)
    {
        for (int i = 0; i < samples.Count; i++)
        {
            var s = samples[i];
            vpar[s.Index] += s.Vpar; vperp[s.Index] += s.Vperp; qxx[s.Index] += s.Qxx; qxy[s.Index] += s.Qxy; count[s.Index]++;
        }
    }

    /// <summary>Slot means (NaN where no sample fell) and counts.</summary>
    public EnsembleFlow Result()
    {
        int n = count.Length;
        double[] mp = new double[n], mq = new double[n], mx = new double[n], my = new double[n];
        for (int k = 0; k < n; k++)
            if (count[k] > 0) { mp[k] = vpar[k] / count[k]; mq[k] = vperp[k] / count[k]; mx[k] = qxx[k] / count[k]; my[k] = qxy[k] / count[k]; }
            else { mp[k] = mq[k] = mx[k] = my[k] = double.NaN; }
        return new EnsembleFlow(grid.StepCoarseWidths, grid.HalfSteps, mp, mq, mx, my, (int[])count.Clone());
    }
}
