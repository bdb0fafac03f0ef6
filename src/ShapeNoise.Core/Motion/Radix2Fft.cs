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

    /// <summary>Forward transform of (re, im), each of <see cref="Length"/> values, in place.</summary>
    public void Forward(Span<double> re, Span<double> im)
    {
        int n = Length;
        for (int i = 0; i < n; i++)
        {
            int j = _reverse[i];
            if (j <= i) continue;
            (re[i], re[j]) = (re[j], re[i]);
            (im[i], im[j]) = (im[j], im[i]);
        }
        for (int size = 2; size <= n; size <<= 1)
        {
            int half = size >> 1, step = n / size;
            for (int start = 0; start < n; start += size)
                for (int k = 0; k < half; k++)
                {
                    double wr = _cos[k * step], wi = -_sin[k * step];
                    int a = start + k, b = a + half;
                    double tr = wr * re[b] - wi * im[b], ti = wr * im[b] + wi * re[b];
                    re[b] = re[a] - tr; im[b] = im[a] - ti;
                    re[a] += tr; im[a] += ti;
                }
        }
    }
}
