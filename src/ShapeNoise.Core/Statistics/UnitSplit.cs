namespace ShapeNoise.Statistics;

/// <summary>
/// Item multiplicities of a resample written against the all-ones reference and the items' units
/// (docs/statistics.md#within-movie-intervals): w_i = 1 + d_u(i) + e_i, with d_u = W_u - 1 the change of unit u's
/// multiplicity and e_i the items that differ from their unit's. A sum over items sum_i w_i x_i then equals
/// X + sum_u d_u X_u + sum_i e_i x_i, with X the sum over all items and X_u over unit u's: a few units and
/// corrections instead of every item, for the block bootstrap (units drawn whole: no corrections), the delete-one-unit
/// jackknife (one unit) and the leave-one-item-out fits (one correction).
/// </summary>
/// <remarks>Per-unit sufficient statistics for resampling: each resample is a weighted sum over units (Efron B. and
/// Tibshirani R.J. (1993), An Introduction to the Bootstrap, Chapman and Hall, ch. 6 and 8, for the bootstrap of
/// statistics that are functions of sums; Künsch H.R. (1989), Annals of Statistics 17:1217-1241, for blocks).</remarks>
internal sealed class UnitSplit
{
    private static readonly System.Runtime.CompilerServices.ConditionalWeakTable<int[], UnitSplit> Cache = new();

    /// <summary>Per item, its unit (0 .. <see cref="Units"/> - 1).</summary>
    public int[] UnitOfItem { get; }
    /// <summary>Number of units.</summary>
    public int Units { get; }
    /// <summary>Items of each unit, in item order.</summary>
    public int[][] Members { get; }

    private UnitSplit(int[] unitOfItem, int units)
    {
        UnitOfItem = unitOfItem; Units = units;
        var count = new int[units];
        foreach (int u in unitOfItem)
        {
            if ((uint)u >= (uint)units) throw new ArgumentException($"unit {u} outside 0..{units - 1}", nameof(unitOfItem));
            count[u]++;
        }
        Members = new int[units][];
        for (int u = 0; u < units; u++) Members[u] = new int[count[u]];
        Array.Clear(count);
        for (int i = 0; i < unitOfItem.Length; i++) Members[unitOfItem[i]][count[unitOfItem[i]]++] = i;
    }

    /// <summary>The split of a plan's units, built once per plan (cached on its <see cref="ResamplingPlan.UnitOfItem"/>,
    /// which <c>plan with { Draws = ... }</c> keeps).</summary>
    public static UnitSplit Of(ResamplingPlan plan)
    {
        if (Cache.TryGetValue(plan.UnitOfItem, out var hit) && hit.Units == plan.Units) return hit;
        var s = new UnitSplit(plan.UnitOfItem, plan.Units);
        Cache.AddOrUpdate(plan.UnitOfItem, s);
        return s;
    }

    /// <summary>One resample's multiplicities split by <see cref="Split"/> of <paramref name="Of"/>: per unit W_u - 1, and the
    /// items that differ from their unit's, with the difference (grouped by unit: every sum formed from them is exact, so
    /// their order does not matter). Split once per resample and passed to every sum a fit forms from it.</summary>
    public sealed record Parts(UnitSplit Of, int[] UnitChange, List<(int Item, int Change)> Corrections);

    /// <summary>Splits <paramref name="weights"/> (one per item): per unit W_u - 1, with W_u the multiplicity most of unit u's
    /// items have (that of its first item when its second or third agrees), and the items whose multiplicity differs from
    /// their unit's, with the difference.</summary>
    public Parts Split(ReadOnlySpan<int> weights)
    {
        if (weights.Length != UnitOfItem.Length) throw new ArgumentException($"{weights.Length} weights for {UnitOfItem.Length} items", nameof(weights));
        var change = new int[Units]; var corrections = new List<(int Item, int Change)>();
        for (int u = 0; u < Units; u++)
        {
            var m = Members[u];
            if (m.Length == 0) continue;
            int w = weights[m[0]];
            if (m.Length > 1 && weights[m[1]] != w) w = weights[m[Math.Min(2, m.Length - 1)]];
            change[u] = w - 1;
            foreach (int i in m)
                if (weights[i] != w) corrections.Add((i, weights[i] - w));
        }
        return new Parts(this, change, corrections);
    }
}
