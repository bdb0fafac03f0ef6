using ShapeNoise.Motion;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Core.Tests.Synthesis;

public class PlaneWaveFlowTests(Xunit.Abstractions.ITestOutputHelper output)
{
    [Fact]
    public void Velocity_CentralDifferences_DivergenceFreeAndCurlOfStreamFunction()
    {
        // Vector calculus (any handbook): v = (dpsi/dy, -dpsi/dx) has div v = d2psi/dxdy - d2psi/dydx = 0. Checked numerically
        // with central differences of step e = 1e-3 px, whose truncation error is e^2/6 |f'''| ~ e^2 k^2 |v| / 6 ~ 1e-9 |v| here
        // and whose rounding error is ~1e-16 |psi| / e; the tolerance 1e-6 of k v_rms sits far above both and far below a
        // compressible field's divergence (order k v_rms).
        var f = PlaneWaveFlow.Create(32, 60, 10, 3, 5);
        double k = f.WavenumberPerPx, e = 1e-3;
        var rng = new Random(1);
        double maxDiv = 0, maxCurlErr = 0, ms = 0;
        for (int q = 0; q < 200; q++)
        {
            double x = rng.NextDouble() * 300, y = rng.NextDouble() * 300; int t = q % 3;
            var (vx, vy) = f.Velocity(t, x, y);
            ms += vx * vx + vy * vy;
            double div = (f.Velocity(t, x + e, y).Vx - f.Velocity(t, x - e, y).Vx + f.Velocity(t, x, y + e).Vy - f.Velocity(t, x, y - e).Vy) / (2 * e);
            maxDiv = Math.Max(maxDiv, Math.Abs(div));
            double dpsidy = (f.StreamFunction(t, x, y + e) - f.StreamFunction(t, x, y - e)) / (2 * e);
            double dpsidx = (f.StreamFunction(t, x + e, y) - f.StreamFunction(t, x - e, y)) / (2 * e);
            maxCurlErr = Math.Max(maxCurlErr, Math.Max(Math.Abs(vx - dpsidy), Math.Abs(vy + dpsidx)));
        }
        double rms = Math.Sqrt(ms / 200);
        Assert.True(maxDiv < 1e-6 * k * rms, $"max |div v| = {maxDiv:G3}, k v_rms = {k * rms:G3}");
        Assert.True(maxCurlErr < 1e-6 * rms, $"max |v - curl psi| = {maxCurlErr:G3}, v_rms = {rms:G3}");
    }

    [Fact]
    public void VelocityCorrelation_SingleWavenumberField_FollowsBesselJ0()
    {
        // Analytic: for plane waves of one wavenumber k the angle-averaged correlation of v is J0(kr) (the angle average of
        // cos(k e . r); J0 by its power series, Abramowitz and Stegun 9.1.10, first zero kr = 2.4048, their table 9.5).
        // Measured with the project's C_vv (docs/motion.md#velocity-correlation) on a 128^2 grid of spacing 2 px (4 wavelengths
        // a side), averaged over 4 frames 40 correlation times apart (independent phases). Tolerance 0.05 absolute (the
        // brief's 5 %): the finite domain and 32 waves leave cross terms between waves of a few percent.
        const int n = 128, bins = 40; const double h = 2, lambda = 64;
        var f = PlaneWaveFlow.Create(32, lambda, 0.025, 121, 9);
        double k = f.WavenumberPerPx;
        var mean = new double[bins]; double[] r = [];
        double zero = 0;
        int[] frames = [0, 40, 80, 120];
        foreach (int t in frames)
        {
            var (vx, vy) = f.OnGrid(t, n, n, h);
            var c = VelocityFieldStatistics.VelocityCorrelation(n, n, h, vx, vy, default, bins);
            for (int b = 0; b < bins; b++) mean[b] += c.C[b] / frames.Length;
            r = c.R;
            zero += VelocityFieldStatistics.FirstZero(c) / frames.Length;
        }
        double worst = 0;
        for (int b = 0; b < bins; b++) worst = Math.Max(worst, Math.Abs(mean[b] - Bessel.J0(k * r[b])));
        output.WriteLine($"largest |C - J0| = {worst:F4}, first zero kr = {k * zero:F4}");
        Assert.True(worst < 0.05, $"largest |C - J0| = {worst:F4}");
        Assert.InRange(k * zero, 2.4048 * 0.95, 2.4048 * 1.05);
    }
}
