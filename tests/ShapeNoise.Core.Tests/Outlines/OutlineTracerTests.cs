using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Shape;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Outlines;

public class OutlineTracerTests(ITestOutputHelper log)
{
    private static Outline TraceSingle(int[] img, int w, int h, OutlineMethod m, int margin = 1, int minArea = 3)
    {
        var scan = LabelScan.Of(new LabelFrame(0, w, h, img));
        return OutlineTracer.Trace(scan.DenseImage, w, h, scan.Boxes[0], 1, m, margin, minArea);
    }

    [Fact]
    public void Trace_Square_PixelEdgeAreaEqualsPixelCount()
    {
        int w = 10, h = 10; var img = new int[w * h];
        for (int y = 3; y < 6; y++) for (int x = 2; x < 6; x++) img[y * w + x] = 7;   // 4 x 3 block
        var o = TraceSingle(img, w, h, OutlineMethod.PixelEdge);
        Assert.Equal(OutlineStatus.Ok, o.Status);
        Assert.Equal(4, o.Vertices.Length);            // collinear crack corners removed
        Assert.Equal(12.0, Polygon.Area(o.Vertices), 12);
        var c = Polygon.Centroid(o.Vertices);
        Assert.Equal(4.0, c.X, 12); Assert.Equal(4.5, c.Y, 12);   // centre of columns 2..5, rows 3..5
    }

    [Fact]
    public void Trace_Square_MidpointPolygonPassesThroughCrackMidpoints()
    {
        int w = 10, h = 10; var img = new int[w * h];
        for (int y = 3; y < 6; y++) for (int x = 2; x < 6; x++) img[y * w + x] = 7;
        var o = TraceSingle(img, w, h, OutlineMethod.Midpoint);
        Assert.Equal(2 * (4 + 3), o.Vertices.Length);  // one vertex per boundary crack
        // Marching squares cuts each corner by a half-pixel triangle: area 12 - 4 * 1/8.
        Assert.Equal(11.5, Polygon.Area(o.Vertices), 12);
    }

    [Fact]
    public void Trace_DiagonalPixels_KeepsLargest4ConnectedComponent()
    {
        // Two pixels touching only at a corner are two 4-connected components; the 2x2 block wins over the single pixel.
        int w = 8, h = 8; var img = new int[w * h];
        img[2 * w + 2] = img[2 * w + 3] = img[3 * w + 2] = img[3 * w + 3] = 1;
        img[4 * w + 4] = 1;
        var o = TraceSingle(img, w, h, OutlineMethod.PixelEdge);
        Assert.Equal(4, o.ComponentPixels);
        Assert.Equal(4.0, Polygon.Area(o.Vertices), 12);
    }

    [Fact]
    public void Trace_ObjectOnBorder_IsExcludedAsBorder()
    {
        int w = 8, h = 8; var img = new int[w * h];
        for (int y = 0; y < 3; y++) for (int x = 2; x < 5; x++) img[y * w + x] = 3;
        Assert.Equal(OutlineStatus.Border, TraceSingle(img, w, h, OutlineMethod.Midpoint).Status);
    }

    [Fact]
    public void Trace_SmallObject_IsExcludedAsSmall()
    {
        int w = 8, h = 8; var img = new int[w * h];
        img[3 * w + 3] = img[3 * w + 4] = 2;
        Assert.Equal(OutlineStatus.Small, TraceSingle(img, w, h, OutlineMethod.Midpoint, minArea: 30).Status);
    }

    [Fact]
    public void Trace_HoleInside_FollowsOuterBoundaryOnly()
    {
        int w = 12, h = 12; var img = new int[w * h];
        for (int y = 2; y < 9; y++) for (int x = 2; x < 9; x++) img[y * w + x] = 4;
        img[5 * w + 5] = 0;   // a one-pixel hole
        var o = TraceSingle(img, w, h, OutlineMethod.PixelEdge);
        Assert.Equal(49.0, Polygon.Area(o.Vertices), 12);   // outer boundary 7 x 7
    }

    /// <summary>
    /// Noise floor on a static rasterised ellipse (a = 14, b = 9 px): the shape never changes, only its sub-pixel position
    /// and a tiny rotation jitter from frame to frame, so every measured fluctuation is measurement noise. Numbers are
    /// printed for docs/measures.md.
    /// </summary>
    [Fact]
    public void Floor_StaticRasterisedEllipse_OrderedByMethodAndEstimatedByHighModes()
    {
        var rng = new Random(3);
        int w = 64, h = 64, T = 60;
        var frames = new List<int[]>();
        for (int t = 0; t < T; t++)
        {
            var img = new int[w * h];
            Raster.Ellipse(img, w, h, 32 + rng.NextDouble(), 32 + rng.NextDouble(), 14, 9, 0.3 + 0.02 * rng.NextDouble(), 5);
            frames.Add(img);
        }
        var raw = new Dictionary<OutlineMethod, (double Noise, double Floor, double VarL)>();
        foreach (var m in Enum.GetValues<OutlineMethod>())
        {
            var p = MovieAnalyzer.Run(new MemoryMovie(w, h, frames), new AnalysisOptions { Outline = m }).Pooled;
            double noise = 0.5 * (p.VarAlongRaw + p.VarAcrossRaw), floor = 0.5 * (p.FloorAlong + p.FloorAcross);
            raw[m] = (noise, floor, p.VarL.Value);
            log.WriteLine($"{m}: contour noise {noise:F4} px^2, high-mode floor estimate {floor:F4} px^2, var_L {p.VarL.Value:F4} px^2");
        }
        // Sub-pixel smoothing lowers the noise, crack midpoints next, pixel edges most.
        Assert.True(raw[OutlineMethod.Subpixel].Noise < raw[OutlineMethod.Midpoint].Noise);
        Assert.True(raw[OutlineMethod.Midpoint].Noise < raw[OutlineMethod.PixelEdge].Noise);
        // For the default (midpoint) the white-noise floor from modes M/4..M/2 accounts for most of the real noise.
        var mid = raw[OutlineMethod.Midpoint];
        Assert.InRange(mid.Floor / mid.Noise, 0.5, 1.2);
        // Length and width integrate over the whole outline: their pixelation noise is far below the contour's.
        Assert.True(mid.VarL < 0.05, $"var_L noise {mid.VarL}");
    }
}
