using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;

namespace ShapeNoise.Dynamics;

/// <summary>One pooled correlation curve with its bootstrap band and fitted model, lags 0..K.</summary>
public sealed record SeriesCorrelation(string Name, double[] Correlation, long[] Pairs, double[] Low, double[] High, double[] Model);

/// <summary>One fluctuation coordinate treated as an Ornstein-Uhlenbeck process dx = -x/tau dt + sqrt(2 D) dW (var = D tau), in px and frames.</summary>
public sealed record OuCoordinate(string Name, string Meaning, Estimate TauFrames, Estimate VariancePx2, Estimate DPx2PerFrame, double NoiseVariancePx2, double UncorrectedTauFrames);

/// <summary>Correlation times of shape and orientation (docs/measures.md#movie-pooling, temporal part; docs/dynamics.md), in px and frames.</summary>
public sealed record DynamicsResult(int MaxLag, int FitLags, IReadOnlyList<SeriesCorrelation> Series,
    Estimate TauQFrames, double TauQUncorrectedFrames, Estimate TauQIntegratedFrames, int SokalWindow, bool SokalWindowReached,
    Estimate TauThetaFrames, double ThetaPlateau, double VarianceQ, IReadOnlyList<OuCoordinate> Coordinates, int Tracks)
{
    public static DynamicsResult Empty => new(0, 0, [], Estimate.NaN, double.NaN, Estimate.NaN, 0, false, Estimate.NaN, double.NaN, double.NaN, [], 0);
}

/// <summary>Runs every temporal estimator over the tracks that enter the statistics, with a seeded bootstrap over tracks.</summary>
public static class DynamicsAnalysis
{
    private static readonly (string Name, string Meaning)[] Coordinates =
    [
        ("length", "cell length L = 4 sqrt(l1) about its track mean"),
        ("width", "cell width W = 4 sqrt(l2) about its track mean"),
        ("along", "mean normal displacement of the outline in the pole sector (normal within 45 deg of the long axis)"),
        ("across", "mean normal displacement of the outline in the flank sector"),
    ];

    /// <summary>Correlation curves, Ornstein-Uhlenbeck fits per coordinate, the Sokal integrated time of q and the
    /// orientation correlation time over the used tracks (docs/dynamics.md), each with a bootstrap over tracks
    /// (<paramref name="options"/>: longest lag, resamples, seed).</summary>
    public static DynamicsResult Run(IReadOnlyList<TrackRecord> allTracks, DynamicsOptions options)
    {
        var tracks = allTracks.Where(t => t.Used && t.Contour is not null).ToList();
        if (tracks.Count == 0) return DynamicsResult.Empty;
        int maxLen = tracks.Max(t => t.FrameIndex[^1] - t.FrameIndex[0] + 1);
        var lengths = tracks.Select(t => t.Frames).OrderBy(n => n).ToArray();
        int medianLen = lengths[lengths.Length / 2];
        int K = Math.Min(options.MaxLagFrames, maxLen - 1);
        int fitLags = Math.Min(K, Math.Max(4, medianLen / 3));
        var frames = tracks.Select(t => t.FrameIndex).ToArray();

        var names = new[] { "q", "length", "width", "along", "across" };
        var values = new Func<TrackRecord, double[]>[] { t => t.Elongation, t => t.LengthPx, t => t.WidthPx, t => t.Contour!.AlongSeries, t => t.Contour!.AcrossSeries };
        var sums = new List<LagSums>[names.Length];
        for (int s = 0; s < names.Length; s++)
            sums[s] = tracks.Select(t => PooledAutocovariance.Of(new TrackSeries(t.FrameIndex, values[s](t)), K)).ToList();
        var thetaSums = tracks.Select(t => OrientationCorrelation.Of(new TrackSeries(t.FrameIndex, t.ThetaRad), K)).ToList();

        // Point estimates.
        var fits = new OuFit[names.Length];
        for (int s = 0; s < names.Length; s++) fits[s] = OrnsteinUhlenbeckFit.Fit(sums[s], frames, [], fitLags);
        var cTheta = OrientationCorrelation.Pool(thetaSums, [], out var thetaPairs);
        var thetaFit = OrientationCorrelation.Fit(cTheta, thetaPairs, K, 20.0 * maxLen);
        var cq = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(sums[0], [], out _));
        var sokal = IntegratedTime.Sokal(cq);

        // Bootstrap over tracks: the resamples are drawn in order from one seeded stream, then evaluated in parallel.
        int B = options.BootstrapResamples, n = tracks.Count;
        var draws = Bootstrap.Draws(n, B, options.Seed);
        var bTau = new double[names.Length, B]; var bVar = new double[names.Length, B]; var bD = new double[names.Length, B];
        var bCurve = new double[names.Length + 1][,];
        for (int s = 0; s <= names.Length; s++) bCurve[s] = new double[B, K + 1];
        var bTheta = new double[B]; var bInt = new double[B];
        Parallel.For(0, B, b =>
        {
            var w = draws[b];
            for (int s = 0; s < names.Length; s++)
            {
                var f = OrnsteinUhlenbeckFit.Fit(sums[s], frames, w, fitLags);
                bTau[s, b] = f.TauFrames; bVar[s, b] = f.SignalVariance; bD[s, b] = f.SignalVariance / f.TauFrames;
                var c = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(sums[s], w, out _));
                for (int k = 0; k <= K; k++) bCurve[s][b, k] = c[k];
                if (s == 0) bInt[b] = IntegratedTime.Sokal(c).TauInt;
            }
            var ct = OrientationCorrelation.Pool(thetaSums, w, out var tp);
            for (int k = 0; k <= K; k++) bCurve[names.Length][b, k] = ct[k];
            bTheta[b] = OrientationCorrelation.Fit(ct, tp, K, 20.0 * maxLen).TauFrames;
        });

        Estimate Est(double value, double[,] boot, int row) => Bootstrap.Interval(value, Enumerable.Range(0, B).Select(b => boot[row, b]));
        var coords = new List<OuCoordinate>();
        for (int s = 1; s < names.Length; s++)
        {
            var f = fits[s];
            coords.Add(new OuCoordinate(Coordinates[s - 1].Name, Coordinates[s - 1].Meaning, Est(f.TauFrames, bTau, s), Est(f.SignalVariance, bVar, s),
                Est(f.SignalVariance / f.TauFrames, bD, s), f.NoiseVariance, f.UncorrectedTauFrames));
        }

        var series = new List<SeriesCorrelation>();
        string[] seriesNames = ["q", "length", "width", "along", "across", "theta"];
        for (int s = 0; s <= names.Length; s++)
        {
            double[] corr; long[] pairs; double[] model;
            if (s < names.Length)
            {
                corr = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(sums[s], [], out pairs));
                model = OrnsteinUhlenbeckFit.ModelCorrelation(frames, fits[s], K);
            }
            else
            {
                corr = cTheta; pairs = thetaPairs;
                model = new double[K + 1];
                for (int k = 0; k <= K; k++) model[k] = k == 0 ? 1 : thetaFit.Plateau + thetaFit.Amplitude * Math.Exp(-k / thetaFit.TauFrames);
            }
            var lo = new double[K + 1]; var hi = new double[K + 1];
            for (int k = 0; k <= K; k++)
            {
                var e = Bootstrap.Interval(corr[k], Enumerable.Range(0, B).Select(b => bCurve[s][b, k]));
                lo[k] = e.Low; hi[k] = e.High;
            }
            series.Add(new SeriesCorrelation(seriesNames[s], corr, pairs, lo, hi, model));
        }
        var theta = Bootstrap.Interval(thetaFit.TauFrames, bTheta);
        var tauInt = Bootstrap.Interval(sokal.TauInt, bInt);
        return new DynamicsResult(K, fitLags, series, Est(fits[0].TauFrames, bTau, 0), fits[0].UncorrectedTauFrames, tauInt, sokal.Window, sokal.Reached,
            theta, thetaFit.Plateau, fits[0].SignalVariance, coords, n);
    }
}
