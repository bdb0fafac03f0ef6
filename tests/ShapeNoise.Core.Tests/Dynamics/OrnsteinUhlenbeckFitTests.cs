using ShapeNoise.TimeSeries;
using ShapeNoise.Dynamics;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Dynamics;

public class OrnsteinUhlenbeckFitTests(ITestOutputHelper log)
{
    /// <summary>Stationary AR(1) tracks: the Ornstein-Uhlenbeck process sampled at the frame interval (Gillespie 1996).</summary>
    internal static (List<LagSums> Sums, int[][] Frames) SimulateAr1(int tracks, int length, double tauFrames, double noiseSd, int seed, int maxLag)
    {
        var rng = new Random(seed);
        double rho = Math.Exp(-1 / tauFrames), innov = Math.Sqrt(1 - rho * rho);
        var sums = new List<LagSums>(); var frames = new int[tracks][];
        for (int i = 0; i < tracks; i++)
        {
            var f = new int[length]; var v = new double[length];
            double x = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
            for (int t = 0; t < length; t++)
            {
                if (t > 0) x = rho * x + innov * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                f[t] = t + 7; v[t] = 3 + x + noiseSd * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
            }
            frames[i] = f;
            sums.Add(PooledAutocovariance.Of(new TrackSeries(f, v), maxLag));
        }
        return (sums, frames);
    }

    [Fact]
    public void Fit_Ar1Tracks200x60Tau5_CorrectedWithin10PercentAndBetterThanUncorrected()
    {
        // Ornstein-Uhlenbeck autocorrelation exp(-|t|/tau) (Uhlenbeck and Ornstein 1930): the case.
        var (sums, frames) = SimulateAr1(200, 60, 5, 0, 1, 30);
        var fit = OrnsteinUhlenbeckFit.Fit(sums, frames, [], 20);
        log.WriteLine($"tau corrected {fit.TauFrames:F3}, uncorrected {fit.UncorrectedTauFrames:F3}, var {fit.SignalVariance:F3}, noise {fit.NoiseVariance:F4}");
        Assert.InRange(fit.TauFrames, 4.5, 5.5);
        Assert.True(fit.UncorrectedTauFrames < fit.TauFrames);
        Assert.True(Math.Abs(fit.UncorrectedTauFrames - 5) > Math.Abs(fit.TauFrames - 5));
        Assert.InRange(fit.SignalVariance, 0.85, 1.15);
    }

    [Fact]
    public void Fit_TwentyReplications_UnbiasedWhileUncorrectedIsBiasedLow()
    {
        // Bias, not luck: the single-case sd of tau is ~8 % here, so average 20 seeded replications (SE ~2 %).
        // The uncorrected -1/ln C(1) is expected near -1/ln(rho - (1 + rho)/60) = 4.2 frames (-16 %; see MeanSubtractionBiasTests).
        double corrected = 0, uncorrected = 0;
        for (int r = 0; r < 20; r++)
        {
            var (sums, frames) = SimulateAr1(200, 60, 5, 0, 500 + r, 30);
            var f = OrnsteinUhlenbeckFit.Fit(sums, frames, [], 20);
            corrected += f.TauFrames / 20; uncorrected += f.UncorrectedTauFrames / 20;
        }
        log.WriteLine($"mean corrected {corrected:F3}, mean uncorrected {uncorrected:F3}");
        Assert.InRange(corrected, 4.8, 5.2);
        Assert.InRange(uncorrected, 3.9, 4.5);
    }
}

public class MeanSubtractionBiasTests
{
    [Fact]
    public void ExpectedSums_ThreeSamplesRhoHalf_MatchHandComputation()
    {
        // Hand computation, n = 3, rho = 0.5, sigma^2 = 1: Gamma = [[1,.5,.25],[.5,1,.5],[.25,.5,1]], row means a = (7/12, 2/3, 7/12),
        // grand mean b = 5.5/9. E[S0] = tr(Gamma) - 1'Gamma1/3 = 3 - 11/6 = 7/6;
        // E[S1] = sum_{t=0,1} (Gamma_{t,t+1} - a_t - a_{t+1} + b) = 2 (0.5 - 7/12 - 2/3 + 11/18) = -5/18.
        var s = new double[3]; var e = new double[3];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(3, 0.5, s, e);
        Assert.Equal(7.0 / 6, s[0], 12);
        Assert.Equal(-5.0 / 18, s[1], 12);
        OrnsteinUhlenbeckFit.ExpectedSums([0, 1, 2], 0.5, s, e);
        Assert.Equal(7.0 / 6, s[0], 12);
        Assert.Equal(-5.0 / 18, s[1], 12);
    }

    [Theory]
    [InlineData(10)]
    [InlineData(60)]
    public void ExpectedSums_WhiteNoise_GiveMinusOneOverN(int n)
    {
        // Published exact result for white noise centred on its own mean: E[r1] = -1/n (the rho = 0 case of
        // Marriott and Pope 1954 / Kendall 1954), here as the ratio of expected sums.
        var s = new double[2]; var e = new double[2];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, 0.3, s, e);   // e: per unit white-noise variance
        Assert.Equal(-1.0 / n, e[1] / e[0], 12);   // classical r1 = S1 / S0 (sum over sum)
        Assert.Equal(n - 1.0, e[0], 12);
        Assert.Equal(-(n - 1.0) / n, e[1], 12);
    }

    [Theory]
    [InlineData(0.5, 400)]
    [InlineData(0.8, 400)]
    public void ExpectedSums_Ar1LongTrack_MatchLargeSampleForm(double rho, int n)
    {
        // Published large-n form of the mean-subtracted autocovariance (Bartlett 1946; Priestley M.B. (1981), Spectral
        // Analysis and Time Series, sec. 5.3): E[c(k)] = gamma(k) - Var(xbar) + O(n^-2), n Var(xbar) -> sigma^2 (1+rho)/(1-rho).
        // For pooled sums this gives E[S1]/E[S0] = rho - (1 + 2 rho)/n + O(n^-2). (Marriott and Pope's (1954) rho - (1 + 3 rho)/n
        // is the mean of the ratio for one series; the extra rho/n comes from the correlation of S1 and S0, which pooling
        // over many tracks removes.) Tolerance: the O(n^-2) remainder.
        var s = new double[2]; var e = new double[2];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, rho, s, e);
        double sigmaSq = 1, varMean = sigmaSq * (1 + rho) / ((1 - rho) * n);
        Assert.True(Math.Abs(s[0] / n - (sigmaSq - varMean)) < 50.0 / ((double)n * n));
        Assert.True(Math.Abs(s[1] / (n - 1) - (rho * sigmaSq - varMean)) < 50.0 / ((double)n * n));
        double r1 = s[1] / s[0];
        Assert.True(Math.Abs(r1 - (rho - (1 + 2 * rho) / n)) < 50.0 / ((double)n * n), $"r1 {r1} vs {rho - (1 + 2 * rho) / n}");
    }

    [Fact]
    public void MarriottPope_SingleSeriesMonteCarlo_ExplainsThePooledDifference()
    {
        // Published form (Marriott and Pope 1954; Kendall 1954): for r1 = [sum d_t d_{t+1} / (n-1)] / [sum d_t^2 / n] of one
        // series, E[r1] = rho - (1 + 3 rho)/n + O(n^-2). Monte Carlo over 20000 series of n = 200, rho = 0.6: SE of the
        // mean r1 ~ 0.0004, second-order remainder below 0.001; tolerance 0.0025.
        const int n = 200;
        var (sums, _) = OrnsteinUhlenbeckFitTests.SimulateAr1(20000, n, -1 / Math.Log(0.6), 0, 77, 1);
        double meanRatio = sums.Average(x => (x.Sum[1] / x.Pairs[1]) / (x.Sum[0] / x.Pairs[0]));
        Assert.InRange(meanRatio - (0.6 - (1 + 3 * 0.6) / n), -0.0025, 0.0025);
        // The pooled estimator of the spec (sums over pairs, pooled before dividing) follows the expected-sum form
        // instead, rho - (1 + rho)/n: pooling removes the 2 rho / n that the numerator-denominator correlation adds.
        double pooled = (sums.Sum(x => x.Sum[1]) / sums.Sum(x => x.Pairs[1])) / (sums.Sum(x => x.Sum[0]) / sums.Sum(x => x.Pairs[0]));
        Assert.InRange(pooled - (0.6 - (1 + 0.6) / n), -0.0015, 0.0015);
        var s = new double[2]; var e = new double[2];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, 0.6, s, e);
        Assert.InRange(pooled - (s[1] / (n - 1.0)) / (s[0] / n), -0.0015, 0.0015);
    }

    [Fact]
    public void ExpectedSumsContiguous_PowersGiven_SameDoublesAsMathPow()
    {
        // The fit tabulates rho^j once per objective evaluation; the expectation must not move by a rounding step, since the
        // regression fixtures hold the fitted values to 1e-9 (bench/README.md). Reference: the closed form with Math.Pow
        // written out here.
        foreach (double rho in new[] { 0.05, 0.61, 0.93, 0.9995 })
            foreach (int n in new[] { 2, 7, 40, 100 })
            {
                var s = new double[12]; var e = new double[12];
                OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, rho, s, e);
                double q = 1 - rho, b = (n * (1 + rho) / q - 2 * rho * (1 - Math.Pow(rho, n)) / (q * q)) / ((double)n * n);
                for (int k = 0; k < 12; k++)
                {
                    int m = n - k;
                    double expected = m <= 0 ? 0 : m * Math.Pow(rho, k) + m * b
                        - 2.0 / (n * q) * (m * (1 + rho) - (rho + Math.Pow(rho, k) * rho) * (1 - Math.Pow(rho, m)) / q);
                    Assert.Equal(expected, s[k]);
                }
            }
    }

    [Fact]
    public void ExpectedSums_ClosedFormEqualsDirectSum()
    {
        var a = new double[8]; var b = new double[8]; var c = new double[8]; var d = new double[8];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(25, 0.77, a, b);
        OrnsteinUhlenbeckFit.ExpectedSums(Enumerable.Range(100, 25).ToArray(), 0.77, c, d);
        for (int k = 0; k < 8; k++) { Assert.Equal(c[k], a[k], 10); Assert.Equal(d[k], b[k], 10); }
    }
}

public class CorrelationTimeTests
{
    [Fact]
    public void Sokal_ExactAr1Correlation_MatchesAnalyticIntegratedTime()
    {
        // AR(1): C(k) = rho^k, tau_int = 1/2 + sum rho^k = (1 + rho) / (2 (1 - rho)) (Sokal 1997). With the window at
        // W >= 5 tau_int the truncated tail rho^(W+1)/(1-rho) is below 1 % here.
        double rho = Math.Exp(-1 / 5.0);
        var c = Enumerable.Range(0, 200).Select(k => Math.Pow(rho, k)).ToArray();
        var (tau, w, ok) = IntegratedTime.Sokal(c);
        Assert.True(ok);
        Assert.InRange(tau / ((1 + rho) / (2 * (1 - rho))), 0.99, 1.0);
        Assert.True(w >= 5 * tau);
    }

    [Fact]
    public void Sokal_SimulatedLongAr1_WithinFivePercent()
    {
        // One long series (400000 steps): sampling error of tau_int with window W ~ 28 is sqrt(2 (2W+1) / N) ~ 1.7 %
        // (Sokal 1997, eq. for the variance of tau_int), so 5 % is three standard errors.
        var (sums, _) = OrnsteinUhlenbeckFitTests.SimulateAr1(1, 400_000, 5, 0, 3, 60);
        var c = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(sums, [], out _));
        double rho = Math.Exp(-1 / 5.0);
        Assert.InRange(IntegratedTime.Sokal(c).TauInt / ((1 + rho) / (2 * (1 - rho))), 0.95, 1.05);
    }

    [Fact]
    public void Pool_TrackWithMissingFrame_NoPairAcrossTheGap()
    {
        // Hand-built: frames 0,1,2,4,5 (frame 3 missing), values 1,2,3,5,6 (mean 3.4).
        var s = PooledAutocovariance.Of(new TrackSeries([0, 1, 2, 4, 5], [1, 2, 3, 5, 6]), 2);
        Assert.Equal(5, s.Pairs[0]);
        Assert.Equal(3, s.Pairs[1]);      // (0,1), (1,2), (4,5): not (2,3) nor (3,4)
        Assert.Equal(2, s.Pairs[2]);      // (0,2), (2,4)
        double m = 3.4;
        Assert.Equal((1 - m) * (2 - m) + (2 - m) * (3 - m) + (5 - m) * (6 - m), s.Sum[1], 12);
    }

    [Fact]
    public void Pool_WeightedTracks_EqualsTheExactSumsRoundedOnce()
    {
        // c(k) = sum_i w_i Sum_i[k] / sum_i w_i Pairs_i[k] (the pooled estimator's definition, docs/measures.md) with the sum
        // taken exactly and rounded once to the nearest double (IEEE 754 round-half-even), as the pooling promises so that
        // resamples pooled per unit or track by track give the same doubles (bench/README.md). Reference: the exact sum in
        // arbitrary-precision integers (System.Numerics.BigInteger), rounded here by the IEEE rule.
        var rnd = new Random(5);
        var tracks = Enumerable.Range(0, 300).Select(_ => new LagSums(
            Enumerable.Range(0, 13).Select(_ => (rnd.NextDouble() - 0.3) * Math.Pow(10, rnd.Next(-3, 4))).ToArray(), Enumerable.Range(0, 13).Select(_ => rnd.Next(1, 60)).ToArray())).ToList();
        var w = Enumerable.Range(0, 300).Select(_ => rnd.Next(0, 4)).ToArray();
        var c = PooledAutocovariance.Pool(tracks, w, out var pairs, 11);
        Assert.Equal(11, c.Length);
        for (int k = 0; k < 11; k++)
        {
            long n = 0;
            for (int i = 0; i < tracks.Count; i++) n += (long)w[i] * tracks[i].Pairs[k];
            Assert.Equal(n, pairs[k]);
            Assert.Equal(ExactSum(tracks.Select((t, i) => (w[i], t.Sum[k]))) / n, c[k]);
        }
    }

    /// <summary>sum w x exactly (every double is m 2^e: integers scaled by 2^1100), rounded to the nearest double, ties to even.</summary>
    private static double ExactSum(IEnumerable<(int W, double X)> terms)
    {
        var total = System.Numerics.BigInteger.Zero;
        foreach (var (w, x) in terms)
        {
            long bits = BitConverter.DoubleToInt64Bits(x);
            int e = (int)((bits >> 52) & 0x7FF);
            long m = bits & 0xFFFFFFFFFFFFFL;
            if (e > 0) m |= 1L << 52; else e = 1;
            var v = new System.Numerics.BigInteger(m) << (e - 1075 + 1100);
            total += (x < 0 ? -v : v) * w;
        }
        int sign = total.Sign;
        var a = System.Numerics.BigInteger.Abs(total);
        int shift = (int)Math.Max(0, a.GetBitLength() - 53);
        var q = a >> shift;
        if (shift > 0)
        {
            var rem = a - (q << shift); var half = System.Numerics.BigInteger.One << (shift - 1);
            if (rem > half || rem == half && !q.IsEven) q += 1;
        }
        return sign * Math.ScaleB((double)q, shift - 1100);
    }

    [Fact]
    public void Pool_ListChangedBetweenCalls_PoolsTheNewTracks()
    {
        var tracks = new List<LagSums> { new([4, 2], [2, 1]), new([6, 1], [3, 2]) };
        Assert.Equal(10.0 / 5, PooledAutocovariance.Pool(tracks, [], out _)[0]);
        tracks[1] = new LagSums([1, 1], [1, 1]);     // same list, other track: the cached table must not be reused
        Assert.Equal(5.0 / 3, PooledAutocovariance.Pool(tracks, [], out _)[0]);
    }

    [Fact]
    public void Fit_GappedTracks_StillRecoversTau()
    {
        // The exact expectation handles gaps: drop every 7th frame of AR(1) tracks and the fit still finds tau.
        var rng = new Random(12);
        double rho = Math.Exp(-1 / 4.0), inn = Math.Sqrt(1 - rho * rho);
        var sums = new List<LagSums>(); var frames = new List<int[]>();
        for (int i = 0; i < 300; i++)
        {
            var f = new List<int>(); var v = new List<double>();
            double x = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
            for (int t = 0; t < 50; t++)
            {
                if (t > 0) x = rho * x + inn * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                if (t % 7 == 3) continue;
                f.Add(t); v.Add(x);
            }
            frames.Add(f.ToArray());
            sums.Add(PooledAutocovariance.Of(new TrackSeries(f.ToArray(), v.ToArray()), 20));
        }
        Assert.InRange(OrnsteinUhlenbeckFit.Fit(sums, frames, [], 15).TauFrames, 3.6, 4.4);
    }

    [Fact]
    public void Fit_WithWhiteMeasurementNoise_SeparatesNoiseFromSignal()
    {
        // Measurement noise adds only at lag 0: the fit keeps tau and attributes the excess lag-0 variance to noise.
        // Averages over 10 seeded replications of 300 x 60 (single-case sd of tau ~8 %, of the average ~2.5 %).
        double tau = 0, noise = 0, signal = 0;
        for (int r = 0; r < 10; r++)
        {
            var (sums, frames) = OrnsteinUhlenbeckFitTests.SimulateAr1(300, 60, 5, 0.5, 40 + r, 30);
            var f = OrnsteinUhlenbeckFit.Fit(sums, frames, [], 20);
            tau += f.TauFrames / 10; noise += f.NoiseVariance / 10; signal += f.SignalVariance / 10;
        }
        Assert.InRange(tau, 4.6, 5.4);
        Assert.InRange(noise, 0.22, 0.28);
        Assert.InRange(signal, 0.9, 1.1);
    }

    /// <summary>
    /// Interval coverage over 120 seeded replications of the case (200 tracks x 60 frames, tau = 5): the
    /// percentile-bootstrap 95% interval must contain the truth in 88-99 % of them (binomial sd at 95 % and n = 120
    /// is 2 %). Runs in a few seconds, so it stays in the default test run.
    /// </summary>
    [Fact]
    public void TauInterval_SimulatedReplications_CoverageNear95Percent()
    {
        int hit = 0; const int reps = 120;
        for (int r = 0; r < reps; r++)
        {
            var (sums, frames) = OrnsteinUhlenbeckFitTests.SimulateAr1(200, 60, 5, 0, 1000 + r, 20);
            var e = OrnsteinUhlenbeckFit.TauWithInterval(sums, frames, 20, 400, r);
            if (e.Low <= 5 && 5 <= e.High) hit++;
        }
        Assert.InRange(hit / (double)reps, 0.88, 0.99);
    }

    [Fact]
    public void OrientationFit_DecayToPlateau_RecoversBoth()
    {
        // C(k) = 0.3 + 0.7 exp(-k/6): exact input, the fit returns the generating values.
        var c = Enumerable.Range(0, 31).Select(k => 0.3 + 0.7 * Math.Exp(-k / 6.0)).ToArray();
        var pairs = Enumerable.Range(0, 31).Select(k => (long)(1000 - 10 * k)).ToArray();
        var f = OrientationCorrelation.Fit(c, pairs, 30, 1000);
        Assert.Equal(6.0, f.TauFrames, 3);
        Assert.Equal(0.3, f.Plateau, 4);
    }
}
