using MathNet.Numerics.Distributions;
using ShapeNoise.Dynamics;
using ShapeNoise.Statistics;
using ShapeNoise.TimeSeries;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Dynamics;

/// <summary>A correlation time longer than the longest track is not resolved (docs/dynamics.md#fitted-times-at-a-search-bound-at_bound):
/// for an Ornstein-Uhlenbeck signal (Uhlenbeck and Ornstein 1930) with tau = 10 x the track length the autocorrelation
/// exp(-k/tau) falls by only 1 - exp(-0.1) = 10 % over a whole track, and what the fit gives is an extrapolation; with
/// tau = track / 10 it decays to exp(-10) within the track.</summary>
public class ResolutionLimitTests(ITestOutputHelper log)
{
    /// <summary>Stationary AR(1) series (the OU process sampled at the frame interval, Gillespie 1996), unit variance.</summary>
    private static double[][] Ar1(int tracks, int length, double tauFrames, int seed)
    {
        var rng = new Random(seed);
        double rho = Math.Exp(-1 / tauFrames), innov = Math.Sqrt(1 - rho * rho);
        var r = new double[tracks][];
        for (int i = 0; i < tracks; i++)
        {
            r[i] = new double[length];
            double x = Normal.Sample(rng, 0, 1);
            for (int t = 0; t < length; t++) { if (t > 0) x = rho * x + innov * Normal.Sample(rng, 0, 1); r[i][t] = x; }
        }
        return r;
    }

    [Theory]
    [InlineData(400.0, true)]    // tau = 10 x the 40-frame tracks
    [InlineData(4.0, false)]     // tau = track / 10
    public void TauWithInterval_OuTauAgainstTrackLength_AtBoundOnlyBeyondTrack(double tau, bool beyond)
    {
        var (sums, frames) = OrnsteinUhlenbeckFitTests.SimulateAr1(100, 40, tau, 0, 5, 30);
        var e = OrnsteinUhlenbeckFit.TauWithInterval(sums, frames, 13, 100, 1);
        log.WriteLine($"tau {tau}: fit {e.Value:F1} [{e.Low:F1}, {e.High:F1}] {e.Status} {e.Bound} {e.BoundValue} {e.Reason}");
        if (beyond)
        {
            Assert.Equal(EstimateStatus.AtBound, e.Status);
            Assert.Equal(BoundSide.Upper, e.Bound);
            Assert.Equal(40, e.BoundValue);   // the longest track, frames
            Assert.Equal(Estimate.BeyondResolutionReason, e.Reason);
        }
        else
        {
            Assert.Equal(EstimateStatus.Ok, e.Status);
            Assert.InRange(e.Value, 3, 5);   // tau 4 recovered (100 tracks x 40 frames: a few % sampling error; wide band, the check is the status)
        }
    }

    [Theory]
    [InlineData(800.0, true)]    // tau = 10 x the 80-frame tracks
    [InlineData(8.0, false)]     // tau = track / 10
    public void Run_TauQAndTauThetaAgainstTrackLength_AtBoundOnlyBeyondTrack(double tau, bool beyond)
    {
        // q_s = 0.3 + 0.05 x (x an OU series with this tau; the signed elongation stays positive, so q_s = q) and theta a
        // rotational diffusion with tau_theta = tau (E cos 2 dtheta = exp(-k / tau), Berg 1993), 60 tracks x 80 frames.
        var q = Ar1(60, 80, tau, 3).Select(v => v.Select(x => 0.3 + 0.05 * x).ToArray()).ToArray();
        var theta = OrientationModelTests.SimulateTheta(60, 80, tau, 4);
        var d = DynamicsAnalysis.Run(OrientationModelTests.Tracks(q, theta, 5), new DynamicsOptions(bootstrapResamples: 40));
        foreach (var (name, e) in new[] { ("tau_q", d.TauQFrames), ("tau_theta", d.TauThetaFrames) })
        {
            log.WriteLine($"tau {tau}: {name} {e.Value:F1} [{e.Low:F1}, {e.High:F1}] {e.Status} {e.Bound} {e.BoundValue} {e.Reason}");
            if (beyond)
            {
                Assert.Equal(EstimateStatus.AtBound, e.Status);
                Assert.Equal(BoundSide.Upper, e.Bound);
                // the longest track (80 frames), or the search bound 20 x 80 when the fit ran to it first
                Assert.Contains(e.BoundValue, new[] { 80.0, 1600.0 });
            }
            else Assert.Equal(EstimateStatus.Ok, e.Status);
        }
        // The length/width/along/across coordinates of these tracks are white noise (tau far below the track): ok or at the lower bound, never beyond.
        Assert.All(d.Coordinates, c => Assert.NotEqual(Estimate.BeyondResolutionReason, c.TauFrames.Reason));
    }
}
