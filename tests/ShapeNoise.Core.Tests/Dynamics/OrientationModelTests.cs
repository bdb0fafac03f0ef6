using ShapeNoise.TimeSeries;
using MathNet.Numerics.Distributions;
using ShapeNoise.Dynamics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Dynamics;

/// <summary>
/// Orientation model selection, the plateau, at_bound and the signed elongation (docs/dynamics.md). Pure rotational
/// diffusion: a Wiener process on the circle with coefficient D has E cos 2 dtheta = exp(-2 Var dtheta) = exp(-4 D k)
/// exactly (Berg H.C. (1993), Random Walks in Biology, Princeton University Press), so tau_theta = 1 / (4 D).
/// </summary>
public class OrientationModelTests(ITestOutputHelper log)
{
    /// <summary>Theta tracks: theta_t = theta_0 + rotational diffusion (tau_theta = 1/(4D)) + OU wobble of sd
    /// <paramref name="wobbleSd"/> and correlation time <paramref name="wobbleTau"/> about a fixed axis when
    /// <paramref name="rotational"/> is false.</summary>
    internal static double[][] SimulateTheta(int tracks, int length, double tauTheta, int seed, bool rotational = true, double wobbleSd = 0, double wobbleTau = 5)
    {
        var rng = new Random(seed);
        double stepSd = rotational ? Math.Sqrt(2 * (1 / (4 * tauTheta))) : 0;   // Var dtheta per frame = 2 D
        double rho = Math.Exp(-1 / wobbleTau), inn = Math.Sqrt(1 - rho * rho);
        var r = new double[tracks][];
        for (int i = 0; i < tracks; i++)
        {
            r[i] = new double[length];
            double th = (rng.NextDouble() - 0.5) * Math.PI, x = Normal.Sample(rng, 0, 1);
            for (int t = 0; t < length; t++)
            {
                if (t > 0) { th += stepSd * Normal.Sample(rng, 0, 1); x = rho * x + inn * Normal.Sample(rng, 0, 1); }
                r[i][t] = th + wobbleSd * x;
            }
        }
        return r;
    }

    private static PlateauFit FitTheta(double[][] theta, int maxLag = 30)
    {
        var sums = theta.Select(v => OrientationCorrelation.Of(new TrackSeries(Enumerable.Range(0, v.Length).ToArray(), v), maxLag)).ToList();
        return OrientationCorrelation.FitTracks(sums, [], maxLag, 20.0 * theta[0].Length);
    }

    [Theory]
    [InlineData(10)]
    [InlineData(40)]
    [InlineData(100)]
    public void Fit_PureRotationalDiffusion80FrameTracks_TauWithin10PercentNoPlateau(double tau)
    {
        // Mean over 5 seeded replications of 200 tracks x 80 frames; truth exp(-4 D k) (Berg 1993).
        double mean = 0; int noPlateau = 0;
        for (int r = 0; r < 5; r++)
        {
            var f = FitTheta(SimulateTheta(200, 80, tau, 100 + r));
            mean += f.TauFrames / 5;
            if (f.Model == ThetaModel.NoPlateau) noPlateau++;
            log.WriteLine($"tau {tau}: fit {f.TauFrames:F2} ({f.TauFrames / tau:F3}), model {f.Model}, plateau {f.Plateau:F3}, AIC {f.AicNoPlateau:F1} / {f.AicPlateau:F1}");
        }
        log.WriteLine($"tau {tau}: mean ratio {mean / tau:F3}, no plateau in {noPlateau}/5");
        Assert.InRange(mean / tau, 0.9, 1.1);
        Assert.True(noPlateau >= 4, $"no plateau chosen in {noPlateau}/5");
    }

    [Fact]
    public void Fit_FixedAxisWithOuWobble_RecoversPlateau()
    {
        // theta = fixed axis + OU wobble (sd s = 0.3 rad, tau_w = 5 frames): for Gaussian wobble,
        // E cos 2(x_t+k - x_t) = exp(-4 s^2 (1 - exp(-k/tau_w))), which tends to the plateau exp(-4 s^2) = 0.698 (Gaussian
        // characteristic function). The curve is not exactly p + A exp(-k/tau), so the tolerance is 0.03.
        double s = 0.3, plateau = Math.Exp(-4 * s * s);
        var f = FitTheta(SimulateTheta(200, 80, 1, 7, rotational: false, wobbleSd: s, wobbleTau: 5));
        log.WriteLine($"plateau fit {f.Plateau:F3} (truth {plateau:F3}), tau {f.TauFrames:F2}, model {f.Model}");
        Assert.Equal(ThetaModel.Plateau, f.Model);
        Assert.InRange(f.Plateau, plateau - 0.03, plateau + 0.03);
    }

    [Fact]
    public void Fit_ExactPlateauCurve_ChoosesPlateau()
    {
        // C(k) = 0.3 + 0.7 exp(-k/6) exactly: the plateau fit has zero residual and wins.
        var c = Enumerable.Range(0, 31).Select(k => 0.3 + 0.7 * Math.Exp(-k / 6.0)).ToArray();
        var pairs = Enumerable.Range(0, 31).Select(k => (long)(1000 - 10 * k)).ToArray();
        var f = OrientationCorrelation.Fit(c, pairs, 30, 1000, 50);
        Assert.Equal(ThetaModel.Plateau, f.Model);
        Assert.Equal(6.0, f.TauFrames, 3);
        Assert.Equal(0.3, f.Plateau, 4);
    }

    /// <summary>Used tracks with the given q and theta per frame (other columns filler; a dummy contour with white-noise along/across).</summary>
    internal static List<TrackRecord> Tracks(double[][] q, double[][] theta, int seed)
    {
        var rng = new Random(seed);
        var list = new List<TrackRecord>();
        for (int i = 0; i < q.Length; i++)
        {
            int n = q[i].Length;
            var f = Enumerable.Range(0, n).ToArray();
            double[] Noise() => Enumerable.Range(0, n).Select(_ => Normal.Sample(rng, 0, 1)).ToArray();
            var contour = new TrackContour(n, 1, 1, 0, 0, 0, [], [], [], [], [], Noise(), Noise());
            list.Add(new TrackRecord(i + 1, 0, n - 1, TrackEnd.MovieEnd, f, Noise().Select(x => 20 + x).ToArray(), Noise().Select(x => 10 + x).ToArray(),
                q[i], theta[i], new double[n], new double[n], new double[n], contour, 1, 1, true));
        }
        return list;
    }

    [Fact]
    public void Run_OrientationFrozenForTracks_TauThetaAtUpperBound()
    {
        // tau_theta = 1e6 frames on 80-frame tracks: C_theta stays at 1 and the fit runs to the upper search bound
        // 20 x 80 = 1600 frames, so the estimate is at_bound with that bound value (docs/dynamics.md#at-bound).
        var theta = SimulateTheta(40, 80, 1e6, 3);
        var q = theta.Select(t => t.Select(_ => 0.2).ToArray()).ToArray();
        var d = DynamicsAnalysis.Run(Tracks(q, theta, 4), new DynamicsOptions(bootstrapResamples: 40));
        log.WriteLine($"tau_theta {d.TauThetaFrames.Value:F1} status {d.TauThetaFrames.Status} bound {d.TauThetaFrames.Bound} {d.TauThetaFrames.BoundValue} fraction {d.TauThetaFrames.FractionAtBound:F2}");
        Assert.Equal(EstimateStatus.AtBound, d.TauThetaFrames.Status);
        Assert.Equal(BoundSide.Upper, d.TauThetaFrames.Bound);
        Assert.Equal(1600, d.TauThetaFrames.BoundValue, 6);
    }

    [Fact]
    public void Run_FreeRotationalDiffusion_NoPlateauChosenAndPlateauZero()
    {
        var theta = SimulateTheta(200, 80, 20, 11);
        var q = theta.Select(t => t.Select(_ => 0.2).ToArray()).ToArray();
        var d = DynamicsAnalysis.Run(Tracks(q, theta, 12), new DynamicsOptions(bootstrapResamples: 40));
        log.WriteLine($"model {d.ThetaModel}, tau {d.TauThetaFrames.Value:F2} [{d.TauThetaFrames.Low:F2}, {d.TauThetaFrames.High:F2}] {d.TauThetaFrames.Status}, plateau {d.ThetaPlateau.Value:F3} [{d.ThetaPlateau.Low:F3}, {d.ThetaPlateau.High:F3}] {d.ThetaPlateau.Status}");
        Assert.Equal("no plateau", d.ThetaModel);
        Assert.Equal(0, d.ThetaPlateau.Value);
        Assert.Equal(EstimateStatus.Ok, d.TauThetaFrames.Status);
        Assert.InRange(d.TauThetaFrames.Value, 16, 24);
    }

    [Fact]
    public void SignedElongation_AxisFlipsAcross_ChangesSign()
    {
        // Hand case: q = 0.1 along 0 rad for three frames, then 0.1 along pi/2 (the long axis flipped): q_s = +0.1, -0.1.
        var qs = DynamicsAnalysis.SignedElongation([0.1, 0.1, 0.1, 0.1], [0, 0, 0, Math.PI / 2], 8);
        Assert.Equal(0.1, qs[0], 12);
        Assert.Equal(-0.1, qs[3], 12);
    }
}
