using CsCheck;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Shape;

/// <summary>
/// Invariances of Polygon's area, perimeter and centroid on random star-shaped polygons (ShapeGen.Star) under random
/// motions (ShapeGen.Motion). Every property runs 200 seeded cases (Prop.ForAll). Tolerance 1e-9 relative throughout:
/// the sums run over at most 200 vertices with coordinates up to ~2000 px, so rounding stays near 1e-13 relative;
/// 1e-9 leaves room for that and nothing that a wrong formula could hide in.
/// </summary>
public class PolygonPropertyTests
{
    private const double Tol = 1e-9;
    private static readonly CsCheck.Gen<(StarPolygon s, Motion mo)> Cases =
        from s in ShapeGen.Star from mo in ShapeGen.Motion select (s, mo);

    [Fact]
    public void AreaPerimeter_TranslatedRotatedCycled_Unchanged()
    {
        // Follows from the definitions: shoelace area and edge-length sum are invariant under rigid motions (Euclidean
        // distances and oriented areas are preserved) and under relabelling the start vertex (the sums are cyclic).
        Prop.ForAll(Cases, 201, 200, t =>
        {
            var v = t.s.Vertices;
            double a = Polygon.SignedArea(v), p = Polygon.Perimeter(v);
            foreach (var (name, w) in new[] { ("translated", t.mo.Translate(v)), ("rotated", t.mo.Rotate(v)), ("cycled", t.mo.Cycle(v)) })
            {
                Prop.Close(Polygon.SignedArea(w), a, Tol, $"{name} signed area");
                Prop.Close(Polygon.Area(w), Math.Abs(a), Tol, $"{name} area");
                Prop.Close(Polygon.Perimeter(w), p, Tol, $"{name} perimeter");
            }
        });
    }

    [Fact]
    public void SignedArea_ReversedOrder_FlipsSign()
    {
        // Follows from the shoelace formula: reversing the vertex order negates every cross product x_i y_{i+1} - x_{i+1} y_i.
        Prop.ForAll(ShapeGen.Star, 202, 200, s =>
        {
            var r = (Point2[])s.Vertices.Clone();
            Array.Reverse(r);
            double a = Polygon.SignedArea(s.Vertices);
            Assert.True(a > 0);
            Prop.Close(Polygon.SignedArea(r), -a, Tol, "reversed signed area");
            Prop.Close(Polygon.Area(r), a, Tol, "reversed area");
            Prop.Close(Polygon.Perimeter(r), Polygon.Perimeter(s.Vertices), Tol, "reversed perimeter");
        });
    }

    [Fact]
    public void AreaPerimeter_Scaled_ScaleByKSquaredAndK()
    {
        // Follows from the definitions (dimensional analysis): lengths scale by k, areas by k^2 under x -> k x.
        Prop.ForAll(Cases, 203, 200, t =>
        {
            var v = t.s.Vertices; var w = t.mo.ScaleAbout(v); double k = t.mo.Scale;
            Prop.Close(Polygon.Area(w), k * k * Polygon.Area(v), Tol, "scaled area");
            Prop.Close(Polygon.Perimeter(w), k * Polygon.Perimeter(v), Tol, "scaled perimeter");
        });
    }

    [Fact]
    public void Centroid_RigidMotion_MovesWithTheShape()
    {
        // Follows from the definition c = (1/A) integral r dA: translation adds the shift, rotation rotates c about the
        // pivot, a cyclic relabelling leaves it alone. Absolute tolerance 1e-9 px (coordinates up to ~2000 px).
        Prop.ForAll(Cases, 204, 200, t =>
        {
            var v = t.s.Vertices;
            var c = Polygon.Centroid(v);
            var ct = Polygon.Centroid(t.mo.Translate(v));
            Prop.Close(ct.X, c.X + t.mo.Shift.X, Tol, "translated cx");
            Prop.Close(ct.Y, c.Y + t.mo.Shift.Y, Tol, "translated cy");
            var cr = Polygon.Centroid(t.mo.Rotate(v)); var e = t.mo.Apply(c);
            Prop.Close(cr.X, e.X, Tol, "rotated cx");
            Prop.Close(cr.Y, e.Y, Tol, "rotated cy");
            var cc = Polygon.Centroid(t.mo.Cycle(v));
            Prop.Close(cc.X, c.X, Tol, "cycled cx");
            Prop.Close(cc.Y, c.Y, Tol, "cycled cy");
            // The polygon's centroid and ShapeTensor's (computed about a different local origin) must agree.
            var st = ShapeTensor.Of(v).Centroid;
            Prop.Close(st.X, c.X, Tol, "tensor cx");
            Prop.Close(st.Y, c.Y, Tol, "tensor cy");
        });
    }
}
