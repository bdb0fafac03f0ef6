using ShapeNoise.Statistics;
using ShapeNoise.TimeSeries;

namespace ShapeNoise.Tests.Statistics;

/// <summary>
/// Resample sums formed per unit (the sum over all items plus changed units and corrections) against the definition, the
/// weighted sum item by item, sum_i w_i x_i, in floating point: pair counts are integers and must match exactly; lag sums
/// within 1e-12 relative (the floating-point sum's own rounding, about n x 1e-16). The pooling is exact (integer sums), so
/// pooling per unit and track by track, and the fits on them, must agree bit for bit.
/// </summary>
public class UnitSplitTests
{
    private const int Items = 60, Units = 11, MaxLag = 8;

    private static (List<LagSums> Sums, int[][] Frames, ResamplingPlan Plan) Tracks(int seed)
    {
        var rng = new Random(seed);
        var sums = new List<LagSums>(); var frames = new int[Items][];
        var unitOfItem = new int[Items];
        for (int i = 0; i < Items; i++)
        {
            int start = rng.Next(10), n = 12 + rng.Next(20);
            // One track in five has a one-frame gap (the fit's gapped path).
            var f = Enumerable.Range(start, n).Where(t => i % 5 != 0 || t != start + n / 2).ToArray();
            double x = 0;
            var v = f.Select(_ => x = 0.8 * x + rng.NextDouble() - 0.5).ToArray();
            frames[i] = f;
            sums.Add(PooledAutocovariance.Of(new TrackSeries(f, v), MaxLag));
            unitOfItem[i] = rng.Next(Units);
        }
        for (int u = 0; u < Units; u++) unitOfItem[u] = u;   // every unit has an item
        return (sums, frames, ResamplingPlan.OverGroups("spatial blocks", unitOfItem, Units, 20, seed, 100));
    }

    /// <summary>Block draws, the delete-one-unit jackknife, leave-one-item-out (first, middle and last item of a unit) and
    /// multiplicities unrelated to the units.</summary>
    private static IEnumerable<int[]> Weights(ResamplingPlan plan, int seed)
    {
        foreach (var d in plan.Draws.Take(8)) yield return d;
        foreach (var d in plan.LeaveOneUnitOut().Take(4)) yield return d;
        var members = Enumerable.Range(0, plan.Items).Where(i => plan.UnitOfItem[i] == plan.UnitOfItem[Items - 1]).ToArray();
        foreach (int i in new[] { members[0], members[members.Length / 2], members[^1], 0, 1 })
        {
            var w = Enumerable.Repeat(1, plan.Items).ToArray(); w[i] = 0; yield return w;
        }
        var rng = new Random(seed);
        yield return Enumerable.Range(0, plan.Items).Select(_ => rng.Next(4)).ToArray();
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void Split_AnyWeights_ReconstructsEachItemsMultiplicity(int seed)
    {
        var (_, _, plan) = Tracks(seed);
        var units = UnitSplit.Of(plan);
        foreach (var w in Weights(plan, seed))
        {
            var split = units.Split(w);
            var back = new int[Items];
            for (int i = 0; i < Items; i++) back[i] = 1 + split.UnitChange[plan.UnitOfItem[i]];
            foreach (var (i, d) in split.Corrections) back[i] += d;
            Assert.Equal(w, back);
        }
        Assert.Empty(units.Split(plan.Draws[0]).Corrections);   // a block draw gives every item its unit's multiplicity
    }

    [Theory]
    [InlineData(3)]
    [InlineData(4)]
    public void Pool_ByUnits_EqualsWeightedSumItemByItem(int seed)
    {
        var (sums, _, plan) = Tracks(seed);
        var units = UnitSplit.Of(plan);
        foreach (var w in Weights(plan, seed))
        {
            var c = PooledAutocovariance.Pool(sums, w, out var pairs, int.MaxValue, units.Split(w));
            Assert.Equal(PooledAutocovariance.Pool(sums, w, out var pairsByTrack), c);
            Assert.Equal(pairsByTrack, pairs);
            for (int k = 0; k <= MaxLag; k++)
            {
                double s = 0; long p = 0;
                for (int i = 0; i < Items; i++) { s += w[i] * sums[i].Sum[k]; p += (long)w[i] * sums[i].Pairs[k]; }
                Assert.Equal(p, pairs[k]);
                Assert.True(Math.Abs(c[k] - s / p) <= 1e-12 * Math.Abs(s / p) + 1e-15, $"lag {k}: {c[k]:R} vs {s / p:R}");
            }
        }
        var ones = Enumerable.Repeat(1, Items).ToArray();
        Assert.Equal(PooledAutocovariance.Pool(sums, [], out _), PooledAutocovariance.Pool(sums, ones, out _, int.MaxValue, units.Split(ones)));
    }

    [Theory]
    [InlineData(5)]
    [InlineData(6)]
    public void Fit_ByUnits_BitForBitTheFitItemByItem(int seed)
    {
        var (sums, frames, plan) = Tracks(seed);
        var units = UnitSplit.Of(plan);
        foreach (var w in Weights(plan, seed))
        {
            Assert.Equal(OrnsteinUhlenbeckFit.Fit(sums, frames, w, 6), OrnsteinUhlenbeckFit.Fit(sums, frames, w, 6, 0, units.Split(w)));
            Assert.Equal(OrnsteinUhlenbeckFit.Fit(sums, frames, w, 6, 50), OrnsteinUhlenbeckFit.Fit(sums, frames, w, 6, 50, units.Split(w)));
        }
        var ones = Enumerable.Repeat(1, Items).ToArray();
        Assert.Equal(OrnsteinUhlenbeckFit.Fit(sums, frames, [], 6), OrnsteinUhlenbeckFit.Fit(sums, frames, ones, 6, 0, units.Split(ones)));
    }
}
