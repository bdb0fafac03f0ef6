using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;
using ShapeNoise.Statistics;

namespace ShapeNoise.Nematic;

/// <summary>The within-movie test of the shape-noise hypothesis (docs/measures.md#shape-noise-hypothesis).</summary>
/// <param name="SpearmanRho">Spearman correlation of log local anisotropy with headward speed over +1/2 defect tracks.</param>
/// <param name="PValue">Two-sided permutation p-value (seeded).</param>
/// <param name="Rho95">Bootstrap 95% interval of rho over defect tracks.</param>
/// <param name="DefectTracks">Number of +1/2 defect tracks with both numbers.</param>
/// <param name="LocalAnisotropy">Per defect track: local var_L / var_W of the cells near its core.</param>
/// <param name="HeadwardSpeed">Per defect track: its headward speed (px/frame).</param>
public sealed record HypothesisResult(double SpearmanRho, double PValue, Estimate Rho95, int DefectTracks, double[] LocalAnisotropy, double[] HeadwardSpeed)
{
    /// <summary>ok with at least <see cref="ShapeNoiseHypothesis.MinDefectTracks"/> defect tracks, else too_few; not_applicable when the defect stage is.</summary>
    public EstimateStatus Status { get; init; } = DefectTracks >= ShapeNoiseHypothesis.MinDefectTracks ? EstimateStatus.Ok : EstimateStatus.TooFew;

    /// <summary>No +1/2 defect track to test.</summary>
    public static HypothesisResult Empty => new(double.NaN, double.NaN, Estimate.NaN, 0, [], []);
}

/// <summary>
/// Local anisotropy around each +1/2 defect track (pooled var_L / var_W of the cells within two coarse widths of the core,
/// residuals about each cell track's own mean, over the defect's lifetime), and its Spearman correlation with the
/// defect's headward speed, with a seeded permutation p-value and a bootstrap interval over defect tracks.
/// </summary>
/// <remarks>The hypothesis that anisotropic shape fluctuations can turn the tailward motion expected from contractile
/// stresses into headward motion; docs/measures.md#shape-noise-hypothesis. Statistics: <see cref="RankCorrelation"/>, <see cref="Bootstrap"/>.</remarks>
public static class ShapeNoiseHypothesis
{
    /// <summary>Fewest +1/2 defect tracks for the test (docs/statistics.md#minimum-units): with 4, the smallest two-sided
    /// permutation p-value of a perfect rank correlation is 2/4! = 0.083, so p &lt; 0.05 is impossible below 5 (2/5! = 0.017).</summary>
    public const int MinDefectTracks = 5;

    /// <summary>Runs the test on the defect stage's result <paramref name="defects"/> for the analysed <paramref name="cells"/>
    /// and <paramref name="tracks"/>; seeds and resamples from <paramref name="o"/>. Uses no cell velocities.</summary>
    public static HypothesisResult Test(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks, DefectResult defects, DefectOptions o)
    {
        var plus = defects.Tracks.Where(t => t.Charge == 0.5 && double.IsFinite(t.HeadwardSpeed)).ToList();
        if (plus.Count == 0) return HypothesisResult.Empty;
        var meanL = new Dictionary<int, (double L, double W)>();
        foreach (var t in tracks) if (t.Used) meanL[t.Id] = (t.LengthPx.Average(), t.WidthPx.Average());
        var runs = FrameRuns.Of(cells).ToDictionary(r => r.Frame, r => (r.Start, r.Count));
        double r2 = 4 * defects.CoarsePx * defects.CoarsePx;   // within 2 coarse widths
        var local = new List<double>(); var speed = new List<double>();
        foreach (var dt in plus)
        {
            double sl = 0, sw = 0;
            foreach (var obs in defects.Observations)
            {
                if (obs.TrackId != dt.Id || !runs.TryGetValue(obs.Frame, out var run)) continue;
                for (int i = run.Start; i < run.Start + run.Count; i++)
                {
                    var c = cells[i];
                    double dx = c.Shape.CentroidX - obs.Defect.X, dy = c.Shape.CentroidY - obs.Defect.Y;
                    if (dx * dx + dy * dy > r2 || !meanL.TryGetValue(c.TrackId, out var m)) continue;
                    sl += (c.Shape.LengthPx - m.L) * (c.Shape.LengthPx - m.L);
                    sw += (c.Shape.WidthPx - m.W) * (c.Shape.WidthPx - m.W);
                }
            }
            if (sl > 0 && sw > 0) { local.Add(sl / sw); speed.Add(dt.HeadwardSpeed); }
        }
        int n = local.Count;
        if (n < MinDefectTracks) return new HypothesisResult(double.NaN, double.NaN, Estimate.NaN, n, local.ToArray(), speed.ToArray());
        var logA = local.Select(a => Math.Log(a)).ToArray(); var v = speed.ToArray();
        var (rho, p) = RankCorrelation.PermutationTest(logA, v, 9999, o.Seed);
        var ci = Bootstrap.Percentile(n, k =>
        {
            var xs = new List<double>(); var ys = new List<double>();
            for (int i = 0; i < n; i++) for (int r = 0; r < k[i]; r++) { xs.Add(logA[i]); ys.Add(v[i]); }
            return RankCorrelation.Spearman(xs.ToArray(), ys.ToArray());
        }, o.BootstrapResamples, o.Seed);
        return new HypothesisResult(rho, p, ci, n, local.ToArray(), speed.ToArray());
    }
}
