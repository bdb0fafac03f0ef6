using ShapeNoise.TimeSeries;
using ShapeNoise.Dynamics;

namespace ShapeNoise.Tests.Pipeline;

/// <summary>
/// The fast expectation of a gapped track's mean-centred lagged sums (docs/measures.md#one-frame-errors), used once
/// one-frame outliers and bridged merges leave gaps: E[sum (x_t - xbar)(x_{t+k} - xbar)] = sum [gamma(k) - a_t - a_{t+k} + b]
/// (Priestley M.B. (1981), Spectral Analysis and Time Series, sec. 5.3) for gamma(h) = rho^|h| + eta^2 [h = 0].
/// </summary>
public class GappedOuExpectationTests
{
    [Theory]
    [InlineData(12, 0.8)]
    [InlineData(30, 0.3)]
    public void GapLags_ContiguousFrames_MatchTheClosedFormGeometricSums(int n, double rho)
    {
        // Without gaps every term is a geometric sum; the closed form is derived independently of the polynomial in rho.
        const int K = 8;
        var frames = Enumerable.Range(5, n).ToArray();
        var cs = new double[K]; var cn = new double[K];
        OrnsteinUhlenbeckFit.ExpectedSumsContiguous(n, rho, cs, cn);
        var s = new double[K]; var e = new double[K];
        GapLags.Sum([(frames, 1)], K).AddTo(rho, s, e);
        for (int k = 0; k < K; k++) { Assert.Equal(cs[k], s[k], 1e-9); Assert.Equal(cn[k], e[k], 1e-12); }
    }

    [Fact]
    public void GapLags_GappedTrackWeighted_MatchesTheDirectSumOverPairsTimesItsWeight()
    {
        // The definition summed pair by pair (O(n^2) powers) against the polynomial, for a track with gaps at 3 and 7-8,
        // counted twice (a bootstrap multiplicity of 2) plus another gapped track once.
        const int K = 6;
        var (d, dn, g, gn) = DirectAndPolynomial([([0, 1, 2, 4, 5, 6, 9, 10, 11, 12], 2), ([3, 4, 6, 7, 8], 1)], K, 0.7);
        for (int k = 0; k < K; k++) { Assert.Equal(d[k], g[k], 1e-9); Assert.Equal(dn[k], gn[k], 1e-12); }
        Assert.NotEqual(0, g[1]);
    }

    [Theory]
    [InlineData(3)]
    [InlineData(13)]
    [InlineData(34)]
    public void GapLags_LongGappedTracksAnyLagCount_MatchTheDirectSumOverPairs(int K)
    {
        // Few lags to more than the 31 a default run fits: the same definition summed pair by pair for two 80-frame tracks
        // with one-frame and two-frame gaps, one of them counted three times.
        int[] f1 = [.. Enumerable.Range(0, 80).Where(t => t % 17 != 5)], f2 = [.. Enumerable.Range(10, 80).Where(t => t != 33 && t != 34 && t != 61)];
        var (d, dn, g, gn) = DirectAndPolynomial([(f1, 1), (f2, 3)], K, 0.93);
        // Tolerance: both are sums of about 80^2 terms of size <= 1 in another order; 1e-9 relative to the lag-0 sum.
        for (int k = 0; k < K; k++) { Assert.Equal(d[k], g[k], 1e-9 * Math.Abs(d[0])); Assert.Equal(dn[k], gn[k], 1e-9 * Math.Abs(dn[0])); }
    }

    /// <summary>The weighted expected sums of <paramref name="tracks"/> pair by pair (<see cref="OrnsteinUhlenbeckFit.ExpectedSums"/>)
    /// and by the polynomial of <see cref="GapLags"/>: signal and noise parts of each.</summary>
    private static (double[] Direct, double[] DirectNoise, double[] Poly, double[] PolyNoise) DirectAndPolynomial((int[] Frames, int W)[] tracks, int K, double rho)
    {
        var d = new double[K]; var dn = new double[K];
        foreach (var (f, w) in tracks)
        {
            var s = new double[K]; var e = new double[K];
            OrnsteinUhlenbeckFit.ExpectedSums(f, rho, s, e);
            for (int k = 0; k < K; k++) { d[k] += w * s[k]; dn[k] += w * e[k]; }
        }
        var g = new double[K]; var gn = new double[K];
        GapLags.Sum([.. tracks], K).AddTo(rho, g, gn);
        return (d, dn, g, gn);
    }
}
