using ShapeNoise.Motion;
using ShapeNoise.Nematic;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Core.Tests.Motion;

public class VelocityFieldStatisticsTests
{
    const int N = 32;

    static (double[] Vx, double[] Vy) Field(int nx, int ny, Func<double, double, (double, double)> v)
    {
        var vx = new double[nx * ny]; var vy = new double[nx * ny];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++) (vx[j * nx + i], vy[j * nx + i]) = v(i, j);
        return (vx, vy);
    }

    [Fact]
    public void UniformField_OrderOneNoFluctuationNoVorticity()
    {
        // Analytic case (Vicsek et al. 1995, Phys. Rev. Lett. 75:1226): all velocities equal gives phi = |N v| / (N |v|) = 1.
        var (vx, vy) = Field(N, N, (_, _) => (0.75, -0.5));
        Assert.Equal(1.0, VelocityFieldStatistics.PolarOrder(vx, vy), 12); // rounding only
        Assert.Equal(0.0, VelocityFieldStatistics.RmsSpeed(vx, vy)); // v - <v> = 0 exactly: the mean of equal doubles is that double
        Assert.All(VelocityFieldStatistics.Vorticity(N, N, 2.0, vx, vy), w => Assert.Equal(0.0, w));
        Assert.Equal(Math.Sqrt(0.75 * 0.75 + 0.25), VelocityFieldStatistics.MeanSpeed(vx, vy), 12);
    }

    [Fact]
    public void SolidBodyRotation_VorticityTwiceOmegaAndNoPolarOrder()
    {
        // Analytic case (any vector-calculus handbook, common practice): v = Omega x r, vx = -Omega y, vy = Omega x has
        // curl 2 Omega; central and one-sided differences are exact on a linear field.
        const double omega = 0.03, h = 1.5;
        double c = (N - 1) / 2.0;
        var (vx, vy) = Field(N, N, (i, j) => (-omega * (j - c) * h, omega * (i - c) * h));
        Assert.All(VelocityFieldStatistics.Vorticity(N, N, h, vx, vy), w => Assert.Equal(2 * omega, w, 12)); // rounding only
        Assert.Equal(2 * omega * omega, VelocityFieldStatistics.Enstrophy(VelocityFieldStatistics.Vorticity(N, N, h, vx, vy)), 12);
        // Centred grid: sum v = 0 by symmetry, so phi = 0 up to rounding.
        Assert.True(VelocityFieldStatistics.PolarOrder(vx, vy) < 1e-12);
    }

    /// <summary>J0 by its power series (Abramowitz and Stegun 9.1.10), shared with the synthesis tests.</summary>
    internal static double J0(double x) => Bessel.J0(x);

    [Fact]
    public void J0Series_MatchesTable()
    {
        // Abramowitz and Stegun table 9.1 (from memory): J0(1) = 0.7651976866, J0(2.404825557695773) = 0 (table 9.5).
        Assert.Equal(0.7651976866, J0(1), 9);
        Assert.Equal(0, J0(2.404825557695773), 12);
    }

    [Fact]
    public void VelocityCorrelation_IsotropicSingleWavenumberFlow_FollowsBesselJ0()
    {
        // Analytic case: an isotropic incompressible flow with one wavenumber k has C_vv(r) = J0(kr) (the angle average of
        // cos(k n . r)); its first zero is kr = 2.4048 (Abramowitz and Stegun, Handbook of Mathematical Functions, table 9.5).
        const int n = 256, modes = 128, bins = 44;
        const double h = 1.0, k = 0.1; // k h = 0.1: wavelength 63 nodes, domain 4 wavelengths
        var meanC = new double[bins]; var r = new double[bins];
        double zeroSum = 0;
        var seeds = new[] { 1, 2, 3 };
        foreach (int seed in seeds)
        {
            var rng = new Random(seed);
            var t = new double[modes]; var p = new double[modes];
            for (int m = 0; m < modes; m++) { t[m] = rng.NextDouble() * 2 * Math.PI; p[m] = rng.NextDouble() * 2 * Math.PI; }
            var (vx, vy) = Field(n, n, (i, j) =>
            {
                double sx = 0, sy = 0;
                for (int m = 0; m < modes; m++)
                {
                    double s = Math.Sin(k * (Math.Cos(t[m]) * i * h + Math.Sin(t[m]) * j * h) + p[m]);
                    sx += -k * s * Math.Sin(t[m]); sy += k * s * Math.Cos(t[m]); // v = (dpsi/dy, -dpsi/dx), psi = sum cos(...)
                }
                return (sx, sy);
            });
            var c = VelocityFieldStatistics.VelocityCorrelation(n, n, h, vx, vy, default, bins);
            for (int b = 0; b < bins; b++) { meanC[b] += c.C[b] / seeds.Length; r[b] = c.R[b]; }
            zeroSum += VelocityFieldStatistics.FirstZero(c) / seeds.Length;
        }
        // Tolerance 0.05 absolute (the brief's 5%): finite domain and mode count leave cross terms of a few percent.
        for (int b = 0; b < bins; b++) Assert.True(Math.Abs(meanC[b] - J0(k * r[b])) < 0.05, $"r={r[b]:F1} C={meanC[b]:F3} J0={J0(k * r[b]):F3}");
        Assert.InRange(k * zeroSum, 2.4048 * 0.95, 2.4048 * 1.05);
        Assert.Equal(1.0, meanC[0], 12); // zero lag is the normalisation
    }

    [Fact]
    public void NematicCorrelation_UniformDirector_OneAtAllDistancesAndImposedOrder()
    {
        // Analytic case: a uniform Q has Q(x) : Q(x + r) = Q : Q for every r (Doostmohammadi et al. 2018, Nat. Commun.).
        var g = NematicGrid.FromDirector(N, N, 2.0, (_, _) => 0.4, order: 0.6);
        var c = VelocityFieldStatistics.NematicCorrelation(N, N, 2.0, g.Qxx, g.Qxy, default, 10);
        Assert.All(c.C, v => Assert.Equal(1.0, v, 12)); // rounding only
        Assert.Equal(0.6, VelocityFieldStatistics.MeanOrder(g.Qxx, g.Qxy), 12);
    }

    [Fact]
    public void Crossings_LinearCurve_InterpolatedExactly()
    {
        // Hand-computed: C = 1 - r/4 at r = 0..5 crosses 0 at r = 4 and 1/e at 4 (1 - 1/e); the series 1, 0.5, 0.2 crosses 1/e at lag 1 + (0.5 - 1/e)/0.3.
        var rc = new RadialCorrelation([0, 1, 2, 3, 4, 5], [1, 0.75, 0.5, 0.25, 0, -0.25], [1, 4, 4, 4, 4, 4]);
        Assert.Equal(4.0, VelocityFieldStatistics.FirstZero(rc), 12);
        Assert.Equal(4 * (1 - 1 / Math.E), VelocityFieldStatistics.CrossingOf(rc, 1 / Math.E), 12);
        Assert.Equal(1 + (0.5 - 1 / Math.E) / 0.3, VelocityFieldStatistics.AutocorrelationTime([1, 0.5, 0.2]), 12);
        Assert.True(double.IsNaN(VelocityFieldStatistics.AutocorrelationTime([1, 0.9, 0.8])));
    }

    [Fact]
    public void VorticityCorrelation_ZeroLagIsOneAndMaskIgnoresNodes()
    {
        // Definition: C(0) = <dw^2>/<dw^2> = 1; masking half the grid keeps only its pairs (hand count for the zero bin).
        var w = new double[N * N]; var mask = new bool[N * N];
        for (int q = 0; q < w.Length; q++) { w[q] = Math.Sin(0.3 * q); mask[q] = q < w.Length / 2; }
        var c = VelocityFieldStatistics.VorticityCorrelation(N, N, 1.0, w, mask, 5);
        Assert.Equal(1.0, c.C[0], 12);
        Assert.Equal(N * N / 2, c.Pairs[0]);
    }
}
