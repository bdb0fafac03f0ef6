using ShapeNoise.Shape;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Shape;

public class PolygonTests
{
    // Hand-computed with the shoelace formula (common practice; any surveying handbook):
    // L-shape (0,0) (4,0) (4,1) (1,1) (1,3) (0,3): a 4x1 bar plus a 1x2 bar = area 6;
    // centroid = (4*(2, 0.5) + 2*(0.5, 2)) / 6 = (9/6, 6/6) = (1.5, 1.0); perimeter 4+1+3+2+1+3 = 14.
    private static readonly Point2[] LShape = [new(0, 0), new(4, 0), new(4, 1), new(1, 1), new(1, 3), new(0, 3)];

    [Fact]
    public void Area_LShape_MatchesHandComputedShoelace() => Assert.Equal(6.0, Polygon.Area(LShape), 12);

    [Fact]
    public void Centroid_LShape_MatchesHandComputedValue()
    {
        var c = Polygon.Centroid(LShape);
        Assert.Equal(1.5, c.X, 12);
        Assert.Equal(1.0, c.Y, 12);
    }

    [Fact]
    public void Perimeter_LShape_MatchesHandSum() => Assert.Equal(14.0, Polygon.Perimeter(LShape), 12);

    [Fact]
    public void SignedArea_ReversedOrder_ChangesSignOnly()
    {
        var rev = LShape.Reverse().ToArray();
        Assert.Equal(-Polygon.SignedArea(LShape), Polygon.SignedArea(rev), 12);
        Assert.Equal(Polygon.Centroid(LShape), Polygon.Centroid(rev));
    }

    [Fact]
    public void Centroid_FarFromOrigin_KeepsPrecision()
    {
        // Translation invariance: the same L-shape 1e6 px away keeps its centroid offset to 1e-6 px.
        var far = LShape.Select(p => new Point2(p.X + 1e6, p.Y + 2e6)).ToArray();
        var c = Polygon.Centroid(far);
        Assert.Equal(1e6 + 1.5, c.X, 6);
        Assert.Equal(2e6 + 1.0, c.Y, 6);
        Assert.Equal(6.0, Polygon.Area(far), 6);
    }

    [Fact]
    public void Area_Ellipse4000Vertices_MatchesPiAB()
    {
        // Handbook: ellipse area pi a b. Inscribed N-gon: (N/2) a b sin(2 pi / N), relative deficit ~ (2 pi/N)^2 / 6 = 4e-7.
        var p = Raster.EllipsePolygon(4000, 10, 20, 14, 9, 0.4);
        Assert.True(Math.Abs(Polygon.Area(p) / (Math.PI * 14 * 9) - 1) < 1e-6);
    }
}
