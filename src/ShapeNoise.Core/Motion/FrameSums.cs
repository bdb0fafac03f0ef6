using ShapeNoise.Nematic;
using ShapeNoise.Tracking;

namespace ShapeNoise.Motion;

/// <summary>
/// One frame's additive sums for the collective-motion measures (px, frames; docs/motion.md): the cells' speeds after
/// drift removal and their squared fluctuation about the frame mean, the coarse field's squared vorticity and nematic order,
/// and the radial pair sums of the velocity fluctuation, the vorticity fluctuation and Q on the correlation grid
/// (every <c>stride</c>-th node of the coarse grid, at least one coarse width from the border).
/// </summary>
internal sealed record FrameSums(MotionFrame Numbers, double SpeedSum, double FluctuationSqSum, int MovingCells, double MeanVx, double MeanVy,
    double VorticitySqSum, long VorticityNodes, double OrderSum, long OrderNodes, RadialSums Velocity, RadialSums Vorticity, RadialSums Nematic)
{
    /// <summary>The frame's vorticity on the correlation grid (NaN where undefined), kept only when asked for (the figure's frame).</summary>
    public VorticityMap? Map { get; init; }

    /// <summary>The sums of one frame. <paramref name="samples"/> carry the raw cell velocities; the tissue velocity u
    /// (<see cref="TissueDrift.Of"/>) is removed from the speeds and the field when <paramref name="removeDrift"/>.</summary>
    public static FrameSums Of(int frame, CellSample[] samples, int widthPx, int heightPx, double gridPx, double coarsePx, int stride,
        bool removeDrift, bool fields, bool keepMap = false)
    {
        var (driftX, driftY, nu) = TissueDrift.Of(samples);
        double ux = removeDrift && nu > 0 ? driftX : 0, uy = removeDrift && nu > 0 ? driftY : 0;
        double sx = 0, sy = 0, sAbs = 0, speed = 0; int moving = 0;
        foreach (var c in samples)
        {
            if (!double.IsFinite(c.Vx) || !double.IsFinite(c.Vy)) continue;
            sx += c.Vx; sy += c.Vy; sAbs += Math.Sqrt(c.Vx * c.Vx + c.Vy * c.Vy);
            speed += Math.Sqrt((c.Vx - ux) * (c.Vx - ux) + (c.Vy - uy) * (c.Vy - uy));
            moving++;
        }
        double mx = moving > 0 ? sx / moving : double.NaN, my = moving > 0 ? sy / moving : double.NaN, sq = 0;
        foreach (var c in samples)
            if (double.IsFinite(c.Vx) && double.IsFinite(c.Vy)) sq += (c.Vx - mx) * (c.Vx - mx) + (c.Vy - my) * (c.Vy - my);
        double phi = sAbs > 0 ? Math.Sqrt(sx * sx + sy * sy) / sAbs : double.NaN;
        var g = fields ? GridSums.Of(frame, Drifted(samples, ux, uy), widthPx, heightPx, gridPx, coarsePx, stride, keepMap) : GridSums.None;
        var numbers = new MotionFrame(frame, samples.Length, phi, moving > 0 ? speed / moving : double.NaN, moving > 0 ? Math.Sqrt(sq / moving) : double.NaN,
            nu > 0 ? driftX : double.NaN, nu > 0 ? driftY : double.NaN,
            g.VortNodes > 0 ? g.VortSq / (2 * g.VortNodes) : double.NaN, g.OrderNodes > 0 ? g.Order / g.OrderNodes : double.NaN);
        return new FrameSums(numbers, speed, sq, moving, mx, my, g.VortSq, g.VortNodes, g.Order, g.OrderNodes, g.Velocity, g.Vorticity, g.Nematic) { Map = g.Map };
    }

    private static CellSample[] Drifted(CellSample[] samples, double ux, double uy)
    {
        if (ux == 0 && uy == 0) return samples;
        var d = new CellSample[samples.Length];
        for (int i = 0; i < d.Length; i++) d[i] = samples[i] with { Vx = samples[i].Vx - ux, Vy = samples[i].Vy - uy };
        return d;
    }
}

/// <summary>One frame's vorticity omega (1/frame) on a grid of nx x ny nodes at x = i h, y = j h (px); NaN where undefined.</summary>
public sealed record VorticityMap(int Frame, int Nx, int Ny, double SpacingPx, double[] Omega);

/// <summary>The coarse-field part of <see cref="FrameSums"/>.</summary>
internal sealed record GridSums(double VortSq, long VortNodes, double Order, long OrderNodes, RadialSums Velocity, RadialSums Vorticity, RadialSums Nematic)
{
    /// <summary>The vorticity map, when asked for.</summary>
    public VorticityMap? Map { get; init; }

    public static GridSums None { get; } = new(0, 0, 0, 0, RadialSums.Zero(1), RadialSums.Zero(1), RadialSums.Zero(1));

    /// <summary>Number of radial bins for a correlation grid of nx x ny nodes: half the shorter side.</summary>
    public static int Bins(int nx, int ny) => Math.Max(2, Math.Min(nx, ny) / 2);

    /// <summary>Coarse-grains the frame (<see cref="CoarseGraining.Of"/>) and takes the sums on every <paramref name="stride"/>-th
    /// node at least one coarse width from the border: velocity fluctuation dv = v - frame mean, vorticity by central
    /// differences on the full grid (nodes whose four neighbours have a velocity), Q and its order.</summary>
    public static GridSums Of(int frame, CellSample[] samples, int widthPx, int heightPx, double gridPx, double coarsePx, int stride, bool keepMap)
    {
        var field = CoarseGraining.Of(samples, widthPx, heightPx, gridPx, coarsePx);
        int nx = (field.Nx + stride - 1) / stride, ny = (field.Ny + stride - 1) / stride, n = nx * ny, bins = Bins(nx, ny);
        var vx = new double[n]; var vy = new double[n]; var kv = new double[n];
        var om = new double[n]; var ko = new double[n]; var qxx = new double[n]; var qxy = new double[n]; var kq = new double[n];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++)
            {
                int I = i * stride, J = j * stride, K = J * field.Nx + I, k = j * nx + i;
                if (!Interior(I * gridPx, J * gridPx, widthPx, heightPx, coarsePx)) continue;
                if (HasVelocity(field, K)) { vx[k] = field.Vx[K]; vy[k] = field.Vy[K]; kv[k] = 1; }
                if (field.Weight[K] > 1e-6) { qxx[k] = field.Qxx[K]; qxy[k] = field.Qxy[K]; kq[k] = 1; }
                if (I > 0 && J > 0 && I < field.Nx - 1 && J < field.Ny - 1 && HasVelocity(field, K - 1) && HasVelocity(field, K + 1)
                    && HasVelocity(field, K - field.Nx) && HasVelocity(field, K + field.Nx))
                {
                    om[k] = (field.Vy[K + 1] - field.Vy[K - 1] - field.Vx[K + field.Nx] + field.Vx[K - field.Nx]) / (2 * gridPx);
                    ko[k] = 1;
                }
            }
        CoarseGraining.Release(field);   // copied out above
        double h = gridPx * stride;
        Centre(vx, kv); Centre(vy, kv);
        double vortSq = SumSq(om, ko);
        VorticityMap? map = null;
        if (keepMap)
        {
            var w = new double[n];
            for (int k = 0; k < n; k++) w[k] = ko[k] > 0 ? om[k] : double.NaN;
            map = new VorticityMap(frame, nx, ny, h, w);
        }
        Centre(om, ko);
        double order = 0; long orderNodes = 0;
        for (int k = 0; k < n; k++) if (kq[k] > 0) { order += 2 * Math.Sqrt(qxx[k] * qxx[k] + qxy[k] * qxy[k]); orderNodes++; }
        return new GridSums(vortSq, Count(ko), order, orderNodes, FieldCorrelation.Of(nx, ny, h, vx, vy, kv, bins),
            FieldCorrelation.Of(nx, ny, h, om, null, ko, bins), FieldCorrelation.Of(nx, ny, h, qxx, qxy, kq, bins)) { Map = map };
    }

    private static bool HasVelocity(NematicGrid f, int k) => f.VelocityWeight[k] > 1e-6 && double.IsFinite(f.Vx[k]) && double.IsFinite(f.Vy[k]);

    private static bool Interior(double x, double y, int widthPx, int heightPx, double coarsePx)
        => x >= coarsePx && y >= coarsePx && x <= widthPx - coarsePx && y <= heightPx - coarsePx;

    /// <summary>Subtracts the mean over the kept nodes from the kept nodes (the others stay 0).</summary>
    private static void Centre(double[] a, double[] keep)
    {
        double s = 0, n = 0;
        for (int k = 0; k < a.Length; k++) if (keep[k] > 0) { s += a[k]; n++; }
        if (n == 0) return;
        double m = s / n;
        for (int k = 0; k < a.Length; k++) if (keep[k] > 0) a[k] -= m;
    }

    private static double SumSq(double[] a, double[] keep)
    {
        double s = 0;
        for (int k = 0; k < a.Length; k++) if (keep[k] > 0) s += a[k] * a[k];
        return s;
    }

    private static long Count(double[] keep)
    {
        long n = 0;
        foreach (var k in keep) if (k > 0) n++;
        return n;
    }
}

/// <summary>
/// Lag sums of the temporal velocity autocorrelation over tracked cells: for each start frame f and lag tau (frames),
/// S(f, tau) = sum of dv(t) . dv(t + tau) over the cells seen at both, dv = v - the frame's mean cell velocity, and N(f, tau)
/// the pairs. C(tau) = (sum_f w_f S / sum_f w_f N) / (the same at tau = 0) (docs/motion.md#autocorrelation-time).
/// </summary>
internal sealed class LagSums(int frames, int maxLag, double[] s, double[] n)
{
    public static LagSums Of(IReadOnlyList<CellRecord> cells, List<(int Frame, int Start, int Count)> runs, FrameSums[] frames,
        Func<CellRecord, (double Vx, double Vy)> velocityOf, int maxLag)
    {
        var runOf = new Dictionary<int, int>(runs.Count);
        for (int f = 0; f < runs.Count; f++) runOf[runs[f].Frame] = f;
        var byTrack = new Dictionary<int, List<(int Run, int Frame, double Dx, double Dy)>>();
        foreach (var c in cells)
        {
            var (vx, vy) = velocityOf(c);
            if (c.TrackId <= 0 || !double.IsFinite(vx) || !double.IsFinite(vy)) continue;
            int f = runOf[c.Frame];
            if (!byTrack.TryGetValue(c.TrackId, out var list)) byTrack[c.TrackId] = list = [];
            list.Add((f, c.Frame, vx - frames[f].MeanVx, vy - frames[f].MeanVy));
        }
        int width = maxLag + 1;
        var s = new double[runs.Count * width]; var n = new double[runs.Count * width];
        foreach (var list in byTrack.Values)
            for (int a = 0; a < list.Count; a++)
                for (int b = a; b < list.Count && list[b].Frame - list[a].Frame <= maxLag; b++)
                {
                    int k = list[a].Run * width + list[b].Frame - list[a].Frame;
                    s[k] += list[a].Dx * list[b].Dx + list[a].Dy * list[b].Dy; n[k]++;
                }
        return new LagSums(runs.Count, maxLag, s, n);
    }

    /// <summary>C(tau) for tau = 0..maxLag under the frame weights <paramref name="w"/>; NaN where no pair was seen.</summary>
    public double[] Correlation(double[] w)
    {
        var c = new double[maxLag + 1];
        var sum = new double[maxLag + 1]; var pairs = new double[maxLag + 1];
        for (int f = 0; f < frames; f++)
        {
            if (w[f] == 0) continue;
            for (int t = 0; t <= maxLag; t++) { sum[t] += w[f] * s[f * (maxLag + 1) + t]; pairs[t] += w[f] * n[f * (maxLag + 1) + t]; }
        }
        double zero = pairs[0] > 0 ? sum[0] / pairs[0] : double.NaN;
        for (int t = 0; t <= maxLag; t++) c[t] = pairs[t] > 0 && zero > 0 ? sum[t] / pairs[t] / zero : double.NaN;
        return c;
    }
}
