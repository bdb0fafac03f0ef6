using System.Numerics;
using CsCheck;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Shape;

/// <summary>
/// DFT properties of FourierModes (C_n = (1/M) sum_k rho_k exp(-2 pi i n k / M), n = 0..M/2) on random real rho.
/// Source for Parseval, the shift theorem and linearity: Oppenheim A. V. and Schafer R. W., Discrete-Time Signal
/// Processing, chapter on the DFT, table of DFT properties (from memory). Tolerances are relative to the size of the
/// input, max_k |rho_k|: an FFT's rounding error grows like eps log2 M times that, about 1e-15 at M = 64.
/// </summary>
public class FourierModesPropertyTests
{
    /// <summary>rho of length 64 (the FFT path), values in -100..100 px.</summary>
    private static readonly Gen<double[]> Rho64 = Gen.Double[-100, 100].Array[64];

    /// <summary>rho of any length 3..200 that is not a power of two (the Direct path).</summary>
    private static readonly Gen<double[]> RhoOther =
        from m in Gen.Int[3, 200].Where(m => !BitOperations.IsPow2(m))
        from r in Gen.Double[-100, 100].Array[m]
        select r;

    /// <summary>Both paths: power-of-two lengths 4..256 and the others.</summary>
    private static readonly Gen<double[]> RhoAny = Gen.OneOf(Rho64, RhoOther,
        from e in Gen.Int[2, 8] from r in Gen.Double[-100, 100].Array[1 << e] select r);

    private static Complex[] Modes(double[] rho) { var c = new Complex[rho.Length / 2 + 1]; FourierModes.Of(rho, c); return c; }
    private static Complex[] DirectModes(double[] rho) { var c = new Complex[rho.Length / 2 + 1]; FourierModes.Direct(rho, c); return c; }
    private static double Scale(double[] rho) { double s = 0; foreach (var x in rho) s = Math.Max(s, Math.Abs(x)); return Math.Max(s, 1e-300); }

    [Fact]
    public void Of_Length64_EqualsDirectSum()
    {
        // Follows from the definition: the FFT and the defining sum must agree to rounding, 1e-12 relative.
        Prop.ForAll(Rho64, 401, 200, rho =>
        {
            var f = Modes(rho); var d = DirectModes(rho); double tol = 1e-12 * Scale(rho);
            for (int n = 0; n < f.Length; n++) Assert.True(Complex.Abs(f[n] - d[n]) <= tol, $"n={n}: FFT {f[n]} vs direct {d[n]}");
        });
    }

    [Fact]
    public void Of_RandomRho_SatisfiesParseval()
    {
        // Parseval for the DFT of real input (Oppenheim & Schafer): (1/M) sum rho_k^2 = sum_{n=0}^{M-1} |C_n|^2, and
        // C_{M-n} = conj(C_n) folds that onto n = 0..M/2: |C_0|^2 + 2 sum_{0<n<M/2} |C_n|^2 + |C_{M/2}|^2 (M even; for odd M
        // every n in 1..(M-1)/2 counts twice).
        Prop.ForAll(RhoAny, 402, 300, rho =>
        {
            int m = rho.Length; var c = Modes(rho);
            double lhs = 0; foreach (var x in rho) lhs += x * x; lhs /= m;
            double rhs = 0;
            for (int n = 0; n < c.Length; n++)
            {
                double w = n == 0 || (m % 2 == 0 && n == m / 2) ? 1 : 2;
                rhs += w * (c[n].Real * c[n].Real + c[n].Imaginary * c[n].Imaginary);
            }
            double s = Scale(rho);
            Assert.True(Math.Abs(lhs - rhs) <= 1e-12 * s * s, $"M={m}: mean rho^2 {lhs:R} vs sum |C_n|^2 {rhs:R}");
            if (m % 2 == 0) Assert.True(Math.Abs(c[m / 2].Imaginary) <= 1e-12 * s, "C_{M/2} of real input is real");
            Assert.True(Math.Abs(c[0].Imaginary) <= 1e-12 * s, "C_0 of real input is real");
        });
    }

    [Fact]
    public void Of_CyclicShift_MultipliesByPhase()
    {
        // Shift theorem (Oppenheim & Schafer): rho'_k = rho_{(k - s) mod M} gives C'_n = C_n exp(-2 pi i n s / M), so
        // |C_n| does not change.
        var gen = from rho in RhoAny from s in Gen.Int[0, 255] select (rho, s);
        Prop.ForAll(gen, 403, 300, t =>
        {
            int m = t.rho.Length, s = t.s % m;
            var shifted = new double[m];
            for (int k = 0; k < m; k++) shifted[k] = t.rho[((k - s) % m + m) % m];
            var c = Modes(t.rho); var c1 = Modes(shifted); double tol = 1e-12 * Scale(t.rho);
            for (int n = 0; n < c.Length; n++)
            {
                var expected = c[n] * Complex.FromPolarCoordinates(1, -2 * Math.PI * ((long)n * s % m) / m);
                Assert.True(Complex.Abs(c1[n] - expected) <= tol, $"M={m} s={s} n={n}: {c1[n]} vs {expected}");
                Assert.True(Math.Abs(Complex.Abs(c1[n]) - Complex.Abs(c[n])) <= tol, $"|C_{n}| changed under a shift");
            }
        });
    }

    [Fact]
    public void Of_LinearCombination_IsLinear()
    {
        // Linearity of the DFT (Oppenheim & Schafer): C(alpha x + beta y) = alpha C(x) + beta C(y).
        var gen = from x in RhoAny from y in Gen.Double[-100, 100].Array[x.Length]
                  from alpha in Gen.Double[-10, 10] from beta in Gen.Double[-10, 10] select (x, y, alpha, beta);
        Prop.ForAll(gen, 404, 300, t =>
        {
            int m = t.x.Length; var z = new double[m];
            for (int k = 0; k < m; k++) z[k] = t.alpha * t.x[k] + t.beta * t.y[k];
            var cx = Modes(t.x); var cy = Modes(t.y); var cz = Modes(z);
            double tol = 1e-12 * (Math.Abs(t.alpha) * Scale(t.x) + Math.Abs(t.beta) * Scale(t.y) + 1e-300);
            for (int n = 0; n < cz.Length; n++)
                Assert.True(Complex.Abs(cz[n] - (t.alpha * cx[n] + t.beta * cy[n])) <= tol, $"M={m} n={n}");
        });
    }

    [Fact]
    public void Of_ConstantRho_OnlyMeanMode()
    {
        // Follows from the definition: sum_k exp(-2 pi i n k / M) = 0 for 0 < n < M, so a constant r0 gives C_0 = r0 only.
        var gen = from m in Gen.Int[3, 256] from r0 in Gen.Double[0.5, 500] select (m, r0);
        Prop.ForAll(gen, 405, 200, t =>
        {
            var rho = new double[t.m]; Array.Fill(rho, t.r0);
            var c = Modes(rho);
            Assert.True(Complex.Abs(c[0] - t.r0) <= 1e-12 * t.r0, $"C_0 {c[0]} vs {t.r0}");
            for (int n = 1; n < c.Length; n++) Assert.True(Complex.Abs(c[n]) <= 1e-12 * t.r0, $"M={t.m}: C_{n} = {c[n]}");
        });
    }
}
