using ShapeNoise.Statistics;

namespace ShapeNoise.Fluctuations;

/// <summary>The resampling plan of a run and what chose it (docs/statistics.md#within-movie-intervals).</summary>
/// <param name="Plan">The shared resampling plan.</param>
/// <param name="CorrelationLengthPx">Estimated correlation length xi of the shape fluctuations (px); NaN for the track bootstrap.</param>
public sealed record SpatialPlan(ResamplingPlan Plan, double CorrelationLengthPx);

/// <summary>
/// Spatial block bootstrap for a confluent tissue (docs/statistics.md#within-movie-intervals): the correlation length xi
/// of simultaneous length residuals between cells is estimated from the data, the field is cut into square blocks of side
/// <see cref="BlockSideInXi"/> xi, and the blocks (not the tracks) are resampled.
/// </summary>
/// <remarks>Künsch H.R. (1989), "The jackknife and the bootstrap for general stationary observations", Ann. Statist.
/// 17:1217-1241; Lahiri S.N. (2003), Resampling Methods for Dependent Data, Springer, ch. 12 (spatial block bootstrap);
/// Efron B. and Tibshirani R.J. (1993), An Introduction to the Bootstrap, Chapman and Hall.</remarks>
public static class SpatialBlocks
{
    /// <summary>Field coverage (cell area over field area, per frame) from which the tissue counts as confluent: the
    /// sparse ellipse demo covers 14 %, the synthetic monolayer about 100 %.</summary>
    public const double ConfluentCoverage = 0.8;
    /// <summary>Block side in units of xi: three correlation lengths keep most correlated pairs inside one block while
    /// leaving about 30 blocks in a 600-cell field; the pairs that straddle block edges are accounted for by the
    /// block-edge correction (docs/statistics.md#block-edges).</summary>
    public const double BlockSideInXi = 3;
    /// <summary>Distance, in units of xi, within which tracks of neighbouring blocks are taken to covary in the block-edge
    /// correction (docs/statistics.md#block-edges): the residual correlation has fallen below 1/e at xi and is small at 2 xi.</summary>
    public const double EdgeRadiusInXi = 2;

    /// <summary>The plan for the used tracks (those with a contour, in order): over spatial blocks when
    /// <paramref name="coverage"/> &gt;= <see cref="ConfluentCoverage"/>, else over tracks.</summary>
    public static SpatialPlan For(IReadOnlyList<TrackRecord> allTracks, double coverage, int resamples, int seed)
    {
        var t = allTracks.Where(x => x.Used && x.Contour is not null).ToList();
        if (!(coverage >= ConfluentCoverage) || t.Count < 2)
            return new SpatialPlan(ResamplingPlan.OverTracks(t.Count, resamples, seed), double.NaN);
        var cx = t.Select(x => x.CentroidX.Average()).ToArray();
        var cy = t.Select(x => x.CentroidY.Average()).ToArray();
        double xi = CorrelationLengthPx(t, cx, cy);
        double side = BlockSideInXi * xi;
        var (unit, units) = AssignBlocks(cx, cy, side);
        var plan = ResamplingPlan.OverGroups("spatial blocks", unit, units, resamples, seed, side) with { ItemX = cx, ItemY = cy, EdgeRadiusPx = EdgeRadiusInXi * xi };
        return new SpatialPlan(plan, xi);
    }

    /// <summary>Mean nearest-neighbour distance between the points (px); NaN for fewer than 2.</summary>
    public static double MeanSpacingPx(double[] x, double[] y)
    {
        int n = x.Length;
        if (n < 2) return double.NaN;
        double s = 0;
        for (int i = 0; i < n; i++)
        {
            double best = double.PositiveInfinity;
            for (int j = 0; j < n; j++)
                if (j != i) best = Math.Min(best, (x[i] - x[j]) * (x[i] - x[j]) + (y[i] - y[j]) * (y[i] - y[j]));
            s += Math.Sqrt(best);
        }
        return s / n;
    }

    /// <summary>
    /// xi: pairs of tracks at distance r (of their mean centroids) get the correlation of their standardised length residuals
    /// over the frames they share, z_i(t) = (L_i(t) - mean L_i) / sd L_i, rho_ij = mean_t z_i z_j; rho is averaged in bins
    /// of half the mean spacing a, and xi is the first bin centre where it falls below 1/e, at least a.
    /// </summary>
    public static double CorrelationLengthPx(IReadOnlyList<TrackRecord> tracks, double[] cx, double[] cy)
    {
        int n = tracks.Count;
        double a = MeanSpacingPx(cx, cy);
        if (!double.IsFinite(a) || a <= 0) return double.NaN;
        var z = new Dictionary<int, double>[n];
        for (int i = 0; i < n; i++)
        {
            var L = tracks[i].LengthPx;
            double m = Descriptive.Mean(L), sd = Math.Sqrt(Descriptive.PopulationVariance(L));
            z[i] = [];
            if (sd > 0) for (int k = 0; k < L.Length; k++) z[i][tracks[i].FrameIndex[k]] = (L[k] - m) / sd;
        }
        double bin = 0.5 * a, rMax = 15 * a;
        int nb = (int)Math.Ceiling(rMax / bin);
        var sum = new double[nb]; var cnt = new int[nb];
        for (int i = 0; i < n; i++)
            for (int j = i + 1; j < n; j++)
            {
                double r = Math.Sqrt((cx[i] - cx[j]) * (cx[i] - cx[j]) + (cy[i] - cy[j]) * (cy[i] - cy[j]));
                int b = (int)(r / bin);
                if (b >= nb) continue;
                double s = 0; int c = 0;
                foreach (var (f, v) in z[i]) if (z[j].TryGetValue(f, out var w)) { s += v * w; c++; }
                if (c < 3) continue;
                sum[b] += s / c; cnt[b]++;
            }
        for (int b = 0; b < nb; b++)
            if (cnt[b] >= 3 && sum[b] / cnt[b] < 1 / Math.E) return Math.Max(a, (b + 0.5) * bin);
        return rMax;
    }

    /// <summary>Square blocks of side <paramref name="sidePx"/> on the bounding box of the points; each point gets its
    /// block, empty blocks are dropped and the rest numbered 0 .. units - 1 in raster order.</summary>
    public static (int[] UnitOfItem, int Units) AssignBlocks(double[] x, double[] y, double sidePx)
    {
        int n = x.Length;
        var unit = new int[n];
        if (n == 0) return (unit, 0);
        if (!(sidePx > 0)) { for (int i = 0; i < n; i++) unit[i] = i; return (unit, n); }
        double x0 = x.Min(), y0 = y.Min();
        int nx = (int)Math.Floor((x.Max() - x0) / sidePx) + 1;
        var raw = new long[n];
        for (int i = 0; i < n; i++) raw[i] = (long)Math.Floor((y[i] - y0) / sidePx) * nx + (long)Math.Floor((x[i] - x0) / sidePx);
        var ids = raw.Distinct().OrderBy(v => v).Select((v, k) => (v, k)).ToDictionary(p => p.v, p => p.k);
        for (int i = 0; i < n; i++) unit[i] = ids[raw[i]];
        return (unit, ids.Count);
    }
}
