using ShapeNoise.Shape;

namespace ShapeNoise.Tracking;

/// <summary>Optimal one-to-one assignment (minimum total cost) between two sets, with a gate on the cost of a pair.</summary>
/// <remarks>Hungarian algorithm in its O(n^3) shortest-augmenting-path form with dual potentials: Kuhn H.W. (1955),
/// "The Hungarian method for the assignment problem", Naval Research Logistics Quarterly 2:83-97; Munkres J. (1957),
/// J. SIAM 5:32-38; the potentials formulation of Jonker R. and Volgenant A. (1987), Computing 38:325-340.</remarks>
public static class Assignment
{
    /// <summary>
    /// Returns, for each row, the assigned column or -1. Pairs whose cost exceeds <paramref name="maxCost"/> (or is not
    /// finite) are never assigned; a row or column may stay unassigned.
    /// </summary>
    public static int[] Solve(double[,] cost, double maxCost)
    {
        int rows = cost.GetLength(0), cols = cost.GetLength(1);
        var result = new int[rows];
        Array.Fill(result, -1);
        if (rows == 0 || cols == 0) return result;
        // Square matrix: real pairs, plus a "stay unassigned" option for every row and column at a cost just above the gate.
        int n = rows + cols;
        double big = 0;
        for (int i = 0; i < rows; i++) for (int j = 0; j < cols; j++) if (double.IsFinite(cost[i, j]) && cost[i, j] <= maxCost) big = Math.Max(big, cost[i, j]);
        double skip = 2 * big + 1, forbidden = 1e6 * (skip + 1) * n;
        var a = new double[n + 1, n + 1];
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++)
            {
                double c;
                if (i < rows && j < cols) c = double.IsFinite(cost[i, j]) && cost[i, j] <= maxCost ? cost[i, j] : forbidden;
                else if (i < rows) c = j - cols == i ? skip / 2 : forbidden;       // row i left unassigned
                else if (j < cols) c = i - rows == j ? skip / 2 : forbidden;       // column j left unassigned
                else c = 0;                                                         // dummy with dummy
                a[i + 1, j + 1] = c;
            }
        var u = new double[n + 1]; var v = new double[n + 1];
        var p = new int[n + 1]; var way = new int[n + 1];
        for (int i = 1; i <= n; i++)
        {
            p[0] = i;
            int j0 = 0;
            var minv = new double[n + 1]; Array.Fill(minv, double.PositiveInfinity);
            var used = new bool[n + 1];
            do
            {
                used[j0] = true;
                int i0 = p[j0], j1 = 0;
                double delta = double.PositiveInfinity;
                for (int j = 1; j <= n; j++)
                {
                    if (used[j]) continue;
                    double cur = a[i0, j] - u[i0] - v[j];
                    if (cur < minv[j]) { minv[j] = cur; way[j] = j0; }
                    if (minv[j] < delta) { delta = minv[j]; j1 = j; }
                }
                for (int j = 0; j <= n; j++)
                    if (used[j]) { u[p[j]] += delta; v[j] -= delta; }
                    else minv[j] -= delta;
                j0 = j1;
            } while (p[j0] != 0);
            do { int j1 = way[j0]; p[j0] = p[j1]; j0 = j1; } while (j0 != 0);
        }
        for (int j = 1; j <= n; j++)
        {
            int i = p[j] - 1, jj = j - 1;
            if (i < rows && jj < cols && double.IsFinite(cost[i, jj]) && cost[i, jj] <= maxCost) result[i] = jj;
        }
        return result;
    }

    /// <summary>
    /// Optimal one-to-one assignment of points <paramref name="a"/> to points <paramref name="b"/> by Euclidean distance
    /// d = sqrt((ax - bx)^2 + (ay - by)^2), minimising the summed distance, with no pair farther apart than
    /// <paramref name="gate"/>. Returns, for each point of <paramref name="a"/>, the index into <paramref name="b"/> or -1.
    /// </summary>
    public static int[] ByDistance(ReadOnlySpan<Point2> a, ReadOnlySpan<Point2> b, double gate)
    {
        var cost = new double[a.Length, b.Length];
        for (int i = 0; i < a.Length; i++)
            for (int j = 0; j < b.Length; j++)
            {
                double dx = a[i].X - b[j].X, dy = a[i].Y - b[j].Y;
                cost[i, j] = Math.Sqrt(dx * dx + dy * dy);
            }
        return Solve(cost, gate);
    }
}
