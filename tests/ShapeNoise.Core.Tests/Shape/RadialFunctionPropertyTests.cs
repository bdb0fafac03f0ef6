using CsCheck;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Shape;

/// <summary>Properties of RadialFunction.Sample on random ellipses and star polygons.</summary>
public class RadialFunctionPropertyTests
{
    [Fact]
    public void Sample_DenseEllipseInBodyFrame_MatchesPolarEquation()
    {
        // Handbook polar equation of an ellipse about its centre, r(psi) = a b / sqrt(b^2 cos^2 psi + a^2 sin^2 psi) with
        // psi from the a-axis (RadialFunction.Ellipse). Tolerance, derived: the N-vertex polygon at equal parameter steps
        // is the linear image (about the centre) of the regular N-gon inscribed in the unit circle; a linear map keeps
        // ratios of distances along each ray from the centre, and along any ray the regular N-gon lies between
        // cos(pi/N) and 1 of the circle's radius. So rho_k / r(psi_k) is in [cos(pi/N), 1]: a deficit of at most
        // 1 - cos(pi/N) = 3.1e-7 at N = 4000, plus 1e-9 for rounding.
        const int n = 4000;
        double deficit = 1 - Math.Cos(Math.PI / n);
        var gen = from e in ShapeGen.Ellipse from m in Gen.Int[8, 256] select (e, m);
        Prop.ForAll(gen, 501, 40, t =>
        {
            var rho = new double[t.m];
            bool star = RadialFunction.Sample(t.e.Polygon(n), t.e.Centre, t.e.ThetaRad, rho);
            Assert.True(star, "an ellipse is star-shaped about its centre");
            for (int k = 0; k < t.m; k++)
            {
                double r = RadialFunction.Ellipse(t.e.A, t.e.B, 2 * Math.PI * k / t.m);
                Assert.True(rho[k] <= r * (1 + 1e-9) && rho[k] >= r * (1 - deficit - 1e-9),
                    $"k={k}: rho {rho[k]:R} vs r {r:R} (ratio {rho[k] / r:R}, allowed down to {1 - deficit:R})");
            }
        });
    }

    [Fact]
    public void Sample_PolygonAndFrameRotatedTogether_SameRho()
    {
        // Follows from the definition rho_k = r(theta0 + 2 pi k / M): a rigid motion of the outline, its centre and the
        // frame angle leaves every ray's crossing distance alone. Tolerance 1e-9 relative (rounding of the motion).
        var gen = from s in ShapeGen.Star from mo in ShapeGen.Motion from theta0 in Gen.Double[-Math.PI, Math.PI] from m in Gen.Int[8, 256]
                  select (s, mo, theta0, m);
        Prop.ForAll(gen, 502, 200, t =>
        {
            var r0 = new double[t.m]; var r1 = new double[t.m];
            Assert.True(RadialFunction.Sample(t.s.Vertices, t.s.Centre, t.theta0, r0));
            Assert.True(RadialFunction.Sample(t.mo.Rotate(t.s.Vertices), t.mo.Apply(t.s.Centre), t.theta0 + t.mo.AlphaRad, r1));
            for (int k = 0; k < t.m; k++) Prop.Close(r1[k], r0[k], 1e-9, $"k={k}");
        });
    }

    [Fact]
    public void Sample_StarPolygonAboutItsCentre_ReportsStarShapedWithinVertexRadii()
    {
        // Follows from the construction of ShapeGen.Star (increasing vertex angles, r > 0, each edge turning
        // counter-clockwise about the centre): every ray from the centre meets the outline exactly once. A point on an
        // edge is no farther from the centre than the edge's farther end (convexity of the distance), so
        // 0 < rho_k <= max vertex radius.
        var gen = from s in ShapeGen.Star from theta0 in Gen.Double[-Math.PI, Math.PI] from m in Gen.Int[8, 512] select (s, theta0, m);
        Prop.ForAll(gen, 503, 300, t =>
        {
            var rho = new double[t.m];
            Assert.True(RadialFunction.Sample(t.s.Vertices, t.s.Centre, t.theta0, rho), "star-shaped polygon reported as not star-shaped");
            double rMax = 0;
            foreach (var p in t.s.Vertices) rMax = Math.Max(rMax, Math.Sqrt((p.X - t.s.Centre.X) * (p.X - t.s.Centre.X) + (p.Y - t.s.Centre.Y) * (p.Y - t.s.Centre.Y)));
            for (int k = 0; k < t.m; k++) Assert.True(rho[k] > 0 && rho[k] <= rMax * (1 + 1e-12), $"k={k}: rho {rho[k]:R}, max vertex radius {rMax:R}");
        });
    }

    [Fact]
    public void Sample_RayThroughEveryVertex_StillStarShaped()
    {
        // Edge case of the ray-edge ownership rule (a ray exactly through a vertex must be counted once): a star polygon
        // whose vertices sit exactly on the M rays (N = M, vertex angles theta0 + 2 pi k / M, no jitter), where rho_k must
        // equal the vertex radius. Follows from the definition of rho_k.
        var gen = from m in Gen.Int[8, 256] from r0 in Gen.Double[5, 120] from amp in Gen.Double[-0.3, 0.3] from order in Gen.Int[1, 6]
                  from cx in Gen.Double[0, 1000] from cy in Gen.Double[0, 1000] from theta0 in Gen.Double[-Math.PI, Math.PI]
                  select (m, r0, amp, order, cx, cy, theta0);
        Prop.ForAll(gen, 504, 300, t =>
        {
            var v = new Point2[t.m]; var r = new double[t.m];
            for (int k = 0; k < t.m; k++)
            {
                double phi = t.theta0 + 2 * Math.PI * k / t.m;
                r[k] = t.r0 * (1 + t.amp * Math.Cos(t.order * phi));
                v[k] = new Point2(t.cx + r[k] * Math.Cos(phi), t.cy + r[k] * Math.Sin(phi));
            }
            var rho = new double[t.m];
            Assert.True(RadialFunction.Sample(v, new Point2(t.cx, t.cy), t.theta0, rho), "vertices on the rays: reported as not star-shaped");
            for (int k = 0; k < t.m; k++) Prop.Close(rho[k], r[k], 1e-9, $"k={k}");
        });
    }
}
