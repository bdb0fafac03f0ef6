using ShapeNoise.Nematic;

namespace ShapeNoise.Tests.Nematic;

/// <summary>
/// Ensemble-flow geometry from docs/measures.md#nematic-field-and-defects: the velocity field rotated into each +1/2
/// defect's frame (e_head along +x), on a grid of +-3 coarse widths. v_par = v . e_head, v_perp = v . e_perp with e_perp
/// = e_head turned by +90 degrees (the code's convention, documented on EnsembleFlowAccumulator).
/// </summary>
public class EnsembleFlowTests
{
    /// <summary>A 101 x 101 grid (1 px spacing) with velocity (vx(x, y), vy(x, y)) and a uniform director along x (S = 1).</summary>
    private static NematicGrid Field(Func<double, double, double> vx, Func<double, double, double> vy)
    {
        int n = 101;
        var g = NematicGrid.FromDirector(n, n, 1, (_, _) => 0);
        for (int j = 0; j < n; j++)
            for (int i = 0; i < n; i++) { g.Vx[j * n + i] = vx(i, j); g.Vy[j * n + i] = vy(i, j); }
        return g;
    }

    [Fact]
    public void Sample_UniformFlowAlongHead_EverySampleParallelOnePerpZero()
    {
        var g = Field((_, _) => 1, (_, _) => 0);
        var grid = EnsembleFlowGrid.Default;
        var s = new List<EnsembleSample>();
        EnsembleFlowAccumulator.Sample(g, new Defect(50, 50, 0.5, 1, 0, 1), coarsePx: 5, grid, s);
        Assert.Equal(grid.Side * grid.Side, s.Count);   // +-15 px stays inside the grid: all 13 x 13 samples
        foreach (var x in s) { Assert.Equal(1, x.Vpar, 12); Assert.Equal(0, x.Vperp, 12); Assert.Equal(0.5, x.Qxx, 12); Assert.Equal(0, x.Qxy, 12); }
    }

    /// <summary>Head along +y, flow along +x: in the defect's frame the flow is along -e_perp (e_perp = (-1, 0)), and the
    /// director (along x) is perpendicular to e_head, so Qxx' = -S/2.</summary>
    [Fact]
    public void Sample_HeadAlongY_FlowAndDirectorRotated()
    {
        var g = Field((_, _) => 1, (_, _) => 0);
        var s = new List<EnsembleSample>();
        EnsembleFlowAccumulator.Sample(g, new Defect(50, 50, 0.5, 0, 1, 1), 5, EnsembleFlowGrid.Default, s);
        foreach (var x in s) { Assert.Equal(0, x.Vpar, 12); Assert.Equal(-1, x.Vperp, 12); Assert.Equal(-0.5, x.Qxx, 12); Assert.Equal(0, x.Qxy, 12); }
    }

    /// <summary>Grid geometry: with vx = x (bilinear interpolation reproduces a linear field exactly) and e_head = +x, the
    /// slot at column a (offset a x 0.5 coarse widths along e_head) holds v_par = x_core + a x 0.5 x coarse; with vy = y
    /// the slot at row b holds v_perp = y_core + b x 0.5 x coarse. Corners: +-3 coarse widths = +-15 px.</summary>
    [Fact]
    public void Result_LinearField_SlotsAtDocumentedOffsets()
    {
        var g = Field((x, _) => x, (_, y) => y);
        var grid = EnsembleFlowGrid.Default; int h = grid.HalfSteps, side = grid.Side;
        var s = new List<EnsembleSample>();
        EnsembleFlowAccumulator.Sample(g, new Defect(50, 40, 0.5, 1, 0, 1), 5, grid, s);
        var acc = new EnsembleFlowAccumulator(grid);
        acc.Add(s);
        var r = acc.Result();
        Assert.Equal(0.5, r.StepCoarse); Assert.Equal(6, r.Half);
        for (int b = -h; b <= h; b++)
            for (int a = -h; a <= h; a++)
            {
                int k = (b + h) * side + (a + h);
                Assert.Equal(1, r.Samples[k]);
                Assert.Equal(50 + a * 2.5, r.Vpar[k], 9);
                Assert.Equal(40 + b * 2.5, r.Vperp[k], 9);
            }
        Assert.Equal(35, r.Vpar[h * side + 0], 9);          // a = -6: 3 coarse widths behind the core
        Assert.Equal(55, r.Vperp[(side - 1) * side + h], 9); // b = +6: 3 coarse widths along e_perp
    }

    /// <summary>Two defects' samples in one slot average; a slot with none is NaN (hand computation).</summary>
    [Fact]
    public void Result_TwoSamplesAndEmptySlot_MeanAndNaN()
    {
        var acc = new EnsembleFlowAccumulator(new EnsembleFlowGrid(1, 1));
        acc.Add([new EnsembleSample(4, 1, 2, 0.1, 0.2), new EnsembleSample(4, 3, -2, 0.3, 0.0)]);
        var r = acc.Result();
        Assert.Equal(2, r.Samples[4]);
        Assert.Equal(2, r.Vpar[4], 15); Assert.Equal(0, r.Vperp[4], 15); Assert.Equal(0.2, r.Qxx[4], 15); Assert.Equal(0.1, r.Qxy[4], 15);
        Assert.True(double.IsNaN(r.Vpar[0]));
        Assert.Equal(0, r.Samples[0]);
    }
}
