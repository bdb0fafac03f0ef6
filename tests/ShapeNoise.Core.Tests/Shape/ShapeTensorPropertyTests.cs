using CsCheck;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Shape;

/// <summary>
/// Invariances of ShapeTensor.Of on random star polygons and ellipses. Rounding tolerance 1e-9 relative to l1 (sums of
/// at most 200 vertex products, computed about the vertex mean); the dense-ellipse check derives its own tolerance.
/// </summary>
public class ShapeTensorPropertyTests
{
    private static readonly CsCheck.Gen<(StarPolygon s, Motion mo)> Cases =
        from s in ShapeGen.Star from mo in ShapeGen.Motion select (s, mo);

    [Fact]
    public void Of_TranslatedRotatedCycled_EigenvaluesUnchanged()
    {
        // Follows from the definition S = (1/A) integral (r - c)(r - c)^T dA: a translation leaves r - c alone, a rotation
        // conjugates S by R (same eigenvalues), and the vertex labelling does not enter the integral.
        Prop.ForAll(Cases, 301, 200, t =>
        {
            var v = t.s.Vertices; var s0 = ShapeTensor.Of(v);
            double tol = 1e-9 * s0.L1;
            foreach (var (name, w) in new[] { ("translated", t.mo.Translate(v)), ("rotated", t.mo.Rotate(v)), ("cycled", t.mo.Cycle(v)) })
            {
                var s1 = ShapeTensor.Of(w);
                Assert.True(Math.Abs(s1.L1 - s0.L1) <= tol, $"{name} l1 {s1.L1:R} vs {s0.L1:R}");
                Assert.True(Math.Abs(s1.L2 - s0.L2) <= tol, $"{name} l2 {s1.L2:R} vs {s0.L2:R}");
                Prop.Close(s1.AreaPx2, s0.AreaPx2, 1e-9, $"{name} area");
            }
            var sc = ShapeTensor.Of(t.mo.Cycle(v));
            Assert.True(Math.Abs(sc.Sxx - s0.Sxx) <= tol && Math.Abs(sc.Sxy - s0.Sxy) <= tol && Math.Abs(sc.Syy - s0.Syy) <= tol, "cycled tensor components");
        });
    }

    [Fact]
    public void ThetaRad_Rotated_TurnsByTheAngleModuloPi()
    {
        // Follows from S' = R S R^T: the eigenvectors turn with R; the axis is a line, so theta is defined modulo pi.
        // Only outlines with a defined long axis, (l1 - l2)/(l1 + l2) > 1e-3: there the angle's rounding error is about
        // 1e-13 / 1e-3 = 1e-10 rad, inside the 1e-8 rad allowed.
        var gen = from s in ShapeGen.Star.Where(s => ShapePropertyTests.Anisotropy(s.Vertices) > 1e-3) from mo in ShapeGen.Motion select (s, mo);
        Prop.ForAll(gen, 302, 200, t =>
        {
            var s0 = ShapeTensor.Of(t.s.Vertices); var s1 = ShapeTensor.Of(t.mo.Rotate(t.s.Vertices));
            double d = Math.IEEERemainder(s1.ThetaRad - s0.ThetaRad - t.mo.AlphaRad, Math.PI);
            Assert.True(Math.Abs(d) < 1e-8, $"theta {s0.ThetaRad:R} -> {s1.ThetaRad:R}, rotation {t.mo.AlphaRad:R}");
            Assert.InRange(s1.ThetaRad, -Math.PI / 2, Math.PI / 2);
        });
    }

    [Fact]
    public void Of_Scaled_EigenvaluesScaleByKSquared()
    {
        // Follows from the definition: S has units of length^2, so x -> k x multiplies S (and l1, l2) by k^2.
        Prop.ForAll(Cases, 303, 200, t =>
        {
            var s0 = ShapeTensor.Of(t.s.Vertices); var s1 = ShapeTensor.Of(t.mo.ScaleAbout(t.s.Vertices));
            double k2 = t.mo.Scale * t.mo.Scale;
            Assert.True(Math.Abs(s1.L1 - k2 * s0.L1) <= 1e-9 * k2 * s0.L1, $"l1 {s1.L1:R} vs k^2 {k2 * s0.L1:R}");
            Assert.True(Math.Abs(s1.L2 - k2 * s0.L2) <= 1e-9 * k2 * s0.L1, $"l2 {s1.L2:R} vs k^2 {k2 * s0.L2:R}");
        });
    }

    [Fact]
    public void Of_DenseEllipse_MatchesHandbookSecondMoments()
    {
        // Handbook: second moments of area of a uniform ellipse about its axes, pi a^3 b / 4 and pi a b^3 / 4 (e.g. Roark's
        // Formulas for Stress and Strain, section properties; from memory), divided by the area pi a b: l1 = a^2/4, l2 = b^2/4.
        // Tolerance, derived: the N-vertex polygon inscribed at equal parameter steps is the affine image of the regular
        // N-gon inscribed in the unit circle, whose normalised second moment is (2 + cos(2 pi/N))/12 per axis (sum over its
        // N isosceles triangles) against 1/4 for the disc. The affine map scales both by a^2 (or b^2) alike, so
        // l1 = a^2/4 (1 - d) exactly with d = (1 - cos(2 pi/N))/3 = 4.1e-7 at N = 4000; on top of that rounding, 1e-9.
        const int n = 4000;
        double d = (1 - Math.Cos(2 * Math.PI / n)) / 3;
        Prop.ForAll(ShapeGen.Ellipse, 304, 40, e =>
        {
            var s = ShapeTensor.Of(e.Polygon(n));
            double l1 = e.A * e.A / 4, l2 = e.B * e.B / 4;
            Assert.True(Math.Abs(s.L1 - l1) <= (d + 1e-9) * l1, $"l1 {s.L1:R} vs a^2/4 {l1:R}");
            Assert.True(Math.Abs(s.L2 - l2) <= (d + 1e-9) * l1, $"l2 {s.L2:R} vs b^2/4 {l2:R}");
            Assert.True(s.L1 <= l1 * (1 + 1e-9), "an inscribed polygon cannot exceed the ellipse's second moment");
            Prop.Close(s.Centroid.X, e.Centre.X, 1e-9, "cx");
            Prop.Close(s.Centroid.Y, e.Centre.Y, 1e-9, "cy");
            Prop.Close(s.AreaPx2, Math.PI * e.A * e.B * Math.Sin(2 * Math.PI / n) / (2 * Math.PI / n), 1e-9, "area of the inscribed polygon (N/2) a b sin(2 pi/N)");
            if (e.A > 1.01 * e.B)
            {
                double dt = Math.IEEERemainder(s.ThetaRad - e.ThetaRad, Math.PI);
                Assert.True(Math.Abs(dt) < 1e-9, $"theta {s.ThetaRad:R} vs {e.ThetaRad:R}");
            }
        });
    }

    [Fact]
    public void Of_FanSplit_CombinesByParallelAxisTheorem()
    {
        // Handbook: parallel-axis (Huygens-Steiner) theorem. Splitting a star polygon along two rays from its centre gives
        // two simple polygons with A = A1 + A2, A c = A1 c1 + A2 c2 and
        // A (S + c c^T) = A1 (S1 + c1 c1^T) + A2 (S2 + c2 c2^T) (second moments about one origin add).
        var gen = from s in ShapeGen.Star from j in CsCheck.Gen.Int[2, 1000] select (s, j);
        Prop.ForAll(gen, 305, 200, t =>
        {
            var v = t.s.Vertices; int n = v.Length, j = 2 + t.j % (n - 3);   // 2 <= j <= n-2: both pieces have area
            var p1 = new Point2[j + 2]; p1[0] = t.s.Centre; for (int i = 0; i <= j; i++) p1[i + 1] = v[i];
            var p2 = new Point2[n - j + 2]; p2[0] = t.s.Centre; for (int i = j; i <= n; i++) p2[i - j + 1] = v[i % n];
            var s = ShapeTensor.Of(v); var s1 = ShapeTensor.Of(p1); var s2 = ShapeTensor.Of(p2);
            Prop.Close(s1.AreaPx2 + s2.AreaPx2, s.AreaPx2, 1e-9, "area");
            double a = s.AreaPx2, a1 = s1.AreaPx2, a2 = s2.AreaPx2;
            // Moments about the whole polygon's centroid keep the numbers cell-sized.
            double x1 = s1.Centroid.X - s.Centroid.X, y1 = s1.Centroid.Y - s.Centroid.Y, x2 = s2.Centroid.X - s.Centroid.X, y2 = s2.Centroid.Y - s.Centroid.Y;
            Assert.True(Math.Abs(a1 * x1 + a2 * x2) <= 1e-9 * a * t.s.R0 && Math.Abs(a1 * y1 + a2 * y2) <= 1e-9 * a * t.s.R0, "first moments");
            double tol = 1e-9 * s.L1;
            Assert.True(Math.Abs((a1 * (s1.Sxx + x1 * x1) + a2 * (s2.Sxx + x2 * x2)) / a - s.Sxx) <= tol, "Sxx");
            Assert.True(Math.Abs((a1 * (s1.Syy + y1 * y1) + a2 * (s2.Syy + y2 * y2)) / a - s.Syy) <= tol, "Syy");
            Assert.True(Math.Abs((a1 * (s1.Sxy + x1 * y1) + a2 * (s2.Sxy + x2 * y2)) / a - s.Sxy) <= tol, "Sxy");
        });
    }
}
