using System.Numerics;

namespace ShapeNoise.Shape;

/// <summary>Body-frame Fourier modes C_n = (1/M) sum_k rho(psi_k) exp(-i n psi_k), n = 0..M/2; C_0 is the mean radius.</summary>
/// <remarks>Fourier decomposition of cell contours in the tradition of membrane-fluctuation spectroscopy:
/// Pécréaux J. et al. (2004), "Refined contour analysis of giant unilamellar vesicles", Eur. Phys. J. E 13:277-290.
/// Uses FftSharp's radix-2 FFT when M is a power of two, an exact direct sum otherwise.</remarks>
internal static class FourierModes
{
    /// <summary>Writes C_0..C_{M/2} of <paramref name="rho"/> (length M) into <paramref name="modes"/> (length M/2 + 1).</summary>
    public static void Of(ReadOnlySpan<double> rho, Span<Complex> modes)
    {
        int m = rho.Length;
        if (modes.Length != m / 2 + 1) throw new ArgumentException($"modes must hold M/2+1 = {m / 2 + 1} values", nameof(modes));
        if (BitOperations.IsPow2(m))
        {
            var buf = new Complex[m];
            for (int k = 0; k < m; k++) buf[k] = new Complex(rho[k], 0);
            FftSharp.FFT.Forward(buf);
            for (int n = 0; n <= m / 2; n++) modes[n] = buf[n] / m;
        }
        else Direct(rho, modes);
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
