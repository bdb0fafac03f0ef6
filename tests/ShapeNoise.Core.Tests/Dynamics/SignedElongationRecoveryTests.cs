using ShapeNoise.TimeSeries;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Dynamics;

/// <summary>Recovery test on our synthetic generator: nearly round ellipses (a0/b0 = 10/9), where |q| folds at 0. The
/// truth is the same OU estimator on the continuous shapes' q = (a - b)/(a + b) (signed in the body frame).</summary>
public class SignedElongationRecoveryTests(ITestOutputHelper log)
{
    [Fact]
    public void Analyze_NearlyRoundEllipses_TauQWithin15Percent()
    {
        var e = EllipseMovie.Generate(new EllipseMovieOptions { SemiMajorPx = 10, SemiMinorPx = 9, Seed = 21 });
        var r = MovieAnalyzer.Run(MemoryMovie.Of(e), new AnalysisOptions { BootstrapResamples = 50 });
        var d = r.Dynamics;
        log.WriteLine($"tau_q {d.TauQFrames.Value:F3} / truth {e.Truth.TauQRealisedFrames:F3} = {d.TauQFrames.Value / e.Truth.TauQRealisedFrames:F3}");
        log.WriteLine($"tau_theta {d.TauThetaFrames.Value:F2} / truth {e.Truth.TauThetaRealisedFrames:F2} = {d.TauThetaFrames.Value / e.Truth.TauThetaRealisedFrames:F3} ({d.ThetaModel}, plateau {d.ThetaPlateau.Value:F3})");
        log.WriteLine($"nearly round outlines {d.NearlyRoundOutlines} of {r.Dynamics.Tracks} tracks x 80");
        Assert.InRange(d.TauQFrames.Value / e.Truth.TauQRealisedFrames, 0.85, 1.15);
        Assert.True(d.NearlyRoundOutlines > 0);
    }
}
