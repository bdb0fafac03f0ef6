namespace ShapeNoise.Statistics;

/// <summary>
/// One set of bootstrap resamples shared by every within-movie estimate of a run (docs/statistics.md#within-movie-intervals):
/// <see cref="Items"/> items (the used tracks, in order) belong to <see cref="Units"/> independent units (the tracks
/// themselves for isolated cells, square spatial blocks for a confluent tissue); each resample draws units with
/// replacement and every item inherits its unit's multiplicity.
/// </summary>
/// <param name="UnitName">"tracks" or "spatial blocks".</param>
/// <param name="Units">Number of independent units.</param>
/// <param name="UnitOfItem">Per item, its unit (0 .. Units - 1).</param>
/// <param name="Draws">Per resample, per item, its multiplicity.</param>
/// <param name="BlockSizePx">Side of the spatial blocks (px); NaN for the track bootstrap.</param>
public sealed record ResamplingPlan(string UnitName, int Units, int[] UnitOfItem, int[][] Draws, double BlockSizePx)
{
    /// <summary>Number of items (used tracks).</summary>
    public int Items => UnitOfItem.Length;
    /// <summary>Item positions (px) for the block-edge correction of <see cref="Bootstrap.Percentile(ResamplingPlan, Func{int[], double})"/>; null = no correction.</summary>
    public double[]? ItemX { get; init; }
    /// <summary>See <see cref="ItemX"/>.</summary>
    public double[]? ItemY { get; init; }
    /// <summary>Whether intervals from this plan get the block-edge correction (positions and a radius are set).</summary>
    public bool EdgeCorrected => ItemX is not null && ItemY is not null && EdgeRadiusPx > 0;

    /// <summary>The delete-one-unit jackknife as draws: draw k gives every item multiplicity 1 except those of unit k (0).</summary>
    public int[][] LeaveOneUnitOut()
    {
        var d = new int[Units][];
        for (int k = 0; k < Units; k++)
        {
            d[k] = new int[Items];
            for (int i = 0; i < Items; i++) d[k][i] = UnitOfItem[i] == k ? 0 : 1;
        }
        return d;
    }

    /// <summary>Pairs of different units whose mean item positions are within 1.5 block sides (the 8 neighbours of a square grid).</summary>
    public List<(int A, int B)> NeighbourUnits()
    {
        var pairs = new List<(int, int)>();
        if (ItemX is null || ItemY is null || !(BlockSizePx > 0)) return pairs;
        var cx = new double[Units]; var cy = new double[Units]; var n = new int[Units];
        for (int i = 0; i < Items; i++) { cx[UnitOfItem[i]] += ItemX[i]; cy[UnitOfItem[i]] += ItemY[i]; n[UnitOfItem[i]]++; }
        for (int k = 0; k < Units; k++) if (n[k] > 0) { cx[k] /= n[k]; cy[k] /= n[k]; }
        double r2 = 2.25 * BlockSizePx * BlockSizePx;
        for (int a = 0; a < Units; a++)
            for (int b = a + 1; b < Units; b++)
                if ((cx[a] - cx[b]) * (cx[a] - cx[b]) + (cy[a] - cy[b]) * (cy[a] - cy[b]) <= r2) pairs.Add((a, b));
        return pairs;
    }

    /// <summary>Distance (px) within which items of different blocks still covary (docs/statistics.md#block-edges); 0 = no correction.</summary>
    public double EdgeRadiusPx { get; init; }

    /// <summary>The bootstrap over items, each its own unit ("tracks").</summary>
    public static ResamplingPlan OverTracks(int tracks, int resamples, int seed)
    {
        var unit = new int[tracks];
        for (int i = 0; i < tracks; i++) unit[i] = i;
        return new ResamplingPlan("tracks", tracks, unit, tracks == 0 ? [] : Bootstrap.Draws(tracks, resamples, seed), double.NaN);
    }

    /// <summary>
    /// The bootstrap over groups of items: <paramref name="unitOfItem"/> gives each item's group (0 .. units - 1); units are
    /// drawn with replacement from one seeded stream and every item gets its group's multiplicity.
    /// </summary>
    public static ResamplingPlan OverGroups(string unitName, int[] unitOfItem, int units, int resamples, int seed, double blockSizePx)
    {
        var unitDraws = units == 0 ? [] : Bootstrap.Draws(units, resamples, seed);
        var draws = new int[unitDraws.Length][];
        for (int b = 0; b < unitDraws.Length; b++)
        {
            draws[b] = new int[unitOfItem.Length];
            for (int i = 0; i < unitOfItem.Length; i++) draws[b][i] = unitDraws[b][unitOfItem[i]];
        }
        return new ResamplingPlan(unitName, units, unitOfItem, draws, blockSizePx);
    }
}
