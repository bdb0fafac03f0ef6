using ShapeNoise.Outlines;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Outlines;

public class RidgeRefinementTests
{
    [Theory]
    [InlineData(0.0)]
    [InlineData(0.1)]
    [InlineData(0.25)]
    [InlineData(-0.37)]
    [InlineData(0.5)]
    [InlineData(1.2)]
    public void CrestOffset_SampledParabola_ReturnsItsVertex(double vertex)
    {
        // Outside reference: three samples of a parabola determine it exactly, and its vertex is
        // x_j + h (f_{j-1} - f_{j+1}) / (2 (f_{j-1} - 2 f_j + f_{j+1})) (Press et al. 2007, Numerical Recipes 3rd ed.,
        // §10.3, parabolic interpolation; section number from memory). Samples at 0, 1, ..., 4 px of -(x - 2 - vertex)^2 + 5.
        // Tolerance: rounding only.
        var f = new double[5];
        for (int k = 0; k < 5; k++) f[k] = 5 - (k - 2 - vertex) * (k - 2 - vertex);
        Assert.Equal(2 + vertex, RidgeRefinement.CrestOffset(f, 1.0)!.Value, 12);
    }

    [Fact]
    public void CrestOffset_MaximumAtEnd_ReturnsNull()
    {
        // No crest inside the search: the vertex must stay (docs/segmentation.md#sub-pixel-boundaries).
        Assert.Null(RidgeRefinement.CrestOffset([1, 2, 3, 4, 5], 1.0));
        Assert.Null(RidgeRefinement.CrestOffset([2, 2, 2, 2, 2], 1.0));
    }

    [Theory]
    [InlineData(0.0, 1.5)]
    [InlineData(0.2, 1.5)]
    [InlineData(-0.3, 1.5)]
    [InlineData(0.45, 1.2)]
    [InlineData(-0.8, 2.0)]
    public void Refine_GaussianRidgeAtKnownOffset_VerticesOnRidge(double offsetPx, double sigmaPx)
    {
        // A straight vertical ridge exp(-(x - x0)^2 / (2 sigma^2)) sampled at pixel centres, x0 = 20 + offset (outline
        // coordinates, docs/measures.md#coordinates); the polygon is the rectangle whose right side is x = 20 (crack
        // positions). The vertices of that side must move to x0. Reference: the crest of a Gaussian is its mean. Tolerance
        // 0.06 px: the parabola through three unit-spaced samples of a Gaussian of sigma >= 1.2 px misses its peak by
        // at most ~0.04 px (computed by us with a short script over offsets 0-0.7 px: 0.048 px at sigma 1.0, 0.021 px at
        // 1.5; the error falls with sigma), bilinear interpolation included.
        int w = 40, h = 40;
        double x0 = 20 + offsetPx;
        var signal = new float[w * h];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
                signal[y * w + x] = (float)Math.Exp(-(x + 0.5 - x0) * (x + 0.5 - x0) / (2 * sigmaPx * sigmaPx));
        // Rectangle x in [10, 20], y in [10, 30], vertices every 1 px, clockwise in image coordinates (y down).
        var v = new List<Point2>();
        for (int x = 10; x < 20; x++) v.Add(new Point2(x, 10));
        for (int y = 10; y < 30; y++) v.Add(new Point2(20, y));
        for (int x = 20; x > 10; x--) v.Add(new Point2(x, 30));
        for (int y = 30; y > 10; y--) v.Add(new Point2(10, y));
        var (r, moved) = RidgeRefinement.Refine(v.ToArray(), signal, w, h);
        Assert.True(moved > 0);
        int checkedCount = 0;
        for (int i = 0; i < v.Count; i++)
        {
            if (v[i].X != 20 || v[i].Y < 13 || v[i].Y > 27) continue;   // the right side away from the corners
            Assert.Equal(x0, r[i].X, 0.06);
            Assert.Equal(v[i].Y, r[i].Y, 1e-9);                         // moved along the normal only
            checkedCount++;
        }
        Assert.Equal(15, checkedCount);
    }

    [Fact]
    public void Refine_FlatSignal_LeavesVertices()
    {
        // No crest anywhere: every vertex stays where it is.
        var v = new Point2[] { new(5, 5), new(6, 5), new(7, 5), new(7, 6), new(7, 7), new(6, 7), new(5, 7), new(5, 6) };
        var (r, moved) = RidgeRefinement.Refine(v, new float[20 * 20], 20, 20);
        Assert.Equal(0, moved);
        Assert.Equal(v, r);
    }
}
