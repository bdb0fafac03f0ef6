namespace ShapeNoise.Motion;

/// <summary>Radially binned pair sums of one field on one frame: bin b holds the ordered node pairs with round(r / h) = b.
/// Sum: sum of a a' (+ b b'); Pairs: number of pairs; RSum: sum of their distances (px). Bin 0 is the zero lag alone
/// (sum of a^2 + b^2 over the kept nodes, Pairs = kept nodes). Sums of several frames add bin by bin.</summary>
public sealed record RadialSums(double[] Sum, double[] Pairs, double[] RSum)
{
    /// <summary>Empty sums of <paramref name="bins"/> bins.</summary>
    public static RadialSums Zero(int bins) => new(new double[bins], new double[bins], new double[bins]);

    /// <summary>Adds <paramref name="weight"/> x <paramref name="other"/> into these sums.</summary>
    public void Add(RadialSums other, double weight = 1)
    {
        for (int b = 0; b < Sum.Length && b < other.Sum.Length; b++)
        {
            Sum[b] += weight * other.Sum[b]; Pairs[b] += weight * other.Pairs[b]; RSum[b] += weight * other.RSum[b];
        }
    }

    /// <summary>The normalised correlation C(r_b) = (Sum_b / Pairs_b) / (Sum_0 / Pairs_0) with r_b the mean pair distance
    /// (docs/motion.md#velocity-correlation); NaN in empty bins or when the zero-lag value is not positive.</summary>
    public RadialCorrelation Normalised(double spacingPx)
    {
        int n = Sum.Length;
        var r = new double[n]; var c = new double[n]; var pairs = new long[n];
        double zero = Pairs[0] > 0 ? Sum[0] / Pairs[0] : double.NaN;
        for (int b = 0; b < n; b++)
        {
            pairs[b] = (long)Math.Round(Pairs[b]);
            r[b] = Pairs[b] > 0.5 ? RSum[b] / Pairs[b] : b * spacingPx;
            c[b] = Pairs[b] > 0.5 && zero > 0 ? Sum[b] / Pairs[b] / zero : double.NaN;
        }
        return new RadialCorrelation(r, c, pairs);
    }
}

/// <summary>
/// Masked spatial autocorrelations on a regular grid by the fast Fourier transform: for fields a, b that are zero outside
/// the kept nodes and the mask m (1 at kept nodes), S(d) = sum_x a(x) a(x + d) + b(x) b(x + d) and P(d) = sum_x m(x) m(x + d)
/// for every displacement d with |d_x|, |d_y| &lt; the bin count, binned by round(|d|): the same sums as a direct loop over
/// node pairs (docs/motion.md#velocity-correlation), in O(N log N) per frame. The grid is zero-padded to a power of two at
/// least n + bins along each axis, so no displacement wraps around.
/// </summary>
/// <remarks>Correlation by the Wiener-Khinchin theorem with zero padding: Press W.H. et al. (2007), Numerical Recipes,
/// 3rd ed., section 13.2 (correlation and autocorrelation using the FFT). The transform is <see cref="Radix2Fft"/>, pruned: rows that are all zero are not transformed and the inverse is taken only at the displacements that are binned. Two real fields share one complex transform:
/// for z = a + i b, A(k) = (Z(k) + conj Z(-k)) / 2 and B(k) = (Z(k) - conj Z(-k)) / (2i) (Numerical Recipes section 12.3).</remarks>
public static class FieldCorrelation
{
    /// <summary>Radial pair sums of the vector field (a, b) (b null for a scalar) over the kept nodes
    /// (<paramref name="keep"/> 1 or 0; a and b must be 0 where keep is 0), bins b = round(r / h) &lt; <paramref name="bins"/>.</summary>
    public static RadialSums Of(int nx, int ny, double spacingPx, double[] a, double[]? b, double[] keep, int bins)
    {
        int px = PowerOfTwo(nx + bins), py = PowerOfTwo(ny + bins);
        int reachX = Math.Min(bins, nx - 1), reachY = Math.Min(bins, ny - 1);
        var ws = Workspace.Rent(px, py, 2 * reachY + 1);
        try { return Correlate(nx, ny, px, py, reachX, reachY, spacingPx, a, b, keep, bins, ws); }
        finally { Workspace.Return(ws); }
    }

    /// <summary>Lets the workspaces go (the motion stage calls it when its frames are done, so a large movie's transform
    /// arrays do not stay allocated through the rest of the run).</summary>
    public static void ReleaseWorkspaces() => Workspace.Clear();

    private static RadialSums Correlate(int nx, int ny, int px, int py, int reachX, int reachY, double spacingPx, double[] a, double[]? b,
        double[] keep, int bins, Workspace ws)
    {
        var (zr, zi) = Spectrum(nx, ny, px, py, a, b, ws.Zr, ws.Zi, ws);
        var (mr, mi) = Spectrum(nx, ny, px, py, keep, null, ws.Mr, ws.Mi, ws);
        // Power spectra: |A|^2 + |B|^2 = (|Z(k)|^2 + |Z(-k)|^2) / 2 for z = a + i b; the mask's |M|^2 in the imaginary part
        // (both autocorrelations are real and even, so one inverse transform returns them as real and imaginary parts).
        // Index ky px + kx.
        var sr = ws.Sr; var si = ws.Si;
        for (int ky = 0; ky < py; ky++)
            for (int kx = 0; kx < px; kx++)
            {
                int k = ky * px + kx, kn = ((py - ky) % py) * px + (px - kx) % px;
                sr[k] = b is null ? Half(zr[k], zi[k], zr[kn], zi[kn]) : 0.5 * (zr[k] * zr[k] + zi[k] * zi[k] + zr[kn] * zr[kn] + zi[kn] * zi[kn]);
                si[k] = mr[k] * mr[k] + mi[k] * mi[k];
            }
        var (cr, ci) = Inverse(sr, si, px, py, reachY, ws);
        return Binned(cr, ci, px, reachX, reachY, spacingPx, bins);
    }

    /// <summary>|A(k)|^2 of the real part a of z = a + i b from Z(k) and Z(-k): A = (Z(k) + conj Z(-k)) / 2.</summary>
    private static double Half(double re, double im, double reN, double imN)
    {
        double x = 0.5 * (re + reN), y = 0.5 * (im - imN);
        return x * x + y * y;
    }

    private static int PowerOfTwo(int n)
    {
        int p = 1;
        while (p < n) p <<= 1;
        return p;
    }

    /// <summary>The 2D transform of a + i b (b null: 0) zero-padded to px x py (index ky px + kx). Both passes run on whole
    /// rows (<see cref="Radix2Fft.ForwardColumns"/>): the rows' transforms along x on the transposed field, of the ny rows
    /// only (the py - ny padding rows are all zero), then along y (docs/motion.md#spatial-correlations-by-fft).</summary>
    private static (double[] Re, double[] Im) Spectrum(int nx, int ny, int px, int py, double[] a, double[]? b, double[] tr, double[] ti, Workspace ws)
    {
        var xr = ws.Xr; var xi = ws.Xi;     // x-major: index x ny + j
        Array.Clear(xr, 0, px * ny); Array.Clear(xi, 0, px * ny);
        for (int j = 0; j < ny; j++)
            for (int x = 0; x < nx; x++)
            {
                xr[x * ny + j] = a[j * nx + x];
                if (b is not null) xi[x * ny + j] = b[j * nx + x];
            }
        Radix2Fft.For(px).ForwardColumns(xr, xi, ny);
        Array.Clear(tr); Array.Clear(ti);     // the padding rows j >= ny stay zero
        for (int kx = 0; kx < px; kx++)
            for (int j = 0; j < ny; j++) { tr[j * px + kx] = xr[kx * ny + j]; ti[j * px + kx] = xi[kx * ny + j]; }
        Radix2Fft.For(py).ForwardColumns(tr, ti, px);
        return (tr, ti);
    }

    /// <summary>The inverse transform of the spectrum s (index ky px + kx), conj(FFT(conj s)) / (px py), at the displacements
    /// |d_y| &lt;= <paramref name="reachY"/> only, returned d_x-major: index d_x rows + r, r = d_y + reachY, rows = 2 reachY + 1,
    /// d_x = 0..px - 1 (negative d_x wrapped).</summary>
    private static (double[] Re, double[] Im) Inverse(double[] sr, double[] si, int px, int py, int reachY, Workspace ws)
    {
        for (int k = 0; k < si.Length; k++) si[k] = -si[k];
        Radix2Fft.For(py).ForwardColumns(sr, si, px);
        int rows = 2 * reachY + 1;
        var ur = ws.Ur; var ui = ws.Ui;      // every element written below
        for (int r = 0; r < rows; r++)
        {
            int dy = (r - reachY + py) % py;
            for (int kx = 0; kx < px; kx++) { ur[kx * rows + r] = sr[dy * px + kx]; ui[kx * rows + r] = si[dy * px + kx]; }
        }
        Radix2Fft.For(px).ForwardColumns(ur, ui, rows);
        double f = 1.0 / ((double)px * py);
        for (int k = 0; k < ur.Length; k++) { ur[k] *= f; ui[k] *= -f; }
        return (ur, ui);
    }

    /// <summary>Bins the autocorrelations (real: the field's, imaginary: the mask's) by round(|d|) for |d_x| &lt;= reachX,
    /// |d_y| &lt;= reachY (rows of <see cref="Inverse"/>).</summary>
    private static RadialSums Binned(double[] re, double[] im, int px, int reachX, int reachY, double h, int bins)
    {
        var r = RadialSums.Zero(bins);
        for (int dy = -reachY; dy <= reachY; dy++)
            for (int dx = -reachX; dx <= reachX; dx++)
            {
                double dist = Math.Sqrt(dx * dx + dy * dy);
                int bin = (int)Math.Round(dist);
                if (bin >= bins) continue;
                int k = ((dx + px) % px) * (2 * reachY + 1) + dy + reachY;
                double pairs = Math.Round(im[k]);
                if (pairs <= 0) continue;
                r.Sum[bin] += re[k]; r.Pairs[bin] += pairs; r.RSum[bin] += pairs * dist * h;
            }
        return r;
    }

    /// <summary>The transforms' arrays, rented by one correlation at a time and reused across frames: a frame's three
    /// correlations on a 512 x 512 padded grid would otherwise allocate about 40 MB of short-lived large objects, each batch
    /// a full garbage collection (bench/README.md). Every array is cleared or overwritten before it is read.</summary>
    private sealed class Workspace
    {
        private static readonly System.Collections.Concurrent.ConcurrentBag<Workspace> Free = new();
        public readonly int Px, Py, Rows;
        public readonly double[] Zr, Zi, Mr, Mi, Sr, Si, Ur, Ui, Xr, Xi;

        private Workspace(int px, int py, int rows)
        {
            Px = px; Py = py; Rows = rows;
            Zr = new double[px * py]; Zi = new double[px * py]; Mr = new double[px * py]; Mi = new double[px * py];
            Sr = new double[px * py]; Si = new double[px * py];
            Ur = new double[rows * px]; Ui = new double[rows * px];
            Xr = new double[px * py]; Xi = new double[px * py];
        }

        public static Workspace Rent(int px, int py, int rows)
        {
            while (Free.TryTake(out var w))
                if (w.Px == px && w.Py == py && w.Rows == rows) return w;   // one of another size is dropped
            return new Workspace(px, py, rows);
        }

        public static void Return(Workspace w) => Free.Add(w);

        public static void Clear() => Free.Clear();
    }
}
