using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Tracking;

public class AssignmentTests
{
    /// <summary>Reference: exhaustive search over every partial matching (small cases), minimising first the number of
    /// unmatched items at the gate's price and then the total cost, the same objective the solver uses.</summary>
    private static double BruteForce(double[,] c, double gate, out int matched)
    {
        int r = c.GetLength(0), k = c.GetLength(1);
        double bestCost = double.PositiveInfinity; int bestMatched = -1;
        var used = new bool[k];
        double big = 0; for (int i = 0; i < r; i++) for (int j = 0; j < k; j++) if (c[i, j] <= gate) big = Math.Max(big, c[i, j]);
        double skip = 2 * big + 1;
        void Go(int i, double cost, int m)
        {
            if (i == r)
            {
                double total = cost + skip / 2 * ((r - m) + (k - m));
                if (total < bestCost - 1e-12) { bestCost = total; bestMatched = m; }
                return;
            }
            Go(i + 1, cost, m);
            for (int j = 0; j < k; j++)
                if (!used[j] && c[i, j] <= gate) { used[j] = true; Go(i + 1, cost + c[i, j], m + 1); used[j] = false; }
        }
        Go(0, 0, 0);
        matched = bestMatched;
        return bestCost;
    }

    [Fact]
    public void Solve_RandomSmallCases_MatchesBruteForce()
    {
        var rng = new Random(6);
        for (int t = 0; t < 200; t++)
        {
            int r = 1 + rng.Next(5), k = 1 + rng.Next(5);
            var c = new double[r, k];
            for (int i = 0; i < r; i++) for (int j = 0; j < k; j++) c[i, j] = rng.NextDouble() * 10;
            double gate = 6;
            var a = Assignment.Solve(c, gate);
            Assert.Equal(a.Where(x => x >= 0).Count(), a.Where(x => x >= 0).Distinct().Count());
            double big = 0; for (int i = 0; i < r; i++) for (int j = 0; j < k; j++) if (c[i, j] <= gate) big = Math.Max(big, c[i, j]);
            double skip = 2 * big + 1, total = 0; int m = 0;
            for (int i = 0; i < r; i++) if (a[i] >= 0) { Assert.True(c[i, a[i]] <= gate); total += c[i, a[i]]; m++; }
            total += skip / 2 * ((r - m) + (k - m));
            Assert.Equal(BruteForce(c, gate, out _), total, 9);
        }
    }

    [Fact]
    public void Solve_GreedyTrap_FindsGlobalOptimum()
    {
        // Greedy nearest-first would pair (0,0) at cost 1 and leave (1,1) at 10; the optimum is 2 + 2.
        var c = new double[,] { { 1, 2 }, { 2, 10 } };
        Assert.Equal([1, 0], Assignment.Solve(c, 100));
    }
}
