using ShapeNoise.Motion;

namespace ShapeNoise.Core.Tests.Motion;

public class FieldCorrelationTests
{
    /// <summary>The definition itself, pair by pair: sums of a a' + b b' and of kept pairs over every ordered pair of kept
    /// nodes, binned by round(|d|) (docs/motion.md#velocity-correlation).</summary>
    static (double[] Sum, double[] Pairs) PairByPair(int nx, int ny, double[] a, double[]? b, double[] keep, int bins)
    {
        var sum = new double[bins]; var pairs = new double[bins];
        for (int k1 = 0; k1 < nx * ny; k1++)
            for (int k2 = 0; k2 < nx * ny; k2++)
            {
                if (keep[k1] == 0 || keep[k2] == 0) continue;
                int dx = k2 % nx - k1 % nx, dy = k2 / nx - k1 / nx;
                int bin = (int)Math.Round(Math.Sqrt(dx * dx + dy * dy));
                if (bin >= bins || Math.Abs(dx) >= bins || Math.Abs(dy) >= bins) continue;
                sum[bin] += a[k1] * a[k2] + (b is null ? 0 : b[k1] * b[k2]);
                pairs[bin]++;
            }
        return (sum, pairs);
    }

    [Theory]
    [InlineData(13, 9, true)]
    [InlineData(16, 16, false)]
    public void Of_RandomMaskedField_EqualsPairByPairSums(int nx, int ny, bool vector)
    {
        // Reference: the defining double sum over node pairs (no transform); the FFT route must give the same sums up to
        // rounding (Wiener-Khinchin with zero padding, Press et al. 2007, Numerical Recipes section 13.2).
        var rng = new Random(7);
        int n = nx * ny, bins = Math.Min(nx, ny) / 2 + 1;
        var a = new double[n]; var b = new double[n]; var keep = new double[n];
        for (int k = 0; k < n; k++)
        {
            keep[k] = rng.NextDouble() < 0.8 ? 1 : 0;
            if (keep[k] > 0) { a[k] = rng.NextDouble() - 0.3; b[k] = rng.NextDouble() - 0.6; }
        }
        var fft = FieldCorrelation.Of(nx, ny, 2.0, a, vector ? b : null, keep, bins);
        var (sum, pairs) = PairByPair(nx, ny, a, vector ? b : null, keep, bins);
        for (int i = 0; i < bins; i++)
        {
            Assert.Equal(pairs[i], fft.Pairs[i]);                   // integer counts, exact after rounding
            Assert.Equal(sum[i], fft.Sum[i], 1e-9 * (1 + Math.Abs(sum[i]) + pairs[i])); // rounding of the transforms only
        }
    }

    [Fact]
    public void Of_IsotropicSingleWavenumberFlow_FollowsBesselJ0()
    {
        // Analytic case: an isotropic incompressible flow of one wavenumber k has C_vv(r) = J0(kr), first zero kr = 2.4048
        // (Abramowitz and Stegun, Handbook of Mathematical Functions, table 9.5); the same flow as the direct-sum test.
        const int n = 128, modes = 128, bins = 60;
        const double h = 1.0, k = 0.15;
        var rng = new Random(3);
        var t = new double[modes]; var p = new double[modes];
        for (int m = 0; m < modes; m++) { t[m] = rng.NextDouble() * 2 * Math.PI; p[m] = rng.NextDouble() * 2 * Math.PI; }
        var vx = new double[n * n]; var vy = new double[n * n]; var keep = new double[n * n];
        for (int j = 0; j < n; j++)
            for (int i = 0; i < n; i++)
            {
                for (int m = 0; m < modes; m++)
                {
                    double s = Math.Sin(k * (Math.Cos(t[m]) * i * h + Math.Sin(t[m]) * j * h) + p[m]);
                    vx[j * n + i] += -k * s * Math.Sin(t[m]); vy[j * n + i] += k * s * Math.Cos(t[m]);
                }
                keep[j * n + i] = 1;
            }
        var c = FieldCorrelation.Of(n, n, h, vx, vy, keep, bins).Normalised(h);
        // Tolerance 0.06 absolute: one realisation of 128 modes on a domain of 3 wavelengths leaves cross terms of a few percent.
        for (int b = 0; b < 30; b++) Assert.True(Math.Abs(c.C[b] - VelocityFieldStatisticsTests.J0(k * c.R[b])) < 0.06, $"r={c.R[b]:F1} C={c.C[b]:F3}");
        Assert.InRange(k * VelocityFieldStatistics.FirstZero(c), 2.4048 * 0.95, 2.4048 * 1.05);
    }
}
