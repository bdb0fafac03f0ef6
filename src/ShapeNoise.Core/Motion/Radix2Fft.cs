using System.Collections.Concurrent;

namespace ShapeNoise.Motion;

/// <summary>
/// In-place radix-2 complex FFT of one power-of-two length on split real and imaginary arrays:
/// X_k = sum_n x_n exp(-2 pi i k n / N), with the bit-reversal permutation and the twiddle factors tabulated once per
/// length (docs/motion.md#spatial-correlations-by-fft).
/// </summary>
/// <remarks>Iterative decimation-in-time Cooley-Tukey: Cooley J.W. and Tukey J.W. (1965), "An algorithm for the machine
/// calculation of complex Fourier series", Math. Comp. 19:297-301; the tabulated form of Press W.H. et al. (2007),
/// Numerical Recipes, 3rd ed., section 12.2.</remarks>
internal sealed class Radix2Fft
{
    private static readonly ConcurrentDictionary<int, Radix2Fft> Tables = new();
    private readonly int[] _reverse;
    private readonly double[] _cos, _sin;

    /// <summary>The length N (a power of two).</summary>
    public int Length { get; }

    private Radix2Fft(int n)
    {
        Length = n;
        int bits = System.Numerics.BitOperations.Log2((uint)n);
        _reverse = new int[n];
        for (int i = 0; i < n; i++) _reverse[i] = BitReversal.Of(i, bits);
        _cos = new double[Math.Max(1, n / 2)]; _sin = new double[Math.Max(1, n / 2)];
        for (int j = 0; j < n / 2; j++) { _cos[j] = Math.Cos(2 * Math.PI * j / n); _sin[j] = Math.Sin(2 * Math.PI * j / n); }
    }

    /// <summary>The (cached) transform of length <paramref name="n"/>, a power of two.</summary>
    public static Radix2Fft For(int n)
    {
        if (n < 1 || (n & (n - 1)) != 0) throw new ArgumentException($"FFT length {n} is not a power of two");
        return Tables.GetOrAdd(n, static m => new Radix2Fft(m));
    }

    /// <summary>Forward transform of (re, im), each of <see cref="Length"/> values, in place: one column of
    /// <see cref="ForwardColumns"/>.</summary>
    public void Forward(Span<double> re, Span<double> im) => ForwardColumns(re, im, 1);

    /// <summary>Forward transform of every column of the row-major <see cref="Length"/> x <paramref name="width"/> matrix
    /// (re, im), in place: column c is the sequence (re[t width + c], im[t width + c]), t = 0..Length - 1. Each butterfly
    /// works on two whole rows, <see cref="System.Numerics.Vector{T}.Count"/> columns at a time; every column gets the
    /// operations of the scalar butterfly in its order (multiply, multiply, add or subtract; never fused), so each column's
    /// result is the same doubles as <see cref="Forward"/> on that column alone.</summary>
    public void ForwardColumns(Span<double> re, Span<double> im, int width)
    {
        int n = Length;
        if (re.Length < n * width || im.Length < n * width) throw new ArgumentException($"expected {n} rows of {width} values");
        for (int i = 0; i < n; i++)
        {
            int j = _reverse[i];
            if (j <= i) continue;
            Swap(re.Slice(i * width, width), re.Slice(j * width, width));
            Swap(im.Slice(i * width, width), im.Slice(j * width, width));
        }
        for (int size = 2; size <= n; size <<= 1)
        {
            int half = size >> 1, step = n / size;
            for (int start = 0; start < n; start += size)
                for (int k = 0; k < half; k++)
                {
                    int a = start + k, b = a + half;
                    Butterfly(re.Slice(a * width, width), im.Slice(a * width, width), re.Slice(b * width, width), im.Slice(b * width, width),
                        _cos[k * step], -_sin[k * step]);
                }
        }
    }

    private static void Swap(Span<double> x, Span<double> y)
    {
        Span<double> t = x.Length <= 1024 ? stackalloc double[x.Length] : new double[x.Length];
        x.CopyTo(t); y.CopyTo(x); t.CopyTo(y);
    }

    /// <summary>(ra, ia) += w (rb, ib) and (rb, ib) = old (ra, ia) - w (rb, ib) element by element, w = wr + i wi.</summary>
    private static void Butterfly(Span<double> ra, Span<double> ia, Span<double> rb, Span<double> ib, double wr, double wi)
    {
        int n = ra.Length, x = 0;
        if (ia.Length != n || rb.Length != n || ib.Length != n) throw new ArgumentException("rows of different lengths");
        if (System.Numerics.Vector.IsHardwareAccelerated)
        {
            int w = System.Numerics.Vector<double>.Count;
            ref double pra = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(ra);
            ref double pia = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(ia);
            ref double prb = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(rb);
            ref double pib = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(ib);
            var vwr = new System.Numerics.Vector<double>(wr); var vwi = new System.Numerics.Vector<double>(wi);
            for (; x <= n - w; x += w)
            {
                nuint o = (nuint)x;
                var br = System.Numerics.Vector.LoadUnsafe(ref prb, o); var bi = System.Numerics.Vector.LoadUnsafe(ref pib, o);
                var ar = System.Numerics.Vector.LoadUnsafe(ref pra, o); var ai = System.Numerics.Vector.LoadUnsafe(ref pia, o);
                var tr = vwr * br - vwi * bi; var ti = vwr * bi + vwi * br;
                System.Numerics.Vector.StoreUnsafe(ar - tr, ref prb, o); System.Numerics.Vector.StoreUnsafe(ai - ti, ref pib, o);
                System.Numerics.Vector.StoreUnsafe(ar + tr, ref pra, o); System.Numerics.Vector.StoreUnsafe(ai + ti, ref pia, o);
            }
        }
        for (; x < n; x++)
        {
            double tr = wr * rb[x] - wi * ib[x], ti = wr * ib[x] + wi * rb[x];
            rb[x] = ra[x] - tr; ib[x] = ia[x] - ti;
            ra[x] += tr; ia[x] += ti;
        }
    }
}
