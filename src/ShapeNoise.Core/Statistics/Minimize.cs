namespace ShapeNoise.Statistics;

/// <summary>One-dimensional minimisation on an interval: a coarse grid to find the basin, then golden-section refinement.</summary>
/// <remarks>Golden-section search: Kiefer J. (1953), "Sequential minimax search for a maximum", Proc. Am. Math. Soc.
/// 4:502-506; Press W.H. et al. (2007), Numerical Recipes, 3rd ed., sec. 10.2. The grid guards against local minima.</remarks>
internal static class Minimize
{
    /// <summary>Returns the x in [lo, hi] minimising f: the best of grid + 1 equally spaced points, refined by golden section
    /// between its neighbours to width 1e-7.</summary>
    /// <summary>The default number of grid intervals of <see cref="GridThenGolden"/>.</summary>
    public const int DefaultGrid = 48;

    /// <summary>Grid point g of <see cref="GridThenGolden"/>: lo + (hi - lo) g / grid (callers that tabulate their function at
    /// the grid points use this, so the arguments match bit for bit).</summary>
    public static double GridPoint(double lo, double hi, int g, int grid = DefaultGrid) => lo + (hi - lo) * g / grid;

    /// <summary>The grid index g with <see cref="GridPoint"/>(lo, hi, g, grid) == x exactly, or -1.</summary>
    public static int GridIndexOf(double x, double lo, double hi, int grid = DefaultGrid)
    {
        if (!(hi > lo)) return -1;
        double g = Math.Round((x - lo) / (hi - lo) * grid);
        if (!(g >= 0 && g <= grid)) return -1;
        return GridPoint(lo, hi, (int)g, grid) == x ? (int)g : -1;
    }

    public static double GridThenGolden(Func<double, double> f, double lo, double hi, int grid = DefaultGrid)
    {
        double best = double.PositiveInfinity; int bi = 0;
        for (int g = 0; g <= grid; g++)
        {
            double v = f(GridPoint(lo, hi, g, grid));
            if (v < best) { best = v; bi = g; }
        }
        double x0 = lo + (hi - lo) * Math.Max(0, bi - 1) / grid, x1 = lo + (hi - lo) * Math.Min(grid, bi + 1) / grid;
        double gr = (Math.Sqrt(5) - 1) / 2;
        double xa = x1 - gr * (x1 - x0), xb = x0 + gr * (x1 - x0);
        double fa = f(xa), fb = f(xb);
        for (int it = 0; it < 60 && x1 - x0 > 1e-7; it++)
        {
            if (fa < fb) { x1 = xb; xb = xa; fb = fa; xa = x1 - gr * (x1 - x0); fa = f(xa); }
            else { x0 = xa; xa = xb; fa = fb; xb = x0 + gr * (x1 - x0); fb = f(xb); }
        }
        return 0.5 * (x0 + x1);
    }
}
