using System.Numerics;

namespace ShapeNoise.Shape;

/// <summary>Body-frame Fourier modes C_n = (1/M) sum_k rho(psi_k) exp(-i n psi_k), n = 0..M/2; C_0 is the mean radius.</summary>
/// <remarks>Fourier decomposition of cell contours in the tradition of membrane-fluctuation spectroscopy:
/// Pécréaux J. et al. (2004), "Refined contour analysis of giant unilamellar vesicles", Eur. Phys. J. E 13:277-290.
/// Uses an iterative radix-2 FFT when M is a power of two (<see cref="Radix2"/>), an exact direct sum otherwise.</remarks>
internal static class FourierModes
{
    /// <summary>Writes C_0..C_{M/2} of <paramref name="rho"/> (length M) into <paramref name="modes"/> (length M/2 + 1).</summary>
    public static void Of(ReadOnlySpan<double> rho, Span<Complex> modes)
    {
        int m = rho.Length;
        if (modes.Length != m / 2 + 1) throw new ArgumentException($"modes must hold M/2+1 = {m / 2 + 1} values", nameof(modes));
        if (BitOperations.IsPow2(m) && m >= 2)
        {
            Span<Complex> buf = m <= 256 ? stackalloc Complex[m] : new Complex[m];
            for (int k = 0; k < m; k++) buf[k] = new Complex(rho[k], 0);
            Radix2.For(m).Forward(buf);
            for (int n = 0; n <= m / 2; n++) modes[n] = buf[n] / m;
        }
        else Direct(rho, modes);
    }

    /// <summary>
    /// In-place decimation-in-time radix-2 transform X_n = sum_k x_k exp(-2 pi i n k / M): the bit-reversal permutation,
    /// then stages of half-size h = 1, 2, 4, .., M/2, each butterfly t = w x_odd, x_odd = x_even - t, x_even = x_even + t
    /// with w = (cos(-pi j / h), sin(-pi j / h)). The twiddles and the swaps are tabulated once per M (every outline
    /// has the same M), so a transform costs no trigonometric call.
    /// </summary>
    /// <remarks>Cooley J.W. and Tukey J.W. (1965), "An algorithm for the machine calculation of complex Fourier series",
    /// Math. Comp. 19:297-301; the iterative form: Press W.H. et al. (2007), Numerical Recipes, 3rd ed., sec. 12.2.
    /// Checked bit for bit against FftSharp's transform (tests/.../FourierModesTests.cs).</remarks>
    internal sealed class Radix2
    {
        private static volatile Radix2? _last;
        private readonly int _m;
        private readonly (int A, int B)[] _swaps;
        private readonly Complex[] _twiddles;   // stage h at offsets h - 1 .. 2h - 2

        private Radix2(int m)
        {
            _m = m;
            int bits = BitOperations.Log2((uint)m);
            var swaps = new List<(int, int)>();
            for (int i = 1; i < m; i++)
            {
                int r = BitReversal.Of(i, bits);
                if (r > i) swaps.Add((i, r));
            }
            _swaps = swaps.ToArray();
            _twiddles = new Complex[Math.Max(1, m - 1)];
            for (int h = 1; h <= m / 2; h *= 2)
            {
                double step = -Math.PI / h;
                for (int j = 0; j < h; j++) _twiddles[h - 1 + j] = new Complex(Math.Cos(step * j), Math.Sin(step * j));
            }
        }

        /// <summary>The tables for M points (M a power of two, at least 2); the last one built is kept.</summary>
        public static Radix2 For(int m)
        {
            var last = _last;
            if (last is not null && last._m == m) return last;
            return _last = new Radix2(m);
        }

        /// <summary>Transforms <paramref name="x"/> (length M) in place.</summary>
        public void Forward(Span<Complex> x)
        {
            if (x.Length != _m) throw new ArgumentException($"expected {_m} points", nameof(x));
            foreach (var (a, b) in _swaps) (x[a], x[b]) = (x[b], x[a]);
            for (int h = 1; h <= _m / 2; h *= 2)
            {
                var w = _twiddles.AsSpan(h - 1, h);
                for (int start = 0; start < _m; start += 2 * h)
                    for (int j = 0; j < h; j++)
                    {
                        int even = start + j, odd = even + h;
                        var t = w[j] * x[odd];
                        x[odd] = x[even] - t;
                        x[even] += t;
                    }
            }
        }
    }

    /// <summary>The defining sum, evaluated directly (O(M^2)); reference for the FFT path.</summary>
    public static void Direct(ReadOnlySpan<double> rho, Span<Complex> modes)
    {
        int m = rho.Length;
        for (int n = 0; n < modes.Length; n++)
        {
            double re = 0, im = 0;
            for (int k = 0; k < m; k++)
            {
                double a = 2 * Math.PI * ((long)n * k % m) / m;
                re += rho[k] * Math.Cos(a);
                im -= rho[k] * Math.Sin(a);
            }
            modes[n] = new Complex(re / m, im / m);
        }
    }
}
