using ShapeNoise.Nematic;

namespace ShapeNoise.Tests.Nematic;

/// <summary>Analytic director fields theta = k phi + theta0 (textbook point defects of charge k: de Gennes and Prost 1993,
/// The Physics of Liquid Crystals, ch. 4).</summary>
public class DefectFinderTests
{
    private static NematicGrid Field(double k, double theta0, double cx = 20.3, double cy = 19.6)
        => NematicGrid.FromDirector(41, 41, 1.0, (x, y) => k * Math.Atan2(y - cy, x - cx) + theta0);

    [Theory]
    [InlineData(0.5, 0.0)] [InlineData(0.5, 0.7)] [InlineData(0.5, -1.2)]
    [InlineData(-0.5, 0.0)] [InlineData(-0.5, 0.4)] [InlineData(-0.5, 2.0)]
    [InlineData(1.0, 0.0)] [InlineData(1.0, 0.9)]
    [InlineData(-1.0, 0.0)] [InlineData(-1.0, -0.5)]
    public void Find_AnalyticPointDefect_ExactChargeWithinOneGridStep(double k, double theta0)
    {
        var d = DefectFinder.Find(Field(k, theta0), 40, 40, 3, 4);
        var hit = Assert.Single(d);
        Assert.Equal(k, hit.Charge);
        Assert.True(Math.Abs(hit.X - 20.3) <= 1 && Math.Abs(hit.Y - 19.6) <= 1, $"at ({hit.X}, {hit.Y})");
    }

    [Fact]
    public void HeadDirection_HalfPhi_PointsAlongMinusX()
    {
        // Spec convention: for theta = phi/2 the comet's rounded head lies toward -x.
        var (hx, hy) = DefectFinder.HeadDirection(Field(0.5, 0), 20.3, 19.6, 6);
        Assert.Equal(-1.0, hx, 2);
        Assert.Equal(0.0, hy, 2);
    }

    [Theory]
    [InlineData(0.3)] [InlineData(1.1)] [InlineData(-0.8)]
    public void HeadDirection_HalfPhiPlusTheta0_RotatedByTwoTheta0(double theta0)
    {
        var (hx, hy) = DefectFinder.HeadDirection(Field(0.5, theta0), 20.3, 19.6, 6);
        Assert.Equal(-Math.Cos(2 * theta0), hx, 2);
        Assert.Equal(-Math.Sin(2 * theta0), hy, 2);
    }

    [Fact]
    public void CoarseGraining_UniformElongatedCells_OrderTwiceQAndNoDefects()
    {
        // Cells of elongation q and common axis: Q_c = q (cos 2a, sin 2a) everywhere, so S = 2 |Q| = 2q.
        const double q = 0.3, a = 0.4;
        var rng = new Random(2);
        var cells = Enumerable.Range(0, 400).Select(_ => new CellSample(rng.NextDouble() * 200, rng.NextDouble() * 200,
            q * Math.Cos(2 * a), q * Math.Sin(2 * a), double.NaN, double.NaN)).ToArray();
        var g = CoarseGraining.Of(cells, 200, 200, 5, 20);
        int mid = (g.Ny / 2) * g.Nx + g.Nx / 2;
        Assert.Equal(2 * q, g.Order(mid), 9);
        Assert.Equal(a, g.Director(mid), 9);
        Assert.Empty(DefectFinder.Find(g, 200, 200, 20, 20));
    }

    [Fact]
    public void CoarseGraining_AfterReleasingAGrid_NextGridAsElongatedCellsDemand()
    {
        // A grid handed back (CoarseGraining.Release) backs the next one: the uniform-field result above (S = 2q, the
        // common axis, velocities NaN where no cell has one) must hold for a second set of cells coarse-grained on the
        // released arrays of a first, different set (strong order, other axis, with velocities).
        var rng = new Random(3);
        CellSample Cell(double q, double a, double v) => new(rng.NextDouble() * 200, rng.NextDouble() * 200, q * Math.Cos(2 * a), q * Math.Sin(2 * a), v, v);
        var first = CoarseGraining.Of(Enumerable.Range(0, 400).Select(_ => Cell(0.45, -1.1, 2.0)).ToArray(), 200, 200, 5, 20);
        CoarseGraining.Release(first);
        var g = CoarseGraining.Of(Enumerable.Range(0, 400).Select(_ => Cell(0.3, 0.4, double.NaN)).ToArray(), 200, 200, 5, 20);
        int mid = (g.Ny / 2) * g.Nx + g.Nx / 2;
        Assert.Equal(2 * 0.3, g.Order(mid), 9);
        Assert.Equal(0.4, g.Director(mid), 9);
        Assert.All(g.Vx, v => Assert.True(double.IsNaN(v)));
        Assert.All(g.VelocityWeight, w => Assert.Equal(0, w));
    }

    [Fact]
    public void Find_PairApproachingAndAnnihilating_CountsDropToZeroAfterContact()
    {
        // theta = phi_+/2 - phi_-/2: a +1/2 and a -1/2 at separation d; at contact the field is uniform.
        int Count(double sep, double charge)
        {
            double x1 = 20.3 - sep / 2, x2 = 20.3 + sep / 2;
            var g = NematicGrid.FromDirector(41, 41, 1.0, (x, y) => 0.5 * Math.Atan2(y - 19.6, x - x1) - 0.5 * Math.Atan2(y - 19.6, x - x2));
            return DefectFinder.Find(g, 40, 40, 3, 3).Count(d => d.Charge == charge);
        }
        foreach (var sep in new[] { 16.0, 8.0, 4.0 }) { Assert.Equal(1, Count(sep, 0.5)); Assert.Equal(1, Count(sep, -0.5)); }
        Assert.Equal(0, Count(0, 0.5));
        Assert.Equal(0, Count(0, -0.5));
    }
}
