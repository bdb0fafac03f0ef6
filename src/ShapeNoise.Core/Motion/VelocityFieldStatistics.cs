namespace ShapeNoise.Motion;

/// <summary>A radially binned correlation function: bin b holds the node pairs with round(r / h) = b; R is their mean
/// distance (px), C the normalised correlation and Pairs the number of ordered node pairs (0: C is NaN).</summary>
public sealed record RadialCorrelation(double[] R, double[] C, long[] Pairs);

/// <summary>
/// Statistics of velocity, vorticity and nematic fields on a regular grid (node k = j nx + i at x = i h, y = j h) or of
/// ungridded cell velocities. Masks: an empty span keeps every node; a masked-out node, or one with a NaN value, is ignored.
/// </summary>
/// <remarks>Polar order as in Vicsek T. et al. (1995), "Novel type of phase transition in a system of self-driven particles",
/// Phys. Rev. Lett. 75:1226-1229. Velocity and vorticity correlation lengths as in Blanch-Mercader C. et al. (2018),
/// "Turbulent dynamics of epithelial cell cultures", Phys. Rev. Lett. 120:208101. Nematic correlation and order as in
/// Doostmohammadi A. et al. (2018), "Active nematics", Nat. Commun. 9:3246. See docs/motion.md.</remarks>
public static class VelocityFieldStatistics
{
    /// <summary>Polar order phi = |sum_i v_i| / sum_i |v_i| over the kept velocities (grid nodes or cells); NaN if all are zero.</summary>
    /// <remarks>Vicsek et al. (1995) Phys. Rev. Lett. 75:1226 (docs/motion.md, "Polar order").</remarks>
    public static double PolarOrder(ReadOnlySpan<double> vx, ReadOnlySpan<double> vy, ReadOnlySpan<bool> mask = default)
    {
        double sx = 0, sy = 0, s = 0;
        for (int k = 0; k < vx.Length; k++)
        {
            if (!Kept(vx, vy, mask, k)) continue;
            sx += vx[k]; sy += vy[k]; s += Math.Sqrt(vx[k] * vx[k] + vy[k] * vy[k]);
        }
        return s > 0 ? Math.Sqrt(sx * sx + sy * sy) / s : double.NaN;
    }

    /// <summary>Mean speed of the raw field: &lt;|v|&gt; over the kept nodes or cells (px/frame); NaN if none is kept.</summary>
    public static double MeanSpeed(ReadOnlySpan<double> vx, ReadOnlySpan<double> vy, ReadOnlySpan<bool> mask = default)
    {
        double s = 0; long n = 0;
        for (int k = 0; k < vx.Length; k++)
            if (Kept(vx, vy, mask, k)) { s += Math.Sqrt(vx[k] * vx[k] + vy[k] * vy[k]); n++; }
        return n > 0 ? s / n : double.NaN;
    }

    /// <summary>Rms speed of the fluctuation about the frame mean: sqrt(&lt;|v - &lt;v&gt;|^2&gt;) over the kept nodes or cells
    /// (px/frame); NaN if none is kept. For the raw rms speed use <see cref="RmsRawSpeed"/>.</summary>
    /// <remarks>The fluctuation field is the one correlated by <see cref="VelocityCorrelation"/> (docs/motion.md, "Velocity correlation").</remarks>
    public static double RmsSpeed(ReadOnlySpan<double> vx, ReadOnlySpan<double> vy, ReadOnlySpan<bool> mask = default)
    {
        var (mx, my, n) = Mean(vx, vy, mask);
        if (n == 0) return double.NaN;
        double s = 0;
        for (int k = 0; k < vx.Length; k++)
            if (Kept(vx, vy, mask, k)) { double dx = vx[k] - mx, dy = vy[k] - my; s += dx * dx + dy * dy; }
        return Math.Sqrt(s / n);
    }

    /// <summary>Rms speed of the raw field: sqrt(&lt;|v|^2&gt;) over the kept nodes or cells (px/frame); NaN if none is kept.</summary>
    public static double RmsRawSpeed(ReadOnlySpan<double> vx, ReadOnlySpan<double> vy, ReadOnlySpan<bool> mask = default)
    {
        double s = 0; long n = 0;
        for (int k = 0; k < vx.Length; k++)
            if (Kept(vx, vy, mask, k)) { s += vx[k] * vx[k] + vy[k] * vy[k]; n++; }
        return n > 0 ? Math.Sqrt(s / n) : double.NaN;
    }

    /// <summary>Velocity correlation C_vv(r) = &lt;dv(x) . dv(x + r)&gt; / &lt;|dv|^2&gt;, dv = v - &lt;v&gt; (frame mean over kept
    /// nodes), the numerator averaged over all kept node pairs in radial bins of width h, b = round(r / h) &lt; maxBins
    /// (direct sum over displacements).</summary>
    /// <remarks>Blanch-Mercader et al. (2018) Phys. Rev. Lett. 120:208101 (docs/motion.md, "Velocity correlation").</remarks>
    public static RadialCorrelation VelocityCorrelation(int nx, int ny, double spacingPx, ReadOnlySpan<double> vx, ReadOnlySpan<double> vy,
        ReadOnlySpan<bool> mask, int maxBins)
    {
        var (mx, my, _) = Mean(vx, vy, mask);
        var (a, keep) = Centred(vx, vy, mask, mx);
        var (b, _) = Centred(vy, vx, mask, my);
        return PairCorrelation(nx, ny, spacingPx, a, b, keep, maxBins);
    }

    /// <summary>Scalar correlation of the vorticity C_ww(r) = &lt;dw(x) dw(x + r)&gt; / &lt;dw^2&gt;, dw = omega - &lt;omega&gt;, with
    /// the radial binning of <see cref="VelocityCorrelation"/>. Its correlation length (vortex size) is taken as the first
    /// zero, <see cref="FirstZero"/>.</summary>
    /// <remarks>Blanch-Mercader et al. (2018) Phys. Rev. Lett. 120:208101 (docs/motion.md, "Vorticity").</remarks>
    public static RadialCorrelation VorticityCorrelation(int nx, int ny, double spacingPx, ReadOnlySpan<double> omega,
        ReadOnlySpan<bool> mask, int maxBins)
    {
        var (m, _, _) = Mean(omega, omega, mask);
        var (a, keep) = Centred(omega, omega, mask, m);
        return PairCorrelation(nx, ny, spacingPx, a, null, keep, maxBins);
    }

    /// <summary>Nematic correlation C_QQ(r) = &lt;Q(x) : Q(x + r)&gt; / &lt;Q : Q&gt;, Q : Q' = 2 (qxx qxx' + qxy qxy'), not
    /// mean-subtracted (a uniform director gives 1 at all r), with the radial binning of <see cref="VelocityCorrelation"/>.</summary>
    /// <remarks>Doostmohammadi et al. (2018) Nat. Commun. 9:3246 (docs/motion.md, "Nematic correlation").</remarks>
    public static RadialCorrelation NematicCorrelation(int nx, int ny, double spacingPx, ReadOnlySpan<double> qxx, ReadOnlySpan<double> qxy,
        ReadOnlySpan<bool> mask, int maxBins)
    {
        var (a, keep) = Centred(qxx, qxy, mask, 0);
        var (b, _) = Centred(qxy, qxx, mask, 0);
        return PairCorrelation(nx, ny, spacingPx, a, b, keep, maxBins);
    }

    /// <summary>Mean nematic order S = &lt;2 sqrt(qxx^2 + qxy^2)&gt; over the kept nodes (the convention of NematicGrid.Order); NaN if none.</summary>
    /// <remarks>Doostmohammadi et al. (2018) Nat. Commun. 9:3246 (docs/motion.md, "Nematic correlation").</remarks>
    public static double MeanOrder(ReadOnlySpan<double> qxx, ReadOnlySpan<double> qxy, ReadOnlySpan<bool> mask = default)
    {
        double s = 0; long n = 0;
        for (int k = 0; k < qxx.Length; k++)
            if (Kept(qxx, qxy, mask, k)) { s += 2 * Math.Sqrt(qxx[k] * qxx[k] + qxy[k] * qxy[k]); n++; }
        return n > 0 ? s / n : double.NaN;
    }

    /// <summary>Vorticity omega = dvy/dx - dvx/dy per node (1/frame), central differences inside, one-sided at the edges
    /// (0 along an axis with a single node).</summary>
    /// <remarks>docs/motion.md, "Vorticity"; finite differences are common practice.</remarks>
    public static double[] Vorticity(int nx, int ny, double spacingPx, ReadOnlySpan<double> vx, ReadOnlySpan<double> vy)
    {
        var w = new double[nx * ny];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++)
                w[j * nx + i] = Derivative(vy, j * nx, 1, i, nx, spacingPx) - Derivative(vx, i, nx, j, ny, spacingPx);
        return w;
    }

    /// <summary>Enstrophy &lt;omega^2&gt; / 2 over the kept nodes (1/frame^2); NaN if none.</summary>
    /// <remarks>docs/motion.md, "Vorticity".</remarks>
    public static double Enstrophy(ReadOnlySpan<double> omega, ReadOnlySpan<bool> mask = default)
    {
        double s = 0; long n = 0;
        for (int k = 0; k < omega.Length; k++)
            if (Kept(omega, omega, mask, k)) { s += omega[k] * omega[k]; n++; }
        return n > 0 ? s / (2 * n) : double.NaN;
    }

    /// <summary>First zero of C(r): linear interpolation between the first pair of occupied bins where C changes from
    /// positive to non-positive (px); NaN if none.</summary>
    /// <remarks>Correlation length as in Blanch-Mercader et al. (2018) (docs/motion.md, "Correlation lengths").</remarks>
    public static double FirstZero(RadialCorrelation c) => CrossingOf(c, 0);

    /// <summary>First r where C(r) drops to <paramref name="level"/> (e.g. 1/e): linear interpolation between the first pair
    /// of occupied bins with C above then at or below the level (px); NaN if none.</summary>
    /// <remarks>docs/motion.md, "Correlation lengths".</remarks>
    public static double CrossingOf(RadialCorrelation c, double level) => Crossing(c.R, c.C, c.Pairs, level);

    /// <summary>Autocorrelation time: the lag (frames, index of <paramref name="correlationPerLag"/>) where the normalised
    /// temporal velocity autocorrelation first drops to 1/e, by linear interpolation; NaN if it never does.</summary>
    /// <remarks>docs/motion.md, "Autocorrelation time"; the 1/e convention is common practice.</remarks>
    public static double AutocorrelationTime(double[] correlationPerLag)
    {
        var lags = new double[correlationPerLag.Length];
        for (int t = 0; t < lags.Length; t++) lags[t] = t;
        return Crossing(lags, correlationPerLag, null, 1 / Math.E);
    }

    static double Crossing(double[] r, double[] c, long[]? pairs, double level)
    {
        int prev = -1;
        for (int b = 0; b < c.Length; b++)
        {
            if ((pairs != null && pairs[b] == 0) || double.IsNaN(c[b])) continue;
            if (prev >= 0 && c[prev] > level && c[b] <= level)
                return r[prev] + (r[b] - r[prev]) * (c[prev] - level) / (c[prev] - c[b]);
            prev = b;
        }
        return double.NaN;
    }

    static double Derivative(ReadOnlySpan<double> f, int start, int stride, int at, int count, double h)
    {
        if (count < 2) return 0;
        int lo = Math.Max(at - 1, 0), hi = Math.Min(at + 1, count - 1);
        return (f[start + hi * stride] - f[start + lo * stride]) / ((hi - lo) * h);
    }

    static bool Kept(ReadOnlySpan<double> a, ReadOnlySpan<double> b, ReadOnlySpan<bool> mask, int k) =>
        (mask.IsEmpty || mask[k]) && double.IsFinite(a[k]) && double.IsFinite(b[k]);

    static (double X, double Y, long N) Mean(ReadOnlySpan<double> vx, ReadOnlySpan<double> vy, ReadOnlySpan<bool> mask)
    {
        double sx = 0, sy = 0; long n = 0;
        for (int k = 0; k < vx.Length; k++)
            if (Kept(vx, vy, mask, k)) { sx += vx[k]; sy += vy[k]; n++; }
        return n > 0 ? (sx / n, sy / n, n) : (0, 0, 0);
    }

    /// <summary>a - mean at kept nodes, 0 elsewhere; keep = 1 at kept nodes, 0 elsewhere (kept needs a and b finite).</summary>
    static (double[] Values, double[] Keep) Centred(ReadOnlySpan<double> a, ReadOnlySpan<double> b, ReadOnlySpan<bool> mask, double mean)
    {
        var v = new double[a.Length]; var keep = new double[a.Length];
        for (int k = 0; k < a.Length; k++)
            if (Kept(a, b, mask, k)) { v[k] = a[k] - mean; keep[k] = 1; }
        return (v, keep);
    }

    /// <summary>Sum over ordered kept pairs at each displacement of a a' + b b' (b optional), binned by round(r / h) and
    /// divided by the pairs, then by the zero-lag value &lt;a^2 + b^2&gt;. Uses the pair symmetry d, -d (half the displacements).</summary>
    static RadialCorrelation PairCorrelation(int nx, int ny, double h, double[] a, double[]? b, double[] keep, int maxBins)
    {
        var sum = new double[maxBins]; var rSum = new double[maxBins]; var pairs = new long[maxBins];
        int reach = maxBins;
        for (int dy = 0; dy <= Math.Min(reach, ny - 1); dy++)
            for (int dx = dy == 0 ? 0 : -Math.Min(reach, nx - 1); dx <= Math.Min(reach, nx - 1); dx++)
            {
                double dist = Math.Sqrt(dx * dx + dy * dy);
                int bin = (int)Math.Round(dist);
                if (bin >= maxBins) continue;
                var (s, p) = AtOffset(nx, ny, dx, dy, a, b, keep);
                long weight = dx == 0 && dy == 0 ? 1 : 2;
                sum[bin] += weight * s; pairs[bin] += weight * p; rSum[bin] += weight * p * dist * h;
            }
        var r = new double[maxBins]; var c = new double[maxBins];
        double zero = pairs[0] > 0 ? sum[0] / pairs[0] : double.NaN;
        for (int i = 0; i < maxBins; i++)
        {
            r[i] = pairs[i] > 0 ? rSum[i] / pairs[i] : i * h;
            c[i] = pairs[i] > 0 && zero > 0 ? sum[i] / pairs[i] / zero : double.NaN;
        }
        return new RadialCorrelation(r, c, pairs);
    }

    static (double Sum, long Pairs) AtOffset(int nx, int ny, int dx, int dy, double[] a, double[]? b, double[] keep)
    {
        int i0 = Math.Max(0, -dx), i1 = Math.Min(nx, nx - dx);
        double s = 0, p = 0;
        for (int j = 0; j + dy < ny; j++)
        {
            int row = j * nx, shift = dy * nx + dx;
            for (int i = i0; i < i1; i++)
            {
                int k = row + i, k2 = k + shift;
                s += a[k] * a[k2];
                if (b != null) s += b[k] * b[k2];
                p += keep[k] * keep[k2];
            }
        }
        return (s, (long)p);
    }
}
