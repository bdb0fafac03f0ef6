using ShapeNoise.Nematic;
using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Statistics;

public class BlockResamplingTests
{
    private static double Mean(double[] x, int[] w)
    {
        double s = 0, n = 0;
        for (int i = 0; i < x.Length; i++) { s += w[i] * x[i]; n += w[i]; }
        return s / n;
    }

    /// <summary>
    /// For the mean, the jackknife influence is exactly u_i = x_i - mean (Efron and Tibshirani 1993, ch. 11). Items come in
    /// identical pairs split over two one-item blocks within the edge radius, so W = sum u_i^2 and C = W: the true variance
    /// of the mean is twice what block resampling sees and the inflation is sqrt(2) (hand computation).
    /// </summary>
    [Fact]
    public void EdgeInflation_IdenticalPairsAcrossEdges_IsSqrtTwo()
    {
        var rng = new Random(3);
        int pairs = 20, n = 2 * pairs;
        var x = new double[n]; var px = new double[n]; var py = new double[n]; var unit = new int[n];
        for (int p = 0; p < pairs; p++)
        {
            double v = rng.NextDouble();
            x[2 * p] = v; x[2 * p + 1] = v;
            px[2 * p] = 100 * p; px[2 * p + 1] = 100 * p + 1; py[2 * p] = py[2 * p + 1] = 0;
            unit[2 * p] = 2 * p; unit[2 * p + 1] = 2 * p + 1;
        }
        var plan = ResamplingPlan.OverGroups("spatial blocks", unit, n, 10, 1, 1) with { ItemX = px, ItemY = py, EdgeRadiusPx = 5 };
        Assert.Equal(Math.Sqrt(2), Bootstrap.EdgeInflation(plan, w => Mean(x, w)), 9);
        // Far apart (beyond the radius) nothing is added.
        var far = plan with { EdgeRadiusPx = 0.5 };
        Assert.Equal(1.0, Bootstrap.EdgeInflation(far, w => Mean(x, w)), 12);
    }

    /// <summary>
    /// Moving-block bootstrap of iid N(0, 1) series: the interval of the mean should have the normal-theory width
    /// 2 x 1.96 / sqrt(N) (handbook: standard error of a mean); the block length rule round(nbar^(1/3)) (Hall, Horowitz
    /// and Jing 1995) gives 4 for series of 60. Tolerance 15 %: 2000 resamples and percentile noise.
    /// </summary>
    [Fact]
    public void Mean_IidSeries_WidthMatchesNormalTheory()
    {
        var rng = new Random(11);
        var series = new List<double[]>();
        for (int k = 0; k < 3; k++) series.Add(Enumerable.Range(0, 60).Select(_ => MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1)).ToArray());
        var e = MovingBlockBootstrap.Mean(series, 2000, 5);
        Assert.Equal(EstimateStatus.Ok, e.Status);
        Assert.Equal("time blocks", e.UnitName);
        Assert.Equal(3 * (60 / 4), e.N);
        Assert.Equal(4, MovingBlockBootstrap.BlockLength(60, 60));
        double width = e.High - e.Low, expected = 2 * 1.959964 / Math.Sqrt(180);
        Assert.InRange(width / expected, 0.85, 1.15);
        Assert.Equal(series.SelectMany(s => s).Average(), e.Value, 12);
    }

    /// <summary>Time weighting (docs/defects.md#headward-speed): the pooled speed is sum n_i v_i / sum n_i (hand computation);
    /// one track is too_few; three tracks take their interval from time blocks.</summary>
    [Fact]
    public void Summarise_TracksOfDifferentLengths_TimeWeightedAndStatusByCount()
    {
        DefectTrack T(int id, double v, int n) => new(id, 0.5, 0, n + 1, n + 2, v, double.NaN) { SpeedSamples = n, FlowSamples = 0 };
        var obs = new List<DefectObservation>(); var rng = new Random(2);
        void Add(int id, double v, int n) { for (int f = 1; f <= n; f++) obs.Add(new DefectObservation(f, id, new Defect(0, 0, 0.5, 1, 0, 0.5), 0, 0, v + 0.2 * (rng.NextDouble() - 0.5), 0, 0, double.NaN)); }
        var tracks = new List<DefectTrack>();
        double[] v = [0.5, -0.2, 0.1, 0.3, 0.0, 0.2]; int[] n = [47, 9, 20, 30, 12, 25];
        for (int i = 0; i < v.Length; i++) { tracks.Add(T(i + 1, v[i], n[i])); Add(i + 1, v[i], n[i]); }
        var all = HeadwardStatistics.Summarise(tracks, obs, 500, 1);
        double expected = v.Zip(n, (a, b) => a * b).Sum() / n.Sum();
        Assert.Equal(expected, all.Headward.Value, 12);
        Assert.Equal("defect tracks", all.Headward.UnitName);
        Assert.Equal(EstimateStatus.Ok, all.Headward.Status);

        var one = HeadwardStatistics.Summarise(tracks.Take(1).ToList(), obs, 500, 1);
        Assert.Equal(EstimateStatus.TooFew, one.Headward.Status);
        Assert.Equal(1, one.Headward.N);

        var three = HeadwardStatistics.Summarise(tracks.Take(3).ToList(), obs, 500, 1);
        Assert.Equal("time blocks", three.Headward.UnitName);
        Assert.Equal(EstimateStatus.Ok, three.Headward.Status);
        Assert.True(three.Headward.Low < three.Headward.Value && three.Headward.Value < three.Headward.High);
    }
}
