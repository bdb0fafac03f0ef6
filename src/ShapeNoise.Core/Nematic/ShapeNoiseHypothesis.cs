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
    /// <summary>Random-position null: p = (1 + #{|rho_j| &gt;= |rho|}) / (1 + J) over J draws in which every defect track's
    /// local anisotropy is taken about a random position of the tissue instead of its core (NaN without a test).</summary>
    public double RandomPositionP { get; init; } = double.NaN;
    /// <summary>2.5 and 97.5 percentiles of rho under the random-position null (NaN without a test).</summary>
    public (double Low, double High) RandomPositionRho95 { get; init; } = (double.NaN, double.NaN);
    /// <summary>+1/2 defect tracks left out for having fewer than <see cref="ShapeNoiseHypothesis.MinSpeedSamples"/> frames with a speed.</summary>
    public int ShortTracksLeftOut { get; init; }

    /// <summary>No +1/2 defect track to test.</summary>
    public static HypothesisResult Empty => new(double.NaN, double.NaN, Estimate.NaN, 0, [], []);
}

/// <summary>
/// Local anisotropy around each +1/2 defect track (pooled var_L / var_W of the cells within two coarse widths of the core,
/// residuals about each cell track's own mean, over the defect's lifetime), and its Spearman correlation with the
/// defect's headward speed, with a seeded permutation p-value, a bootstrap interval over defect tracks, and a second null
/// in which the local anisotropy is taken about random positions of the tissue (docs/measures.md#shape-noise-hypothesis).
/// </summary>
/// <remarks>The hypothesis that anisotropic shape fluctuations can turn the tailward motion expected from contractile
/// stresses into headward motion; docs/measures.md#shape-noise-hypothesis. Statistics: <see cref="RankCorrelation"/>, <see cref="Bootstrap"/>;
/// the random-position null is a Monte Carlo test (Besag J. and Diggle P.J. (1977), "Simple Monte Carlo tests for spatial
/// pattern", Appl. Statist. 26:327-333).</remarks>
public static class ShapeNoiseHypothesis
{
    /// <summary>Fewest +1/2 defect tracks for the test (docs/statistics.md#minimum-units): with 4, the smallest two-sided
    /// permutation p-value of a perfect rank correlation is 2/4! = 0.083, so p &lt; 0.05 is impossible below 5 (2/5! = 0.017).</summary>
    public const int MinDefectTracks = 5;

    /// <summary>Fewest frames with a speed for a defect track to enter the test: a shorter fragment's mean speed is dominated
    /// by the frame-to-frame jitter of the core position (docs/measures.md#shape-noise-hypothesis).</summary>
    public const int MinSpeedSamples = 8;

    /// <summary>Draws of the random-position null.</summary>
    public const int RandomPositionDraws = 199;

    /// <summary>Runs the test on the defect stage's result <paramref name="defects"/> for the analysed <paramref name="cells"/>
    /// and <paramref name="tracks"/>; seeds and resamples from <paramref name="o"/>. Uses no cell velocities.</summary>
    public static HypothesisResult Test(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks, DefectResult defects, DefectOptions o)
    {
        var candidates = defects.Tracks.Where(t => t.Charge == 0.5 && double.IsFinite(t.HeadwardSpeed)).ToList();
        if (candidates.Count == 0) return HypothesisResult.Empty;
        var plus = candidates.Where(t => t.SpeedSamples >= MinSpeedSamples).ToList();
        int shortOut = candidates.Count - plus.Count;
        var field = ResidualField.Of(cells, tracks);
        double r2 = 4 * defects.CoarsePx * defects.CoarsePx;   // within 2 coarse widths
        var paths = new Dictionary<int, List<(int Frame, double X, double Y)>>();
        foreach (var obs in defects.Observations)
        {
            if (!paths.TryGetValue(obs.TrackId, out var l)) paths[obs.TrackId] = l = [];
            l.Add((obs.Frame, obs.Defect.X, obs.Defect.Y));
        }
        var local = new List<double>(); var speed = new List<double>(); var used = new List<DefectTrack>();
        foreach (var dt in plus)
        {
            var a = paths.TryGetValue(dt.Id, out var path) ? field.Anisotropy(path, 0, 0, r2) : double.NaN;
            if (double.IsFinite(a) && a > 0) { local.Add(a); speed.Add(dt.HeadwardSpeed); used.Add(dt); }
        }
        int n = local.Count;
        if (n < MinDefectTracks) return new HypothesisResult(double.NaN, double.NaN, Estimate.NaN, n, local.ToArray(), speed.ToArray()) { ShortTracksLeftOut = shortOut };
        var logA = local.Select(a => Math.Log(a)).ToArray(); var v = speed.ToArray();
        var (rho, p) = RankCorrelation.PermutationTest(logA, v, 9999, o.Seed);
        var ci = Bootstrap.Percentile(n, k =>
        {
            var xs = new List<double>(); var ys = new List<double>();
            for (int i = 0; i < n; i++) for (int r = 0; r < k[i]; r++) { xs.Add(logA[i]); ys.Add(v[i]); }
            return RankCorrelation.Spearman(xs.ToArray(), ys.ToArray());
        }, o.BootstrapResamples, o.Seed, "defect tracks");
        var (nullP, nullLo, nullHi) = RandomPositionNull(field, used.Select(t => paths[t.Id]).ToList(), v, rho, r2, defects.CoarsePx, o.Seed);
        return new HypothesisResult(rho, p, ci, n, local.ToArray(), speed.ToArray())
        { RandomPositionP = nullP, RandomPositionRho95 = (nullLo, nullHi), ShortTracksLeftOut = shortOut };
    }

    /// <summary>The random-position null: each draw moves every defect track's path rigidly to a random place (its first
    /// core uniform in the cells' bounding box shrunk by 2 coarse widths), recomputes the local anisotropies there and
    /// their Spearman rho with the unchanged speeds; p counts |rho_j| &gt;= |rho|.</summary>
    private static (double P, double Low, double High) RandomPositionNull(ResidualField field, List<List<(int Frame, double X, double Y)>> paths,
        double[] speed, double rho, double r2, double coarsePx, int seed)
    {
        var rng = new Random(seed + 17);
        var (x0, y0, x1, y1) = field.Bounds;
        double m = 2 * coarsePx;
        if (!(x1 - x0 > 2 * m && y1 - y0 > 2 * m)) return (double.NaN, double.NaN, double.NaN);
        var rhos = new List<double>(); int extreme = 0;
        for (int j = 0; j < RandomPositionDraws; j++)
        {
            var a = new double[paths.Count]; bool ok = true;
            for (int i = 0; i < paths.Count && ok; i++)
            {
                double tx = x0 + m + rng.NextDouble() * (x1 - x0 - 2 * m), ty = y0 + m + rng.NextDouble() * (y1 - y0 - 2 * m);
                a[i] = field.Anisotropy(paths[i], tx - paths[i][0].X, ty - paths[i][0].Y, r2);
                ok = double.IsFinite(a[i]) && a[i] > 0;
                if (ok) a[i] = Math.Log(a[i]);
            }
            if (!ok) continue;
            double rj = RankCorrelation.Spearman(a, speed);
            if (!double.IsFinite(rj)) continue;
            rhos.Add(rj);
            if (Math.Abs(rj) >= Math.Abs(rho) - 1e-12) extreme++;
        }
        if (rhos.Count < 20) return (double.NaN, double.NaN, double.NaN);
        var (lo, hi) = Bootstrap.PercentileBounds(rhos);
        return ((1.0 + extreme) / (1.0 + rhos.Count), lo, hi);
    }

    /// <summary>Per frame, each analysed cell's centroid and squared length and width residuals about its track's mean.</summary>
    private sealed class ResidualField
    {
        private readonly Dictionary<int, (double[] X, double[] Y, double[] L2, double[] W2)> _frames = [];
        public (double X0, double Y0, double X1, double Y1) Bounds { get; private set; }

        public static ResidualField Of(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks)
        {
            var meanL = new Dictionary<int, (double L, double W)>();
            foreach (var t in tracks) if (t.Used) meanL[t.Id] = (t.LengthPx.Average(), t.WidthPx.Average());
            var f = new ResidualField();
            double x0 = double.PositiveInfinity, y0 = double.PositiveInfinity, x1 = double.NegativeInfinity, y1 = double.NegativeInfinity;
            foreach (var run in FrameRuns.Of(cells))
            {
                var xs = new List<double>(); var ys = new List<double>(); var l2 = new List<double>(); var w2 = new List<double>();
                for (int i = run.Start; i < run.Start + run.Count; i++)
                {
                    var c = cells[i];
                    if (!meanL.TryGetValue(c.TrackId, out var mm)) continue;
                    xs.Add(c.Shape.CentroidX); ys.Add(c.Shape.CentroidY);
                    l2.Add((c.Shape.LengthPx - mm.L) * (c.Shape.LengthPx - mm.L)); w2.Add((c.Shape.WidthPx - mm.W) * (c.Shape.WidthPx - mm.W));
                    x0 = Math.Min(x0, c.Shape.CentroidX); x1 = Math.Max(x1, c.Shape.CentroidX); y0 = Math.Min(y0, c.Shape.CentroidY); y1 = Math.Max(y1, c.Shape.CentroidY);
                }
                f._frames[run.Frame] = (xs.ToArray(), ys.ToArray(), l2.ToArray(), w2.ToArray());
            }
            f.Bounds = (x0, y0, x1, y1);
            return f;
        }

        /// <summary>Pooled sum of squared length residuals over squared width residuals of the cells within sqrt(r2) of the
        /// path shifted by (dx, dy), over the path's frames; NaN when either sum is 0.</summary>
        public double Anisotropy(List<(int Frame, double X, double Y)> path, double dx, double dy, double r2)
        {
            double sl = 0, sw = 0;
            foreach (var (frame, px, py) in path)
            {
                if (!_frames.TryGetValue(frame, out var fr)) continue;
                double cx = px + dx, cy = py + dy;
                for (int i = 0; i < fr.X.Length; i++)
                {
                    double ex = fr.X[i] - cx, ey = fr.Y[i] - cy;
                    if (ex * ex + ey * ey > r2) continue;
                    sl += fr.L2[i]; sw += fr.W2[i];
                }
            }
            return sl > 0 && sw > 0 ? sl / sw : double.NaN;
        }
    }
}
