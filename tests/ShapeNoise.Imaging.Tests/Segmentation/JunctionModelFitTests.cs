using ShapeNoise.Imaging.Segmentation;
using ShapeNoise.Segmentation;
using ShapeNoise.Synthesis;
using OpenCvSharp;

namespace ShapeNoise.Tests.Segmentation;

public class JunctionModelFitTests
{
    private static int[] Halves(int w, int h, Func<int, int, bool> inB)
    {
        var l = new int[w * h];
        for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) l[y * w + x] = inB(x, y) ? 2 : 1;
        return l;
    }

    [Fact]
    public void Coverage_StraightCrack_HalfOfEachAdjacentPixel()
    {
        // Geometry (common practice): a band of half-width 1/2 px centred on a pixel edge covers exactly half of each
        // pixel beside the edge and nothing of the pixels one further away.
        var c = JunctionModelFit.Coverage(Halves(10, 6, (x, _) => x >= 5), 10, 6);
        for (int y = 0; y < 6; y++)
            for (int x = 0; x < 10; x++)
                Assert.Equal(x is 4 or 5 ? 0.5 : 0, c[y * 10 + x], 12);
    }

    [Fact]
    public void Coverage_CornerOfAQuadrant_QuarterDiscAndThreeQuarters()
    {
        // Cell 2 fills x >= 5, y >= 5. The pixel diagonally outside the corner, (4, 4), meets the cracks only at its corner
        // vertex: the band covers a quarter disc of radius 1/2 there, area π r² / 4 = π/16 (handbook area of a disc). The
        // pixel inside the corner, (5, 5), has cracks on two adjacent edges: three of its four quadrants, 3/4. With a band of
        // 2 px (half-width 1) the diagonal pixel holds a quarter disc of radius 1, π/4, and the inside pixel is covered.
        var c = JunctionModelFit.Coverage(Halves(10, 10, (x, y) => x >= 5 && y >= 5), 10, 10);
        Assert.Equal(Math.PI / 16, c[4 * 10 + 4], 2);   // 32 x 32 sub-samples: within 0.005 of the exact area
        Assert.Equal(0.75, c[5 * 10 + 5], 12);
        Assert.Equal(0.5, c[4 * 10 + 7], 12);   // above the straight part of the top crack
        var wide = JunctionModelFit.Coverage(Halves(10, 10, (x, y) => x >= 5 && y >= 5), 10, 10, bandPx: 2);
        Assert.Equal(Math.PI / 4, wide[4 * 10 + 4], 2);
        Assert.Equal(1, wide[5 * 10 + 5], 12);
        Assert.Equal(1, wide[4 * 10 + 7], 12);
    }

    /// <summary>A render of our monolayer at SNR 100 without illumination falloff, bleaching, haze or cytoplasm, flattened as the segmenter does.</summary>
    private static (int[] Truth, float[] Flat, int W, int H) Render(double psfPx)
    {
        var m = new RenderMember("fit", 10, 100, psfPx, 1, Illumination: 0, Bleach: 0, Haze: 0, Cytoplasm: 0, CanvasPx: 120, Frames: 2);
        var movie = m.Tissue(41);
        var truth = movie.Frames().First();
        int w = movie.Width, h = movie.Height;
        var raw = JunctionRenderer.Render(truth, w, h, 0, 2, m.Render(48), new Random(48));
        var f = new float[raw.Length];
        for (int i = 0; i < f.Length; i++) f[i] = raw[i];
        using var img = new Mat(h, w, MatType.CV_32FC1);
        System.Runtime.InteropServices.Marshal.Copy(f, 0, img.Data, f.Length);
        using var wide = new Mat();
        Cv2.GaussianBlur(img, wide, new Size(0, 0), 20);
        using var flat = new Mat();
        Cv2.Divide(img, wide, flat);
        var fl = new float[f.Length];
        System.Runtime.InteropServices.Marshal.Copy(flat.Data, fl, 0, fl.Length);
        return (truth, fl, w, h);
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(1.8)]
    public void Refine_TruthOfACleanRender_StaysAndFitsThePsf(double psfPx)
    {
        // Recovery test on our own render: the true labels are (nearly) a fixed point of the fit, and the fitted model
        // width is the rendered PSF (the model's band is the renderer's 1 px line, so σ_m = PSF; 0.1 px: the
        // golden-section tolerance plus the fit's noise at SNR 100). Measured: SEG 0.998 and 0.990, σ_m 0.998 and 1.806 px.
        var (truth, flat, w, h) = Render(psfPx);
        var labels = (int[])truth.Clone();
        var fit = JunctionModelFit.Refine(flat, labels, w, h, NoiseLevel.Estimate(flat, w, h), 2, 0.5, 3, mergeMargin: 10);
        var after = SegmentationScore.Of(truth, labels);
        Assert.InRange(fit.SigmaPx, psfPx - 0.1, psfPx + 0.1);
        Assert.True(after.Seg > 0.98, $"SEG {after.Seg:F3} ({fit})");
        Assert.True(fit.Moves < 0.01 * truth.Length, $"{fit.Moves} moves");
    }

    [Fact]
    public void FlipCheck_BoundaryPixels_LocalChangeEqualsWholeFrameRecomputation()
    {
        // Invariance: the sweep's local update (coverage of the 3 x 3 pixels around the move, blurred in a window) must
        // equal the squared residual recomputed from scratch over the whole frame (1e-6 relative: rounding of the sums).
        var (truth, flat, w, h) = Render(1.2);
        var rng = new Random(5);
        int checkedMoves = 0;
        while (checkedMoves < 40)
        {
            int x = rng.Next(8, w - 8), y = rng.Next(8, h - 8), i = y * w + x;
            int b = truth[i + 1] != truth[i] ? truth[i + 1] : truth[i + w] != truth[i] ? truth[i + w] : 0;
            if (b == 0) continue;
            var (p, r) = JunctionModelFit.FlipCheck(flat, truth, w, h, 1.2, x, y, b);
            Assert.True(Math.Abs(p - r) <= 1e-6 * Math.Max(1e-9, Math.Abs(r)), $"({x},{y}) -> {b}: predicted {p}, recomputed {r}");
            checkedMoves++;
        }
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(10.0)]
    [InlineData(22.5)]
    [InlineData(30.0)]
    [InlineData(45.0)]
    [InlineData(63.0)]
    [InlineData(80.0)]
    public void BoundaryLength_StraightBoundaryAtAnyAngle_IsItsEuclideanLengthByCauchyCrofton(double angleDeg)
    {
        // A half-plane through the centre of a 401 x 401 px frame, boundary direction at angleDeg. The Cauchy-Crofton
        // formula (Boykov Y. and Kolmogorov V. (2003), Proc. IEEE ICCV, 26-33) makes the weighted count of neighbour pairs
        // cut by a straight line, per unit of its Euclidean length, w_a (|n_x| + |n_y|) + w_d (|n_x + n_y| + |n_x - n_y|)
        // for unit normal n (each pair direction e is cut |e . n| times per unit length on the unit grid). With the
        // weights scaled so an axis-parallel line costs 1, that lies in [1, 1.082] for every direction; the crack count
        // (4-neighbour pairs alone) gives |n_x| + |n_y|, up to √2. Euclidean length of the line across the square frame
        // of side 401: 401 / max(|cos|, |sin|) (geometry). Tolerance 0.6 %: the pairs at the frame's edges (about 2 of 600).
        const int w = 401;
        double th = angleDeg * Math.PI / 180, nx = -Math.Sin(th), ny = Math.Cos(th), c = (w - 1) / 2.0;
        var labels = new int[w * w];
        for (int y = 0; y < w; y++)
            for (int x = 0; x < w; x++) labels[y * w + x] = (x - c) * nx + (y - c) * ny + 1e-7 < 0 ? 1 : 2;
        double length = w / Math.Max(Math.Abs(Math.Cos(th)), Math.Abs(Math.Sin(th)));
        double perUnit = JunctionModelFit.BoundaryLength(labels, w, w) / length;
        double wa = 1 / (1 + Math.Sqrt(2)), wd = wa / Math.Sqrt(2);
        double expected = wa * (Math.Abs(nx) + Math.Abs(ny)) + wd * (Math.Abs(nx + ny) + Math.Abs(nx - ny));
        Assert.True(Math.Abs(perUnit - expected) <= 0.006 * expected, $"{angleDeg}°: {perUnit:F4} per unit length, Cauchy-Crofton {expected:F4}");
        Assert.InRange(perUnit, 0.994, 1.082 * 1.006);
    }

    [Fact]
    public void SiteDistribution_BoundaryPixels_IsTheBoltzmannDistributionOfTheRecomputedEnergy()
    {
        // The heat-bath (Gibbs sampler) conditional of one pixel is p(label) ∝ exp(−E(label) / T) over its own label and
        // its neighbours' (Geman S. and Geman D. (1984), IEEE TPAMI 6:721-741), E = RSS / (2σ_n²) + β Λ (Λ the 8-neighbour boundary length). The
        // sampler's local energies must give the probabilities computed from energies recomputed on the whole frame
        // (1e-6 absolute: rounding of the residual sums).
        var (truth, flat, w, h) = Render(1.2);
        var rng = new Random(9);
        int checkedSites = 0, mixed = 0;
        while (checkedSites < 30)
        {
            int x = rng.Next(8, w - 8), y = rng.Next(8, h - 8), i = y * w + x;
            if (truth[i + 1] == truth[i] && truth[i + w] == truth[i] && truth[i - 1] == truth[i] && truth[i - w] == truth[i]) continue;
            var (labels, p, r) = JunctionModelFit.SiteCheck(flat, truth, w, h, 1.2, 0.3, 2, 2, x, y);
            if (labels.Length < 2) continue;   // a move that would cut the cell: not sampled
            Assert.Equal(1.0, p.Sum(), 12);
            for (int j = 0; j < labels.Length; j++)
                Assert.True(Math.Abs(p[j] - r[j]) < 1e-6, $"({x},{y}) label {labels[j]}: sampler {p[j]}, recomputed {r[j]}");
            if (p[0] is > 0.01 and < 0.99) mixed++;
            checkedSites++;
        }
        Assert.True(mixed >= 5, $"only {mixed} of 30 sites had a probability away from 0 and 1: the check would not see an error");
    }

    [Fact]
    public void KeepLargestPieces_CellInThreePieces_EveryLabelOneConnectedComponent()
    {
        // Reference: OpenCV's connected-component labelling (4-connectivity) counts the pieces of every label afterwards.
        // Cell 1 fills the left half, cell 2 the right half; cell 2 also owns a 2 x 2 island inside cell 1 and a single
        // pixel inside cell 1 elsewhere: both must go to cell 1, and nothing else may change.
        int w = 12, h = 10;
        var l = new int[w * h];
        for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) l[y * w + x] = x < 6 ? 1 : 2;
        l[2 * w + 1] = l[2 * w + 2] = l[3 * w + 1] = l[3 * w + 2] = 2;
        l[7 * w + 3] = 2;
        var before = (int[])l.Clone();
        int moved = Regions.KeepLargestPieces(l, w, h);
        Assert.Equal(5, moved);
        foreach (var cell in new[] { 1, 2 })
        {
            using var mask = new Mat(h, w, MatType.CV_8UC1);
            for (int i = 0; i < l.Length; i++) mask.Set(i / w, i % w, (byte)(l[i] == cell ? 255 : 0));
            using var comp = new Mat();
            Assert.Equal(2, Cv2.ConnectedComponents(mask, comp, PixelConnectivity.Connectivity4));   // background + one piece
        }
        for (int i = 0; i < l.Length; i++)
            if (i % w >= 6) Assert.Equal(before[i], l[i]);
    }
}
