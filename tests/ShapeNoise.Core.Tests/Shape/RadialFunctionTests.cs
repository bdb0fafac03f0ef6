using System.Numerics;
using ShapeNoise.Shape;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Shape;

public class RadialFunctionTests
{
    [Fact]
    public void Sample_EllipsePolygon_MatchesAnalyticRadialFunction()
    {
        // Handbook polar form of an ellipse about its centre: r(phi) = a b / sqrt(b^2 cos^2 phi + a^2 sin^2 phi).
        double a = 14, b = 9, theta = 0.35;
        var poly = Raster.EllipsePolygon(4000, 40, 30, a, b, theta);
        var rho = new double[64];
        bool star = RadialFunction.Sample(poly, new Point2(40, 30), theta, rho);
        Assert.True(star);
        for (int k = 0; k < 64; k++)
        {
            double expected = RadialFunction.Ellipse(a, b, 2 * Math.PI * k / 64);
            // Chord sag of a 4000-gon: at most a (1 - cos(pi/N)) ~ 4e-6 px.
            Assert.True(Math.Abs(rho[k] - expected) < 1e-4, $"k={k}: {rho[k]} vs {expected}");
        }
    }

    [Fact]
    public void Modes_NearlyCircularEllipse_C2MatchesFirstOrderExpansion()
    {
        // a = R(1+e), b = R(1-e): r(phi) = R (1 + e cos 2phi) + O(e^2 R), so C_2 = R e / 2 = (a - b) / 4 to first order.
        double R = 10, e = 0.01, a = R * (1 + e), b = R * (1 - e);
        var poly = Raster.EllipsePolygon(4000, 0, 0, a, b, 0);
        var rho = new double[64];
        RadialFunction.Sample(poly, new Point2(0, 0), 0, rho);
        var modes = new Complex[33];
        FourierModes.Of(rho, modes);
        Assert.True(Math.Abs(modes[2].Real - (a - b) / 4) < 2 * R * e * e, $"C2 {modes[2]} vs {(a - b) / 4}");
        Assert.True(Math.Abs(modes[2].Imaginary) < 1e-6);
        Assert.True(Math.Abs(modes[0].Real - R) < 2 * R * e * e);   // C_0 = mean radius
    }

    [Fact]
    public void Sample_Concave_ReportsNotStarShaped()
    {
        // A U-shape seen from a centre inside its bottom bar: rays up through the gap cross the outline more than once.
        Point2[] u = [new(0, 0), new(10, 0), new(10, 10), new(7, 10), new(7, 3), new(3, 3), new(3, 10), new(0, 10)];
        var rho = new double[32];
        Assert.False(RadialFunction.Sample(u, new Point2(5, 1.5), 0, rho));
    }

    [Fact]
    public void BodyFrame_RotatedAndTranslatedShape_SameSamples()
    {
        // Rotation invariance of the body frame: rays cast from the long axis see the same rho(psi) after a rigid motion.
        var baseShape = Raster.EllipsePolygon(720, 0, 0, 13, 8, 0).Select((p, i) =>
        {
            double t = 2 * Math.PI * i / 720, bump = 1 + 0.08 * Math.Cos(3 * t);   // non-symmetric outline
            return new Point2(p.X * bump, p.Y * bump);
        }).ToArray();
        double[] Body(Point2[] poly)
        {
            var m = ShapeMeasures.Of(poly);
            var r = new double[64];
            RadialFunction.Sample(poly, new Point2(m.CentroidX, m.CentroidY), m.ThetaRad, r);
            return r;
        }
        var r0 = Body(baseShape);
        double al = 1.1, c = Math.Cos(al), s = Math.Sin(al);
        var moved = baseShape.Select(p => new Point2(p.X * c - p.Y * s + 77.7, p.X * s + p.Y * c + 12.3)).ToArray();
        var r1 = Body(moved);
        // theta is defined modulo pi: allow the body frame to differ by half a turn (a shift of M/2 samples).
        double d0 = 0, d1 = 0;
        for (int k = 0; k < 64; k++) { d0 = Math.Max(d0, Math.Abs(r0[k] - r1[k])); d1 = Math.Max(d1, Math.Abs(r0[k] - r1[(k + 32) % 64])); }
        Assert.True(Math.Min(d0, d1) < 1e-9, $"max difference {Math.Min(d0, d1)} r0 {string.Join(",", r0.Take(8))} r1 {string.Join(",", r1.Take(8))} th0 {ShapeMeasures.Of(baseShape).ThetaRad} th1 {ShapeMeasures.Of(moved).ThetaRad}");
    }
}
