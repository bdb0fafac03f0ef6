using System.Numerics;

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
/// 3rd ed., section 13.2 (correlation and autocorrelation using the FFT). Two real fields share one complex transform:
/// for z = a + i b, A(k) = (Z(k) + conj Z(-k)) / 2 and B(k) = (Z(k) - conj Z(-k)) / (2i) (Numerical Recipes section 12.3).</remarks>
public static class FieldCorrelation
{
    /// <summary>Radial pair sums of the vector field (a, b) (b null for a scalar) over the kept nodes
    /// (<paramref name="keep"/> 1 or 0; a and b must be 0 where keep is 0), bins b = round(r / h) &lt; <paramref name="bins"/>.</summary>
    public static RadialSums Of(int nx, int ny, double spacingPx, double[] a, double[]? b, double[] keep, int bins)
    {
        int px = PowerOfTwo(nx + bins), py = PowerOfTwo(ny + bins);
        var z = Packed(nx, ny, px, py, a, b);
        Transform(z, px, py, inverse: false);
        var m = Packed(nx, ny, px, py, keep, null);
        Transform(m, px, py, inverse: false);
        // Power spectra: |A|^2 + |B|^2 = (|Z(k)|^2 + |Z(-k)|^2) / 2 for z = a + i b; the mask's |M|^2 in the imaginary part
        // (both autocorrelations are real and even, so one inverse transform returns them as real and imaginary parts).
        var s = new Complex[px * py];
        for (int j = 0; j < py; j++)
            for (int i = 0; i < px; i++)
            {
                int k = j * px + i, kn = ((py - j) % py) * px + (px - i) % px;
                double pab = b is null ? Half(z[k], z[kn]) : 0.5 * (Norm(z[k]) + Norm(z[kn]));
                s[k] = new Complex(pab, Norm(m[k]));
            }
        Transform(s, px, py, inverse: true);
        return Binned(s, px, py, nx, ny, spacingPx, bins);
    }

    /// <summary>|A(k)|^2 of the real part a of z = a + i b from Z(k) and Z(-k): A = (Z(k) + conj Z(-k)) / 2.</summary>
    private static double Half(Complex zk, Complex zn) => Norm((zk + Complex.Conjugate(zn)) / 2);

    private static double Norm(Complex c) => c.Real * c.Real + c.Imaginary * c.Imaginary;

    private static int PowerOfTwo(int n)
    {
        int p = 1;
        while (p < n) p <<= 1;
        return p;
    }

    /// <summary>a + i b on the padded grid (b null: imaginary part 0).</summary>
    private static Complex[] Packed(int nx, int ny, int px, int py, double[] a, double[]? b)
    {
        var z = new Complex[px * py];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++)
                z[j * px + i] = new Complex(a[j * nx + i], b is null ? 0 : b[j * nx + i]);
        return z;
    }

    /// <summary>In-place 2D transform (rows, then columns) with FftSharp's forward radix-2 FFT. The inverse is taken as
    /// conj(FFT(conj z)) / (px py), so its scaling does not depend on the library's inverse convention.</summary>
    private static void Transform(Complex[] z, int px, int py, bool inverse)
    {
        if (inverse) for (int k = 0; k < z.Length; k++) z[k] = Complex.Conjugate(z[k]);
        var span = z.AsSpan();
        for (int j = 0; j < py; j++) FftSharp.FFT.Forward(span.Slice(j * px, px));
        var col = new Complex[py];
        for (int i = 0; i < px; i++)
        {
            for (int j = 0; j < py; j++) col[j] = z[j * px + i];
            FftSharp.FFT.Forward(col);
            for (int j = 0; j < py; j++) z[j * px + i] = col[j];
        }
        if (!inverse) return;
        double f = 1.0 / ((double)px * py);
        for (int k = 0; k < z.Length; k++) z[k] = Complex.Conjugate(z[k]) * f;
    }

    /// <summary>Bins the autocorrelations (real: the field's, imaginary: the mask's) by round(|d|) for |d_x| &lt; nx, |d_y| &lt; ny.</summary>
    private static RadialSums Binned(Complex[] s, int px, int py, int nx, int ny, double h, int bins)
    {
        var r = RadialSums.Zero(bins);
        int reachX = Math.Min(bins, nx - 1), reachY = Math.Min(bins, ny - 1);
        for (int dy = -reachY; dy <= reachY; dy++)
            for (int dx = -reachX; dx <= reachX; dx++)
            {
                double dist = Math.Sqrt(dx * dx + dy * dy);
                int bin = (int)Math.Round(dist);
                if (bin >= bins) continue;
                var v = s[((dy + py) % py) * px + (dx + px) % px];
                double pairs = Math.Round(v.Imaginary);
                if (pairs <= 0) continue;
                r.Sum[bin] += v.Real; r.Pairs[bin] += pairs; r.RSum[bin] += pairs * dist * h;
            }
        return r;
    }
}
