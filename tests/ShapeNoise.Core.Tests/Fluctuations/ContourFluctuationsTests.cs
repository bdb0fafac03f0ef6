using ShapeNoise.Fluctuations;

namespace ShapeNoise.Tests.Fluctuations;

public class ContourFluctuationsTests
{
    [Fact]
    public void Of_WhiteNoiseOnCircle_FloorEqualsNoiseByParseval()
    {
        // White noise of variance s^2 per sample gives E|C_n|^2 = s^2 / M for this normalisation (Parseval), so the
        // floor M f recovers s^2 and the floor-corrected variances vanish. Tolerance: 4000 frames x 16 modes, median of
        // averages over 4000 frames, ~2% sampling error.
        const int m = 64, T = 4000; const double R = 10, s = 0.3;
        var rng = new Random(4);
        var rho = new double[T * m];
        for (int i = 0; i < rho.Length; i++) rho[i] = R + s * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
        var c = ContourFluctuations.Of(rho, T, m);
        Assert.InRange(c.VarAlongRaw / (s * s), 0.97, 1.03);
        Assert.InRange(c.VarAcrossRaw / (s * s), 0.97, 1.03);
        // p_n averages T frames, so it concentrates at s^2 / M and its median over modes M/4..M/2 does too.
        Assert.InRange(m * c.FloorPerMode / (s * s), 0.95, 1.05);
        Assert.InRange(c.VarAlong / (s * s), -0.05, 0.05);
        Assert.InRange(c.VarAcross / (s * s), -0.05, 0.05);
    }

    [Fact]
    public void Of_PoleOnlyDeformation_SplitsByNormalSector()
    {
        // rho = R + x(t) cos^2(psi) with x = +-1: the mean shape is a circle (normal = ray), and sector means of cos^4 are
        // (2/pi) int cos^4 over |psi| < 45deg = 3/8 + 1/pi (poles) and 3/8 - 1/pi (flanks) (calculus).
        const int m = 64, T = 40; const double R = 10;
        var rho = new double[T * m];
        for (int t = 0; t < T; t++)
            for (int k = 0; k < m; k++)
            {
                double psi = 2 * Math.PI * k / m, c = Math.Cos(psi);
                rho[t * m + k] = R + (t % 2 == 0 ? 1 : -1) * c * c;
            }
        var f = ContourFluctuations.Of(rho, T, m);
        Assert.Equal(3.0 / 8 + 1 / Math.PI, f.VarAlongRaw, 2);
        Assert.Equal(3.0 / 8 - 1 / Math.PI, f.VarAcrossRaw, 2);
        Assert.Equal(0.0, f.FloorPerMode, 12);    // the deformation lives in modes 0 and 2 only
    }

    [Fact]
    public void Of_EllipseFlankFluctuation_AssignedToAcross()
    {
        // Elongated mean shape whose width (b) fluctuates: the flank sector must carry most of the variance even though
        // most rays within 45 degrees of the long axis meet the flanks.
        const int m = 64, T = 20;
        var rho = new double[T * m];
        for (int t = 0; t < T; t++)
        {
            double b = 6 + (t % 2 == 0 ? 0.5 : -0.5);
            for (int k = 0; k < m; k++) rho[t * m + k] = ShapeNoise.Shape.RadialFunction.Ellipse(20, b, 2 * Math.PI * k / m);
        }
        var f = ContourFluctuations.Of(rho, T, m);
        Assert.True(f.VarAcrossRaw > 10 * f.VarAlongRaw, $"across {f.VarAcrossRaw}, along {f.VarAlongRaw}");
        Assert.InRange(f.VarAcrossRaw, 0.15, 0.25);   // flank displacement is at most +-0.5 px (at psi = 90 deg)
    }
}
