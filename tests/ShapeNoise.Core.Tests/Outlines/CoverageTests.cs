using ShapeNoise.Outlines;

namespace ShapeNoise.Tests.Outlines;

/// <summary>
/// The closed-mask coverage against the definition of a morphological closing: a pixel belongs to the closing of X by a
/// structuring element B unless some translate of B that contains it fits entirely in the background (Serra J. (1982),
/// Image Analysis and Mathematical Morphology, ch. 2; Soille P. (2003), Morphological Image Analysis, ch. 4). Here B is a
/// segment of MaxGapPx + 1 pixels along a row, column or diagonal, and the covered set is the union of the four closings.
/// </summary>
public class CoverageTests
{
    /// <summary>Two 5 x 5 squares side by side, <paramref name="gapPx"/> background columns between them, in a 24 x 9 field.</summary>
    private static (int[] Img, int W, int H, int Left) TwoSquares(int gapPx)
    {
        int w = 24, h = 9, left = 3; var img = new int[w * h];
        for (int y = 2; y < 7; y++)
            for (int x = 0; x < 5; x++) { img[y * w + left + x] = 1; img[y * w + left + 5 + gapPx + x] = 2; }
        return (img, w, h, left);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    public void Closed_SquaresAtMostThreePxApart_GapFilled(int gapPx)
    {
        var (img, w, h, left) = TwoSquares(gapPx);
        var c = Coverage.Closed(img, w, h);
        // The gap between the squares (rows 2..6) is filled; the rows above and below stay background.
        for (int y = 0; y < h; y++)
            for (int x = left + 5; x < left + 5 + gapPx; x++)
                Assert.Equal(y is >= 2 and < 7, c[y * w + x]);
        Assert.Equal(50 + 5 * gapPx, Coverage.CoveredPixels(img, w, h));
    }

    [Theory]
    [InlineData(4)]
    [InlineData(6)]
    public void Closed_SquaresFourOrMorePxApart_GapLeftOpen(int gapPx)
    {
        var (img, w, h, _) = TwoSquares(gapPx);
        // Only the labelled pixels are covered: a 4-px segment fits in the gap.
        Assert.Equal(50, Coverage.CoveredPixels(img, w, h));
    }

    [Fact]
    public void Closed_DigitisedEllipses_NothingAdded()
    {
        // A Gauss-digitised convex set meets every row, column and diagonal in one run (common practice: the lattice
        // points on a line inside a convex set are contiguous), so isolated ellipses more than 3 px apart gain no pixel,
        // as a closing of isolated convex cells should not fill the background between them.
        int w = 80, h = 60; var img = new int[w * h]; int labelled = 0;
        (double Cx, double Cy, double A, double B, double Th)[] cells = [(20, 20, 12, 7, 0.3), (55, 22, 10, 6, -1.1), (38, 45, 14, 8, 2.0)];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
                for (int k = 0; k < cells.Length; k++)
                {
                    var (cx, cy, a, b, th) = cells[k];
                    double u = (x - cx) * Math.Cos(th) + (y - cy) * Math.Sin(th), v = -(x - cx) * Math.Sin(th) + (y - cy) * Math.Cos(th);
                    if (u * u / (a * a) + v * v / (b * b) <= 1) { img[y * w + x] = k + 1; labelled++; }
                }
        Assert.Equal(labelled, Coverage.CoveredPixels(img, w, h));
    }

    [Theory]
    [InlineData(1, 0.5)]
    [InlineData(2, 0.7)]
    [InlineData(3, 0.8)]
    [InlineData(4, 0.95)]
    [InlineData(5, 0.2)]
    public void Closed_RandomMask_MatchesClosingByDefinition(int seed, double density)
    {
        int w = 23, h = 17, n = Coverage.MaxGapPx + 1; var rng = new Random(seed);
        var img = new int[w * h];
        for (int i = 0; i < img.Length; i++) img[i] = rng.NextDouble() < density ? 1 + rng.Next(3) : 0;
        var c = Coverage.Closed(img, w, h);
        // Definition: pixel p is covered when, in one of the four directions, every segment of n pixels through p has a
        // labelled pixel inside the image (outside the image counts as background).
        (int Dx, int Dy)[] dirs = [(1, 0), (0, 1), (1, 1), (1, -1)];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                bool expected = img[y * w + x] != 0;
                foreach (var (dx, dy) in dirs)
                {
                    bool everyHits = true;
                    for (int s = -(n - 1); s <= 0 && everyHits; s++)
                    {
                        bool hit = false;
                        for (int k = s; k < s + n; k++)
                        {
                            int xx = x + k * dx, yy = y + k * dy;
                            if (xx >= 0 && xx < w && yy >= 0 && yy < h && img[yy * w + xx] != 0) hit = true;
                        }
                        everyHits = hit;
                    }
                    expected |= everyHits;
                }
                Assert.True(expected == c[y * w + x], $"pixel ({x}, {y}): expected {expected}");
            }
        // The count (examined per background pixel, without the mask) is the mask's.
        Assert.Equal(c.Count(b => b), Coverage.CoveredPixels(img, w, h));
    }

    [Fact]
    public void Closed_RunReachingBorder_NotFilled()
    {
        // One labelled column 2 px from the left border: the 2 background columns touch the border, so they stay open.
        int w = 8, h = 4; var img = new int[w * h];
        for (int y = 0; y < h; y++) img[y * w + 2] = 5;
        Assert.Equal(h, Coverage.CoveredPixels(img, w, h));
    }
}
