using ShapeNoise.Shape;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Shape;

public class ShapeTensorTests
{
    // Handbook: second moment of area of an ellipse about its major axis I = pi a b^3 / 4 and about the minor axis
    // pi a^3 b / 4 (e.g. Roark's Formulas for Stress and Strain, table of section properties); divided by the area pi a b:
    // l1 = a^2/4 (spread along the major axis), l2 = b^2/4.
    [Theory]
    [InlineData(14, 9, 0.0)]
    [InlineData(14, 9, 0.7)]
    [InlineData(30, 5, -1.2)]
    public void Of_Ellipse4000Vertices_MatchesHandbookSecondMoments(double a, double b, double theta)
    {
        var s = ShapeTensor.Of(Raster.EllipsePolygon(4000, 123.4, 56.7, a, b, theta));
        // 4000 vertices: inscribed-polygon deficit (1 - cos(2 pi / N)) / 3 = 4.1e-7 < 1e-6.
        Assert.True(Math.Abs(s.L1 / (a * a / 4) - 1) < 1e-6, $"l1 {s.L1} vs {a * a / 4}");
        Assert.True(Math.Abs(s.L2 / (b * b / 4) - 1) < 1e-6, $"l2 {s.L2} vs {b * b / 4}");
        double dTheta = Math.IEEERemainder(s.ThetaRad - theta, Math.PI);
        Assert.True(Math.Abs(dTheta) < 1e-9);
        Assert.Equal(123.4, s.Centroid.X, 9);
        Assert.Equal(56.7, s.Centroid.Y, 9);
    }

    [Fact]
    public void Of_Ellipse2000Vertices_EqualsExactInscribedPolygonMoments()
    {
        // The 2000-vertex inscribed polygon is the affine image of a regular 2000-gon, whose normalised second moment is
        // (2 + cos(2 pi/N)) / 12 R^2 per axis (exact, from summing its triangles). The closed form must reproduce it to
        // rounding; its distance from the handbook a^2/4 is the discretisation (1 - cos(2 pi/N))/3 = 1.6e-6.
        const int n = 2000; double a = 14, b = 9;
        var s = ShapeTensor.Of(Raster.EllipsePolygon(n, 3, 4, a, b, 0.3));
        double k = (2 + Math.Cos(2 * Math.PI / n)) / 12;
        Assert.True(Math.Abs(s.L1 / (a * a * k) - 1) < 1e-10);
        Assert.True(Math.Abs(s.L2 / (b * b * k) - 1) < 1e-10);
        Assert.True(Math.Abs(s.L1 / (a * a / 4) - 1) < 2e-6);
    }

    [Fact]
    public void Measures_Ellipse_GiveLengthWidthElongation()
    {
        double a = 14, b = 9;
        var m = ShapeMeasures.Of(Raster.EllipsePolygon(4000, 0, 0, a, b, 0.2));
        Assert.Equal(2 * a, m.LengthPx, 4);      // L = 4 sqrt(a^2/4) = 2a
        Assert.Equal(2 * b, m.WidthPx, 4);
        Assert.Equal(a / b, m.AspectRatio, 5);
        Assert.Equal((a - b) / (a + b), m.Elongation, 6);
    }

    [Fact]
    public void Of_Rotated_TensorRotatesAndEigenvaluesStay()
    {
        var p = Raster.EllipsePolygon(500, 0, 0, 12, 7, 0.1);
        var s0 = ShapeTensor.Of(p);
        double al = 0.9, c = Math.Cos(al), sn = Math.Sin(al);
        var s1 = ShapeTensor.Of(p.Select(q => new Point2(q.X * c - q.Y * sn + 50, q.X * sn + q.Y * c - 20)).ToArray());
        Assert.Equal(s0.L1, s1.L1, 9);
        Assert.Equal(s0.L2, s1.L2, 9);
        Assert.Equal(0.0, Math.IEEERemainder(s1.ThetaRad - s0.ThetaRad - al, Math.PI), 9);
    }
}
