namespace ShapeNoise.Nematic;

/// <summary>One cell's contribution to the coarse-grained fields: centroid (px), nematic tensor, velocity (px/frame; NaN if unknown).</summary>
public readonly record struct CellSample(double X, double Y, double Qxx, double Qxy, double Vx, double Vy)
{
    /// <summary>The sample of one analysed outline: its centroid, its shape's nematic tensor and the velocity <paramref name="v"/>.</summary>
    public static CellSample Of(Tracking.CellRecord c, (double Vx, double Vy) v)
    {
        var (qxx, qxy) = c.Shape.Nematic;
        return new CellSample(c.Shape.CentroidX, c.Shape.CentroidY, qxx, qxy, v.Vx, v.Vy);
    }
}

/// <summary>
/// Coarse-grained fields on a square grid: node (i, j) sits at x = i h, y = j h (px). Q and velocity are weighted means of
/// the cells' values with Gaussian weights; W and WV are the summed weights (0 where no cell is near).
/// </summary>
public sealed class NematicGrid(int nx, int ny, double spacingPx, double[] qxx, double[] qxy, double[] w, double[] vx, double[] vy, double[] wv)
{
    /// <summary>Number of nodes along x (i = 0..Nx-1).</summary>
    public int Nx { get; } = nx;
    /// <summary>Number of nodes along y (j = 0..Ny-1).</summary>
    public int Ny { get; } = ny;
    /// <summary>Node spacing h (px).</summary>
    public double SpacingPx { get; } = spacingPx;
    /// <summary>Qxx of the coarse-grained tensor Q = sum_c w Q_c / sum_c w per node k = j Nx + i (dimensionless; 0 where W ~ 0).</summary>
    public double[] Qxx { get; } = qxx;
    /// <summary>Qxy of the coarse-grained tensor Q = sum_c w Q_c / sum_c w per node k = j Nx + i (dimensionless; 0 where W ~ 0).</summary>
    public double[] Qxy { get; } = qxy;
    /// <summary>Summed Gaussian weight W = sum_c w(|x - c|) of the cells per node (dimensionless; 0 where no cell is near).</summary>
    public double[] Weight { get; } = w;
    /// <summary>x velocity V = sum_c w v_c / sum_c w over cells with a known velocity, per node (px/frame; NaN where WV = 0).</summary>
    public double[] Vx { get; } = vx;
    /// <summary>y velocity V = sum_c w v_c / sum_c w over cells with a known velocity, per node (px/frame; NaN where WV = 0).</summary>
    public double[] Vy { get; } = vy;
    /// <summary>Summed Gaussian weight WV = sum_c w(|x - c|) of the cells with a known velocity, per node (dimensionless).</summary>
    public double[] VelocityWeight { get; } = wv;

    /// <summary>Director angle theta = 0.5 atan2(Qxy, Qxx) at node k.</summary>
    public double Director(int k) => 0.5 * Math.Atan2(Qxy[k], Qxx[k]);

    /// <summary>Order S = 2 sqrt(Qxx^2 + Qxy^2) at node k.</summary>
    public double Order(int k) => 2 * Math.Sqrt(Qxx[k] * Qxx[k] + Qxy[k] * Qxy[k]);

    /// <summary>Bilinear interpolation of a node field at (x, y) px; NaN outside the grid.</summary>
    public double Sample(double[] field, double x, double y)
    {
        double gx = x / SpacingPx, gy = y / SpacingPx;
        int i = (int)Math.Floor(gx), j = (int)Math.Floor(gy);
        if (i < 0 || j < 0 || i >= Nx - 1 || j >= Ny - 1) return double.NaN;
        double fx = gx - i, fy = gy - j;
        int k = j * Nx + i;
        return (1 - fx) * (1 - fy) * field[k] + fx * (1 - fy) * field[k + 1] + (1 - fx) * fy * field[k + Nx] + fx * fy * field[k + Nx + 1];
    }

    /// <summary>A grid holding an analytic director field theta(x, y) with order S (for tests and truth): Qxx = S/2 cos 2theta, Qxy = S/2 sin 2theta.</summary>
    public static NematicGrid FromDirector(int nx, int ny, double spacingPx, Func<double, double, double> theta, double order = 1)
    {
        var qxx = new double[nx * ny]; var qxy = new double[nx * ny]; var w = new double[nx * ny];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++)
            {
                double t = theta(i * spacingPx, j * spacingPx);
                qxx[j * nx + i] = 0.5 * order * Math.Cos(2 * t);
                qxy[j * nx + i] = 0.5 * order * Math.Sin(2 * t);
                w[j * nx + i] = 1;
            }
        return new NematicGrid(nx, ny, spacingPx, qxx, qxy, w, new double[nx * ny], new double[nx * ny], new double[nx * ny]);
    }
}

/// <summary>
/// Coarse-graining Q(x) = sum_c w(|x - c|) Q_c / sum_c w(|x - c|) with a Gaussian w of width sigma, computed as separable
/// Gaussian smoothing of the cells' values deposited on the grid (bilinear splatting), not as a loop over cells times
/// grid points: O(cells + nodes x kernel). The splatting error is of order (h / sigma)^2.
/// </summary>
/// <remarks>Coarse-grained nematic tensor of cell shapes as in Saw T.B. et al. (2017), "Topological defects in epithelia
/// govern cell death and extrusion", Nature 544:212-216, and Mueller R., Yeomans J.M. and Doostmohammadi A. (2019),
/// "Emergence of active nematic behavior in monolayers of isotropic cells", Phys. Rev. Lett. 122:048004.</remarks>
public static class CoarseGraining
{
    /// <summary>The coarse-grained fields of <paramref name="cells"/> on a grid covering <paramref name="widthPx"/> x <paramref name="heightPx"/>
    /// with node spacing <paramref name="spacingPx"/> and Gaussian width <paramref name="sigmaPx"/> (all px):
    /// Q = sum_c w Q_c / sum_c w and V = sum_c w v_c / sum_c w, w = exp(-|x - c|^2 / (2 sigma^2)).</summary>
    public static NematicGrid Of(ReadOnlySpan<CellSample> cells, int widthPx, int heightPx, double spacingPx, double sigmaPx)
    {
        int nx = (int)Math.Floor(widthPx / spacingPx) + 1, ny = (int)Math.Floor(heightPx / spacingPx) + 1;
        int n = nx * ny;
        var w = Rent(n); var qxx = Rent(n); var qxy = Rent(n);
        var wv = Rent(n); var vx = Rent(n); var vy = Rent(n);
        Span<(int K, double F)> corners = stackalloc (int, double)[4];
        foreach (var c in cells)
        {
            bool hasV = double.IsFinite(c.Vx) && double.IsFinite(c.Vy);
            int nc = Corners(c.X, c.Y, spacingPx, nx, ny, corners);
            for (int q = 0; q < nc; q++)
            {
                var (k, f) = corners[q];
                w[k] += f; qxx[k] += f * c.Qxx; qxy[k] += f * c.Qxy;
                if (hasV) { wv[k] += f; vx[k] += f * c.Vx; vy[k] += f * c.Vy; }
            }
        }
        double s = sigmaPx / spacingPx;
        foreach (var field in new[] { w, qxx, qxy, wv, vx, vy }) Smooth(field, nx, ny, s);
        for (int k = 0; k < n; k++)
        {
            if (w[k] > 1e-9) { qxx[k] /= w[k]; qxy[k] /= w[k]; } else { qxx[k] = 0; qxy[k] = 0; }
            if (wv[k] > 1e-9) { vx[k] /= wv[k]; vy[k] /= wv[k]; } else { vx[k] = double.NaN; vy[k] = double.NaN; }
        }
        return new NematicGrid(nx, ny, spacingPx, qxx, qxy, w, vx, vy, wv);
    }

    /// <summary>Grid arrays handed back by <see cref="Release"/>, by length (at most <see cref="MaxSpare"/> each): a movie's
    /// per-frame fields are a megabyte each, and fresh ones land on the large-object heap frame after frame.</summary>
    private static readonly System.Collections.Concurrent.ConcurrentDictionary<int, System.Collections.Concurrent.ConcurrentBag<double[]>> Spare = new();
    private const int MaxSpare = 36;

    /// <summary>A zeroed array of n values, reused when one was handed back.</summary>
    private static double[] Rent(int n)
    {
        if (Spare.TryGetValue(n, out var bag) && bag.TryTake(out var a)) { Array.Clear(a); return a; }
        return new double[n];
    }

    /// <summary>The caller will not read <paramref name="grid"/> (made by <see cref="Of"/>) again: its arrays may back the
    /// next frame's grid.</summary>
    public static void Release(NematicGrid grid)
    {
        foreach (var a in (ReadOnlySpan<double[]>)[grid.Qxx, grid.Qxy, grid.Weight, grid.Vx, grid.Vy, grid.VelocityWeight])
        {
            var bag = Spare.GetOrAdd(a.Length, static _ => []);
            if (bag.Count < MaxSpare) bag.Add(a);
        }
    }

    /// <summary>The coarse-grained mean of one value per cell on the grid of <paramref name="field"/> (made from the same
    /// cells with the same width): sum_c w v_c / sum_c w, reusing the field's smoothed weights; 0 where they vanish.</summary>
    public static double[] MeanOf(ReadOnlySpan<CellSample> cells, ReadOnlySpan<double> values, NematicGrid field, double sigmaPx)
    {
        int nx = field.Nx, ny = field.Ny;
        var acc = new double[nx * ny];
        Span<(int K, double F)> corners = stackalloc (int, double)[4];
        for (int c = 0; c < cells.Length; c++)
        {
            int nc = Corners(cells[c].X, cells[c].Y, field.SpacingPx, nx, ny, corners);
            for (int q = 0; q < nc; q++) acc[corners[q].K] += corners[q].F * values[c];
        }
        Smooth(acc, nx, ny, sigmaPx / field.SpacingPx);
        var w = field.Weight;
        for (int k = 0; k < acc.Length; k++) acc[k] = w[k] > 1e-9 ? acc[k] / w[k] : 0;
        return acc;
    }

    /// <summary>Bilinear weights of the point (x, y) on the grid nodes around it (node index, weight), in row then column
    /// order, nodes outside the grid left out; returns how many were written to <paramref name="into"/> (at most 4).</summary>
    private static int Corners(double x, double y, double spacingPx, int nx, int ny, Span<(int K, double F)> into)
    {
        double gx = x / spacingPx, gy = y / spacingPx;
        int i = (int)Math.Floor(gx), j = (int)Math.Floor(gy);
        double fx = gx - i, fy = gy - j;
        int n = 0;
        for (int dj = 0; dj <= 1; dj++)
            for (int di = 0; di <= 1; di++)
            {
                int ii = i + di, jj = j + dj;
                if (ii < 0 || jj < 0 || ii >= nx || jj >= ny) continue;
                into[n++] = (jj * nx + ii, (di == 0 ? 1 - fx : fx) * (dj == 0 ? 1 - fy : fy));
            }
        return n;
    }

    /// <summary>In-place separable Gaussian smoothing (sigma in grid units, kernel to 3 sigma, zero outside):
    /// g(x, y) = sum_i k_i f(x + i, y), then f(x, y) = sum_i k_i g(x, y + i), k_i = exp(-i^2 / (2 sigma^2)).</summary>
    /// <remarks>Each output adds its taps in the order i = -r..r, as a per-pixel loop would, but row by row (one
    /// multiply-add over a whole row per tap, <see cref="System.Numerics.Vector{T}"/>-wide), so the result is bit-identical
    /// to the per-pixel loop and the vertical pass reads memory in order (docs/defects.md#coarse-grained-fields; bench/README.md).</remarks>
    public static void Smooth(double[] f, int nx, int ny, double sigma)
    {
        int r = Math.Max(1, (int)Math.Ceiling(3 * sigma));
        var k = new double[2 * r + 1];
        for (int i = -r; i <= r; i++) k[i + r] = Math.Exp(-0.5 * i * i / (sigma * sigma));
        // The horizontal pass's scratch is rented (a frame's grid is large-object-heap sized) and cleared: the taps add into it.
        var tmp = System.Buffers.ArrayPool<double>.Shared.Rent(f.Length);
        Array.Clear(tmp, 0, f.Length);
        try
        {
        for (int y = 0; y < ny; y++)
        {
            var src = f.AsSpan(y * nx, nx);
            var dst = tmp.AsSpan(y * nx, nx);
            for (int i = -r; i <= r; i++)
            {
                // dst[x] += k_i src[x + i] for the x with 0 <= x + i < nx.
                int lo = Math.Max(0, -i), hi = Math.Min(nx, nx - i);
                if (hi > lo) SpanMath.AddScaled(dst[lo..hi], src[(lo + i)..(hi + i)], k[i + r]);
            }
        }
        Array.Clear(f);
        for (int y = 0; y < ny; y++)
        {
            var dst = f.AsSpan(y * nx, nx);
            int lo = Math.Max(-r, -y), hi = Math.Min(r, ny - 1 - y);
            for (int i = lo; i <= hi; i++) SpanMath.AddScaled(dst, tmp.AsSpan((y + i) * nx, nx), k[i + r]);
        }
        }
        finally { System.Buffers.ArrayPool<double>.Shared.Return(tmp); }
    }
}
