using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Core.Tests.Nematic;

public class CoarseSweepTests
{
    [Fact]
    public void Parse_ListOfWidths_InOrder()
    {
        var w = CoarseSweep.Parse(" 1R0, 2.5R0 ,12", "--coarse-sweep");
        Assert.Equal([new LengthSpec(1, true), new LengthSpec(2.5, true), new LengthSpec(12, false)], w);
        Assert.Throws<ArgumentException>(() => CoarseSweep.Parse("2R0,-1", "--coarse-sweep"));
        Assert.Throws<ArgumentException>(() => CoarseSweep.Parse(",", "--coarse-sweep"));
    }

    [Fact]
    public void Run_PairCloserThanTheWidth_VanishesAtLargeWidth()
    {
        // A +1/2 / -1/2 pair has total winding 0: smoothed over a width much larger than its separation d the director
        // field around both cores is uniform and neither is found (common practice in active-nematics analysis; the
        // coarse-grained exact pair vanished below d = 2.3 g in DefectStatisticsTests). Separation 0.2 of a 387 px canvas
        // (77 px); R0 = 8.9 px: at 2 R0 (18 px) the pair is found, at 5 R0 (45 px, d < 2.3 g) it is not.
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions { Cells = 600, Frames = 10, Separation = 0.2, Motion = DefectMotion.None });
        var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, m.Frames().ToList()),
            new AnalysisOptions { BootstrapResamples = 50, MinTrackFrames = 5, CoarseSweep = "2R0,5R0" });
        Assert.Equal(2, r.CoarseSweep.Count);
        Assert.InRange(r.CoarseSweep[0].PlusPerFrame, 0.9, 1.1);
        Assert.InRange(r.CoarseSweep[0].MinusPerFrame, 0.9, 1.1);
        Assert.Equal(0, r.CoarseSweep[1].PlusPerFrame);
        Assert.Equal(0, r.CoarseSweep[1].MinusPerFrame);
        // The sweep's entry at the analysis's own width (2R0) is the main defect stage.
        Assert.Equal(r.Defects.PlusPerFrame, r.CoarseSweep[0].PlusPerFrame);
    }
}

/// <summary>The coarse-graining's separable smoothing against its defining sums.</summary>
public class CoarseGrainingSmoothTests
{
    [Fact]
    public void Smooth_RandomField_EqualsDefiningSumsBitForBit()
    {
        // Reference: the separable Gaussian sums of the summary, g(x, y) = sum_i k_i f(x + i, y), then
        // sum_i k_i g(x, y + i), zero outside, each sum taken in the order i = -r..r. The row-wise kernel adds its taps in
        // that order with unfused multiply-adds, so equality is exact (the speed change of issue 16 must not change a bit).
        int nx = 37, ny = 23; double sigma = 2.3;
        var rng = new Random(11);
        var f = new double[nx * ny];
        for (int k = 0; k < f.Length; k++) f[k] = rng.NextDouble();
        int r = Math.Max(1, (int)Math.Ceiling(3 * sigma));
        var w = new double[2 * r + 1];
        for (int i = -r; i <= r; i++) w[i + r] = Math.Exp(-0.5 * i * i / (sigma * sigma));
        var g = new double[f.Length]; var expected = new double[f.Length];
        for (int y = 0; y < ny; y++)
            for (int x = 0; x < nx; x++)
            {
                double s = 0;
                for (int i = Math.Max(-r, -x); i <= Math.Min(r, nx - 1 - x); i++) s += w[i + r] * f[y * nx + x + i];
                g[y * nx + x] = s;
            }
        for (int y = 0; y < ny; y++)
            for (int x = 0; x < nx; x++)
            {
                double s = 0;
                for (int i = Math.Max(-r, -y); i <= Math.Min(r, ny - 1 - y); i++) s += w[i + r] * g[(y + i) * nx + x];
                expected[y * nx + x] = s;
            }
        ShapeNoise.Nematic.CoarseGraining.Smooth(f, nx, ny, sigma);
        for (int k = 0; k < f.Length; k++) Assert.Equal(expected[k], f[k]);
    }
}
