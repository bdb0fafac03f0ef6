using ShapeNoise.TimeSeries;
using MathNet.Numerics.LinearAlgebra;
using ShapeNoise.Dynamics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Pipeline;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Dynamics;
using ShapeNoise.Tests.Support;
using ShapeNoise.Tracking;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Fluctuations;

/// <summary>The temporal noise model (docs/measures.md#temporal-noise-model): Ornstein-Uhlenbeck signal plus white
/// measurement noise fitted to the pooled mean-subtracted autocovariance.</summary>
public class TemporalNoiseTests(ITestOutputHelper log)
{
    [Fact]
    public void ExpectedSums_FourSamplesAr1PlusWhiteNoise_MatchHandComputation()
    {
        // Textbook expectation of the mean-subtracted lagged sum (Priestley M.B. (1981), Spectral Analysis and Time Series,
        // sec. 5.3, from memory for the form): E[sum_{t=1}^{n-k} (x_t - xbar)(x_{t+k} - xbar)] = sum_t [g(k) - a_t - a_{t+k} + b],
        // a_t = (1/n) sum_u g(t - u), b = (1/n^2) sum_{u,v} g(u - v). By hand for n = 4, g(h) = s2 rho^|h| + e2 [h = 0],
        // s2 = 1, rho = 1/2, e2 = 0.3: g = 1.3, 0.5, 0.25, 0.125; row sums 2.175, 2.55, 2.55, 2.175; b = 9.45 / 16 = 0.590625;
        // lag 0: 5.2 - 4.725 + 2.3625 = 2.8375; lag 1: 1.5 - 3.6375 + 1.771875 = -0.365625;
        // lag 2: 0.5 - 2.3625 + 1.18125 = -0.68125; lag 3: 0.125 - 1.0875 + 0.590625 = -0.371875
        // (check: lag 0 + 2 x the others = 0, the deviations sum to zero).
        double[] hand = [2.8375, -0.365625, -0.68125, -0.371875];
        var s = new double[4]; var e = new double[4];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(4, 0.5, s, e);
        var sg = new double[4]; var eg = new double[4];
        OrnsteinUhlenbeckFit.ExpectedSums([0, 1, 2, 3], 0.5, sg, eg);
        for (int k = 0; k < 4; k++)
        {
            Assert.Equal(hand[k], 1.0 * s[k] + 0.3 * e[k], 12);
            Assert.Equal(hand[k], 1.0 * sg[k] + 0.3 * eg[k], 12);
        }
        // The white part alone: e2 at lag 0 and -e2/n per pair at every lag, i.e. (n - k)([k = 0] - 1/n).
        for (int k = 0; k < 4; k++) Assert.Equal((4 - k) * ((k == 0 ? 1 : 0) - 0.25), e[k], 12);
    }

    [Fact]
    public void ExpectedSums_Ar1PlusWhiteNoise_MatchCentredCovarianceMatrix()
    {
        // Matrix form of the same expectation (common practice): with the centring matrix C = I - J/n, E[d d^T] = C G C,
        // G_uv = g(u - v); the lag-k sum is the sum of the k-th superdiagonal of C G C (MathNet.Numerics matrices).
        const int n = 9; const double rho = 0.7, s2 = 2.0, e2 = 0.45;
        var G = Matrix<double>.Build.Dense(n, n, (u, v) => s2 * Math.Pow(rho, Math.Abs(u - v)) + (u == v ? e2 : 0));
        var C = Matrix<double>.Build.DenseIdentity(n) - Matrix<double>.Build.Dense(n, n, 1.0 / n);
        var D = C * G * C;
        var s = new double[n]; var e = new double[n];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, rho, s, e);
        for (int k = 0; k < n; k++)
        {
            double expect = 0;
            for (int t = 0; t + k < n; t++) expect += D[t, t + k];
            Assert.Equal(expect, s2 * s[k] + e2 * e[k], 10);
        }
    }

    [Fact]
    public void Fit_Ou200x40PlusWhiteNoise_RecoversSignalNoiseAndTauWithin10Percent()
    {
        // OU signal tau = 5, s2 = 1, plus white noise e2 = 0.3 (exact AR(1) discretisation: Gillespie D.T. (1996), Phys. Rev. E
        // 54:2084); mean of 5 seeded replications of 200 tracks x 40 frames, fitted lags max(4, 40 / 3) = 13 as in a run.
        double s2 = 0, e2 = 0, tau = 0;
        for (int r = 0; r < 5; r++)
        {
            var (sums, frames) = OrnsteinUhlenbeckFitTests.SimulateAr1(200, 40, 5, Math.Sqrt(0.3), 300 + r, 30);
            var f = OrnsteinUhlenbeckFit.Fit(sums, frames, [], 13);
            s2 += f.SignalVariance / 5; e2 += f.NoiseVariance / 5; tau += f.TauFrames / 5;
        }
        log.WriteLine($"mean s2 {s2:F4} (1), e2 {e2:F4} (0.3), tau {tau:F3} (5)");
        Assert.InRange(s2, 0.9, 1.1);
        Assert.InRange(e2, 0.27, 0.33);
        Assert.InRange(tau, 4.5, 5.5);
    }

    [Theory]
    [InlineData(5.0)]
    [InlineData(10.0)]
    public void Fit_TracksOf20To160Frames_CorrectedVarianceNearProcessWhileRawShrinksAsTextbook(double tauFrames)
    {
        // E[s^2] of the population variance of n samples of a stationary AR(1) with variance s2, rho = exp(-1/tau):
        // s2 (1 - 1/n - (2/n) sum_{k=1}^{n-1} (1 - k/n) rho^k) = s2 - Var(xbar) (Priestley 1981, sec. 5.3, from memory).
        // 16000 frames per length and replication, mean of 8 seeds (single-replication sd of the fitted s2 is 4-8 % for
        // tau = 10, measured), so the mean has an SE of about 2 %; the fit must stay within 5 % of s2 = 1 while the raw shrinks.
        const int reps = 8;
        double rho = Math.Exp(-1 / tauFrames);
        foreach (int n in new[] { 20, 40, 80, 160 })
        {
            double corrected = 0, raw = 0;
            for (int r = 0; r < reps; r++)
            {
                var (sums, frames) = OrnsteinUhlenbeckFitTests.SimulateAr1(16000 / n, n, tauFrames, 0, 900 + 10 * n + r, 30);
                int K = Math.Min(30, n - 1), fitLags = Math.Min(K, Math.Max(4, n / 3));
                var f = OrnsteinUhlenbeckFit.Fit(sums, frames, [], fitLags, 20.0 * n);
                corrected += f.SignalVariance / reps;
                raw += PooledAutocovariance.Pool(sums, [], out _)[0] / reps;
            }
            double sum = 0;
            for (int k = 1; k < n; k++) sum += (1 - (double)k / n) * Math.Pow(rho, k);
            double expectedRaw = 1 - 1.0 / n - 2.0 / n * sum;
            log.WriteLine($"tau {tauFrames}, n {n}: corrected {corrected:F4}, raw {raw:F4}, textbook raw {expectedRaw:F4}");
            Assert.InRange(corrected, 0.95, 1.05);
            Assert.InRange(raw / expectedRaw, 0.97, 1.03);
            if (n <= 40) Assert.True(raw < 0.9, "short tracks shrink the raw variance by more than 10 %");
        }
    }

    [Fact]
    public void ContourOf_SectorLagSums_LagZeroIsTheSectorVarianceAndGapsGiveNoPair()
    {
        // docs/measures.md#temporal-noise-model: the sector lag sum at lag 0 over the frames is var_along (var_across), the
        // w-weighted sector mean of mean_t n^2 (docs/measures.md#contour-variances); a pair needs both frames present.
        const int m = 32, T = 12;
        var rng = new Random(4);
        var rho = new double[T * m];
        for (int t = 0; t < T; t++)
            for (int k = 0; k < m; k++) rho[t * m + k] = RadialFunction.Ellipse(14, 9, 2 * Math.PI * k / m) + 0.3 * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
        int[] frames = [0, 1, 2, 3, 4, 6, 7, 8, 9, 10, 11, 12];   // frame 5 missing
        var c = ContourFluctuations.Of(rho, T, m, frames, 5);
        Assert.Equal(c.VarAlongRaw, c.AlongLags!.Sum[0] / T, 12);
        Assert.Equal(c.VarAcrossRaw, c.AcrossLags!.Sum[0] / T, 12);
        // Lag-1 pairs: 13 frame slots, 12 present, frame 5 missing removes (4,5) and (5,6): 10 pairs; lag 2: (3,5), (5,7) gone: 9.
        Assert.Equal([12, 10, 9], c.AlongLags.Pairs[..3]);
        Assert.Equal(c.AlongLags.Pairs, c.AcrossLags.Pairs);
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void ContourOf_SectorLagSums_EveryLagIsTheDefiningSum(bool exactCircle)
    {
        // docs/measures.md#temporal-noise-model: Sum[k] = sum over present pairs (t, t+k) of sum_j W_j n_j(t) n_j(t+k) /
        // sum_j W_j, n_j = (rho_j - mean_j) cos g_j, g_j = atan(rho'_j / mean_j) (central difference), W_j = the pole (or
        // flank) share of sample j times its arc weight sqrt(mean_j^2 + rho'_j^2). Recomputed here pair by pair. The exact
        // circle (a mean of exactly 10 px: noise of +-0.25 and +-0.5 px in opposite pairs of frames) puts samples 4, 12, 20
        // and 28 of 32 at 45 degrees, where the share is 1/2; the noisy ellipse has shares of 0 and 1 only.
        const int m = 32, T = 12, maxLag = 7;
        var rng = new Random(9);
        var rho = new double[T * m];
        for (int t = 0; t < T; t++)
            for (int k = 0; k < m; k++)
                rho[t * m + k] = exactCircle ? 10 + (t % 2 == 0 ? 1 : -1) * (k % 3 == 0 ? 0.25 : 0.5)
                    : RadialFunction.Ellipse(14, 9, 2 * Math.PI * k / m) + 0.3 * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
        int[] frames = [0, 1, 2, 3, 4, 6, 7, 8, 9, 10, 11, 12];
        var c = ContourFluctuations.Of(rho, T, m, frames, maxLag);
        var mean = new double[m];
        for (int k = 0; k < m; k++) { for (int t = 0; t < T; t++) mean[k] += rho[t * m + k]; mean[k] /= T; }
        var pole = new double[m]; var w = new double[m]; var cosG = new double[m];
        double dpsi = 2 * Math.PI / m;
        for (int k = 0; k < m; k++)
        {
            double dm = (mean[(k + 1) % m] - mean[(k + m - 1) % m]) / (2 * dpsi), g = Math.Atan(dm / mean[k]);
            double cb = Math.Abs(Math.Cos(k * dpsi - g));
            pole[k] = Math.Abs(cb - Math.Sqrt(0.5)) < 1e-12 ? 0.5 : cb > Math.Sqrt(0.5) ? 1 : 0;
            w[k] = Math.Sqrt(mean[k] * mean[k] + dm * dm); cosG[k] = Math.Cos(g);
        }
        if (exactCircle) Assert.Equal(4, pole.Count(p => p == 0.5));
        for (int lag = 0; lag <= maxLag; lag++)
        {
            double along = 0, across = 0; int pairs = 0;
            for (int i = 0; i < T; i++)
            {
                int j = Array.IndexOf(frames, frames[i] + lag);
                if (j < 0) continue;
                double a = 0, wa = 0, x = 0, wx = 0;
                for (int k = 0; k < m; k++)
                {
                    double p = w[k] * (rho[i * m + k] - mean[k]) * cosG[k] * (rho[j * m + k] - mean[k]) * cosG[k];
                    a += pole[k] * p; wa += pole[k] * w[k]; x += (1 - pole[k]) * p; wx += (1 - pole[k]) * w[k];
                }
                along += a / wa; across += x / wx; pairs++;
            }
            Assert.Equal(pairs, c.AlongLags!.Pairs[lag]);
            // Relative 1e-12: the same sums in another order of multiplication (rounding only).
            Assert.Equal(along, c.AlongLags.Sum[lag], 1e-12 * Math.Abs(along) + 1e-300);
            Assert.Equal(across, c.AcrossLags!.Sum[lag], 1e-12 * Math.Abs(across) + 1e-300);
        }
    }

    /// <summary>A track record whose L and W are given series and whose contour carries given sector lag sums.</summary>
    private static TrackRecord Record(int id, double[] l, double[] w, double[] along, double[] across, int maxLag)
    {
        int n = l.Length;
        var f = Enumerable.Range(0, n).ToArray();
        var contour = new TrackContour(n, Descriptive.PopulationVariance(along), Descriptive.PopulationVariance(across), 0, 0, 0, [], [], [], [], [], along, across)
        {
            AlongLags = PooledAutocovariance.Of(new TrackSeries(f, along), maxLag),
            AcrossLags = PooledAutocovariance.Of(new TrackSeries(f, across), maxLag),
        };
        var z = new double[n];
        return new TrackRecord(id, 0, n - 1, TrackEnd.MovieEnd, f, l, w, z, z, z, z, z, contour,
            Descriptive.PopulationVariance(l), Descriptive.PopulationVariance(w), true);
    }

    [Fact]
    public void Of_FourCoordinatesWithNoise_AnisotropiesFromSignalVariancesWithIntervals()
    {
        // Var ratios 4 (L / W) and 2 (along / across) in the signal, equal white noise 0.5 on all four: the raw ratios are
        // pulled toward 1 (textbook: the noise adds to both variances), the model's ratios are not.
        var rng = new Random(5);
        double rho = Math.Exp(-1 / 5.0), innov = Math.Sqrt(1 - rho * rho);
        double[] sd = [2, 1, Math.Sqrt(2), 1];
        var tracks = new List<TrackRecord>();
        for (int i = 0; i < 150; i++)
        {
            var x = new double[4][];
            for (int c = 0; c < 4; c++)
            {
                x[c] = new double[60];
                double v = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                for (int t = 0; t < 60; t++)
                {
                    if (t > 0) v = rho * v + innov * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                    x[c][t] = 10 + sd[c] * v + Math.Sqrt(0.5) * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                }
            }
            tracks.Add(Record(i, x[0], x[1], x[2], x[3], 30));
        }
        var plan = ResamplingPlan.OverTracks(tracks.Count, 200, 1);
        var r = TemporalNoise.Of(tracks, plan, 30);
        double rawRatio = tracks.Average(t => t.VarLPx2) / tracks.Average(t => t.VarWPx2);
        log.WriteLine($"anisotropy {r.Anisotropy.Value:F3} [{r.Anisotropy.Low:F3}, {r.Anisotropy.High:F3}], raw {rawRatio:F3}; contour {r.AnisotropyContour.Value:F3}; e2 L {r.L.NoiseVariancePx2.Value:F3}, W {r.W.NoiseVariancePx2.Value:F3}");
        Assert.True(r.Anisotropy.IsOk && r.AnisotropyContour.IsOk);
        Assert.InRange(r.Anisotropy.Value, 3.6, 4.4);
        Assert.InRange(r.AnisotropyContour.Value, 1.8, 2.2);
        Assert.True(rawRatio < 3.5);
        Assert.True(r.Anisotropy.Low < 4 && 4 < r.Anisotropy.High);
        // e2 is a single-movie estimate; its spread grows with s2 / e2 (largest for L, s2 = 8 e2), hence the wider band.
        foreach (var c in r.Coordinates) Assert.InRange(c.NoiseVariancePx2.Value, 0.35, 0.7);
    }

    /// <summary>White ±1 px boundary flicker: each cell's mask grown by one pixel (4-neighbour dilation into background) in
    /// a seeded random half of the frames, independently per cell and frame.</summary>
    internal static MemoryMovie Flicker(EllipseMovie e, int seed)
    {
        var rng = new Random(seed);
        int w = e.Width, h = e.Height;
        var frames = new int[e.Options.Frames][];
        for (int t = 0; t < frames.Length; t++)
        {
            var src = e.RenderFrame(t);
            var dst = (int[])src.Clone();
            var grow = new HashSet<int>();
            foreach (var id in e.Truth.LabelOfCell[t]) if (rng.Next(2) == 1) grow.Add(id);
            for (int y = 0; y < h; y++)
                for (int x = 0; x < w; x++)
                {
                    if (src[y * w + x] != 0) continue;
                    int id = x > 0 && grow.Contains(src[y * w + x - 1]) ? src[y * w + x - 1]
                        : x < w - 1 && grow.Contains(src[y * w + x + 1]) ? src[y * w + x + 1]
                        : y > 0 && grow.Contains(src[(y - 1) * w + x]) ? src[(y - 1) * w + x]
                        : y < h - 1 && grow.Contains(src[(y + 1) * w + x]) ? src[(y + 1) * w + x] : 0;
                    dst[y * w + x] = id;
                }
            frames[t] = dst;
        }
        return new MemoryMovie(w, h, frames);
    }

    [Fact]
    public void Analyze_EllipsesWithBoundaryFlicker_TemporalAnisotropyWithin10PercentWhereRawIsLow()
    {
        // Our invented recovery scenario: isolated OU ellipses (EllipseMovie, variance ratio 4, tau 5 frames, 40 cells x 80
        // frames) with white one-pixel boundary flicker; the truth is the realised ratio on the continuous shapes
        // (EllipseTruth.Anisotropy). One movie realises the fitted ratio only to ~5-10 % (the fitted process variance and
        // the realised sample variance differ by that much even without flicker, measured), so the mean over 4 seeds is
        // asserted. No bootstrap: only the point values are compared.
        double temporal = 0, raw = 0, noiseL = 0;
        const int seeds = 4;
        for (int seed = 21; seed < 21 + seeds; seed++)
        {
            var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 40, Frames = 80, SigmaAlongPx = 1.0, SigmaAcrossPx = 0.5, TauFrames = 5, Seed = seed });
            var r = MovieAnalyzer.Run(Flicker(e, seed), new AnalysisOptions { BootstrapResamples = 0 });
            var p = r.Pooled; double truth = e.Truth.Anisotropy;
            Assert.Equal(NoiseModel.Temporal, p.NoiseModel);
            log.WriteLine($"seed {seed}: truth {truth:F3}; temporal {p.Anisotropy.Value:F3} ({100 * (p.Anisotropy.Value / truth - 1):+0.0;-0.0}%); raw {p.AnisotropyRaw.Value:F3} ({100 * (p.AnisotropyRaw.Value / truth - 1):+0.0;-0.0}%); "
                + $"contour truth {e.Truth.AnisotropyContour:F3}, temporal {p.AnisotropyContour.Value:F3}, raw {p.AnisotropyContourRaw.Value:F3}; e2 L {p.NoiseVarL.Value:F3}, W {p.NoiseVarW.Value:F3}, along {p.NoiseVarAlong.Value:F3}, across {p.NoiseVarAcross.Value:F3}");
            temporal += p.Anisotropy.Value / truth / seeds; raw += p.AnisotropyRaw.Value / truth / seeds; noiseL += p.NoiseVarL.Value / seeds;
        }
        log.WriteLine($"mean ratio to truth: temporal {temporal:F3}, raw {raw:F3}; mean e2 of L {noiseL:F3} px^2");
        Assert.InRange(temporal, 0.9, 1.1);
        Assert.True(raw < 0.8, "the flicker pulls the raw ratio well below the truth");
        Assert.True(noiseL > 0.4, "the fitted white noise of L carries the flicker");
    }
}

public class NoiseModelOptionTests
{
    [Theory]
    [InlineData("temporal", NoiseModel.Temporal)]
    [InlineData("MODES", NoiseModel.Modes)]
    [InlineData("fixed-cells", NoiseModel.FixedCells)]
    public void ParseNoiseModel_KnownNames_MapToTheModel(string text, NoiseModel expected)
        // docs/measures.md#temporal-noise-model names the three models.
        => Assert.Equal(expected, Pooling.ParseNoiseModel(text));

    [Theory]
    [InlineData("temporal-ou")]
    [InlineData("")]
    [InlineData("fixed")]
    public void ParseNoiseModel_OtherText_ThrowsNamingTheOption(string text)
        => Assert.StartsWith("NoiseModel", Assert.Throws<ArgumentException>(() => Pooling.ParseNoiseModel(text)).Message);

    [Fact]
    public void Validated_FixedCellsWithoutFloorFromOrFloorFromWithTemporal_Refused()
    {
        Assert.Contains("--floor-from", Assert.Throws<ArgumentException>(() => new AnalysisOptions { NoiseModel = NoiseModel.FixedCells }.Validated()).Message);
        Assert.Contains("--noise-model", Assert.Throws<ArgumentException>(() => new AnalysisOptions { FloorFrom = "fixed" }.Validated()).Message);
        Assert.Equal(NoiseModel.FixedCells, new AnalysisOptions { FloorFrom = "fixed", NoiseModel = NoiseModel.FixedCells }.Validated().ForPooling.NoiseModel);
        Assert.Equal(NoiseModel.Temporal, new AnalysisOptions().ForPooling.NoiseModel);
    }
}
