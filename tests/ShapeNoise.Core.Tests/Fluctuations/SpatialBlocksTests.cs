using ShapeNoise.Fluctuations;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Fluctuations;

public class SpatialBlocksTests(ITestOutputHelper output)
{
    [Fact]
    public void MeanSpacingPx_SquareLattice_ReturnsSpacing()
    {
        // On a square lattice of spacing s every point's nearest neighbour is at s (geometry).
        const double s = 7.5;
        var x = new List<double>(); var y = new List<double>();
        for (int r = 0; r < 9; r++) for (int c = 0; c < 11; c++) { x.Add(3 + c * s); y.Add(-2 + r * s); }
        Assert.Equal(s, SpatialBlocks.MeanSpacingPx([.. x], [.. y]), 10);
    }

    [Theory]
    [InlineData(2.5, 16)]   // x = 0..9: floor(x / 2.5) takes 4 values per axis (arithmetic)
    [InlineData(3.0, 16)]   // floor(x / 3) = 0, 1, 2, 3 (the last block holds only x = 9)
    [InlineData(5.0, 4)]
    [InlineData(10.0, 1)]
    [InlineData(1.0, 100)]  // every point its own block
    public void AssignBlocks_TenByTenGrid_GivesExpectedBlockCount(double side, int expected)
    {
        var x = new double[100]; var y = new double[100];
        for (int i = 0; i < 100; i++) { x[i] = i % 10; y[i] = i / 10; }
        var (unit, units) = SpatialBlocks.AssignBlocks(x, y, side);
        Assert.Equal(expected, units);
        Assert.Equal(expected, unit.Distinct().Count());
        Assert.All(unit, u => Assert.InRange(u, 0, units - 1));
    }

    [Fact]
    public void AssignBlocks_SideTwoPointFive_PutsPointsOfOneSquareTogether()
    {
        // Block columns (and rows) {0,1,2}, {3,4}, {5,6,7}, {8,9} for side 2.5 (floor(x / 2.5)), so block sizes are products of
        // 3, 2, 3, 2: four blocks of 9, eight of 6, four of 4 (arithmetic); raster order puts (0,0) in block 0, (9,9) in block 15.
        var x = new double[100]; var y = new double[100];
        for (int i = 0; i < 100; i++) { x[i] = i % 10; y[i] = i / 10; }
        var (unit, _) = SpatialBlocks.AssignBlocks(x, y, 2.5);
        var sizes = unit.GroupBy(u => u).Select(g => g.Count()).OrderBy(c => c).ToArray();
        Assert.Equal([4, 4, 4, 4, 6, 6, 6, 6, 6, 6, 6, 6, 9, 9, 9, 9], sizes);
        Assert.Equal(0, unit[0]);
        Assert.Equal(15, unit[99]);
        Assert.Equal(unit[0], unit[2 * 10 + 2]);
        Assert.NotEqual(unit[0], unit[3]);
    }

    private static readonly TissueOptions Field = new(Columns: 20, Rows: 20, Frames: 100, TauFrames: 2);

    private static double Xi(TissueOptions o, int seed)
    {
        var t = CorrelatedTissue.Generate(o, seed);
        var (cx, cy) = CorrelatedTissue.Centroids(t);
        return SpatialBlocks.CorrelationLengthPx(t, cx, cy);
    }

    [Fact]
    public void CorrelationLengthPx_IndependentCells_ReturnsAboutMeanSpacing()
    {
        // Without correlation every distance bin averages to ~0 < 1/e, so xi is the floor, the mean nearest-neighbour spacing
        // (docs/statistics.md#within-movie-intervals). On the jittered hexagonal lattice (a = 16 px, jitter sd 1.5 px per axis)
        // each of the 6 neighbour distances is about a + N(0, 1.5 sqrt(2)) and the nearest is their minimum, E ~ a - 1.27 x 2.1
        // = 13.3 px = 0.83 a (expected minimum of 6 unit normals ~ -1.27, from memory); hence the band 0.75 a .. 1.25 a.
        double a = Field.SpacingPx;
        for (int seed = 1; seed <= 3; seed++)
        {
            double xi = Xi(Field, seed);
            output.WriteLine($"seed {seed}: xi {xi:0.00} px, a {a} px");
            Assert.InRange(xi / a, 0.75, 1.25);
        }
    }

    [Fact]
    public void CorrelationLengthPx_GaussianKernel_GrowsWithKernelNearTwoL()
    {
        // The generator's correlation between cells at distance r is exp(-r^2 / 4 l^2) (a Gaussian of width sqrt(2) l: the
        // autoconvolution of the kernel exp(-r^2 / 2 l^2), Gaussian algebra), which falls to 1/e at r = 2 l. xi is read at
        // the first bin (width a / 2) whose mean falls below 1/e, so it should lie within a factor 1.3 of 2 l, and it must grow
        // with l over l = 0, 2a, 4a.
        double a = Field.SpacingPx;
        double xi0 = Xi(Field, 11), xi2 = Xi(Field with { KernelPx = 2 * a }, 11), xi4 = Xi(Field with { KernelPx = 4 * a }, 11);
        output.WriteLine($"xi(l = 0) {xi0:0.0} px; xi(l = 2a) {xi2:0.0} px vs 2l = {4 * a} px; xi(l = 4a) {xi4:0.0} px vs 2l = {8 * a} px");
        Assert.True(xi0 < xi2 && xi2 < xi4, $"{xi0}, {xi2}, {xi4}");
        Assert.InRange(xi2 / (4 * a), 1 / 1.3, 1.3);
        Assert.InRange(xi4 / (8 * a), 1 / 1.3, 1.3);
    }
}
