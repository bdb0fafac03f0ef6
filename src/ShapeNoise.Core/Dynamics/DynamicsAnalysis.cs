using ShapeNoise.TimeSeries;
using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;

namespace ShapeNoise.Dynamics;

/// <summary>One pooled correlation curve with its bootstrap band and fitted model, lags 0..K.</summary>
public sealed record SeriesCorrelation(string Name, double[] Correlation, long[] Pairs, double[] Low, double[] High, double[] Model);

/// <summary>One fluctuation coordinate treated as an Ornstein-Uhlenbeck process dx = -x/tau dt + sqrt(2 D) dW (var = D tau), in px and frames.</summary>
public sealed record OuCoordinate(string Name, string Meaning, Estimate TauFrames, Estimate VariancePx2, Estimate DPx2PerFrame, double NoiseVariancePx2, double UncorrectedTauFrames);

/// <summary>Correlation times of shape and orientation (docs/measures.md#movie-pooling, temporal part; docs/dynamics.md), in px and frames.</summary>
/// <param name="MaxLag">Longest lag of the curves (frames).</param>
/// <param name="FitLags">Lags fitted by the OU model (frames).</param>
/// <param name="Series">Pooled correlation curves ("q" is the signed elongation q_s, docs/dynamics.md#signed-elongation).</param>
/// <param name="TauQFrames">OU correlation time of the signed elongation q_s (at_bound when the fit reaches its search bound).</param>
/// <param name="TauQUncorrectedFrames">-1 / ln C_q(1), no bias correction.</param>
/// <param name="TauQIntegratedFrames">Sokal's integrated time of q_s.</param>
/// <param name="SokalWindow">Sokal's window (frames).</param>
/// <param name="SokalWindowReached">Whether the window rule was met.</param>
/// <param name="TauThetaFrames">Orientation correlation time of the chosen model.</param>
/// <param name="ThetaPlateau">Plateau p of C_theta with its bootstrap interval (0 when no plateau is chosen).</param>
/// <param name="VarianceQ">Signal variance of q_s.</param>
/// <param name="Coordinates">The OU fluctuation coordinates.</param>
/// <param name="Tracks">Tracks used.</param>
/// <param name="ThetaModel">"plateau" or "no plateau": the model of C_theta chosen by AIC (docs/dynamics.md#orientation-tau_theta-by-model-selection).</param>
/// <param name="NearlyRoundOutlines">Outlines (track frames) whose |q| is below twice the white-noise sd of q (docs/dynamics.md#nearly-round-outlines).</param>
public sealed record DynamicsResult(int MaxLag, int FitLags, IReadOnlyList<SeriesCorrelation> Series,
    Estimate TauQFrames, double TauQUncorrectedFrames, Estimate TauQIntegratedFrames, int SokalWindow, bool SokalWindowReached,
    Estimate TauThetaFrames, Estimate ThetaPlateau, double VarianceQ, IReadOnlyList<OuCoordinate> Coordinates, int Tracks,
    string ThetaModel = "", int NearlyRoundOutlines = 0)
{
    /// <summary>The result when no track enters the statistics: no lags, no series, every estimate NaN, 0 tracks.</summary>
    public static DynamicsResult Empty => new(0, 0, [], Estimate.NaN, double.NaN, Estimate.NaN, 0, false, Estimate.NaN, Estimate.NaN, double.NaN, [], 0);

    /// <summary>Text of a <see cref="Dynamics.ThetaModel"/> as written to the outputs.</summary>
    public static string ModelName(ThetaModel m) => m == Dynamics.ThetaModel.Plateau ? "plateau" : "no plateau";
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

    private static readonly string[] Names = ["q", "length", "width", "along", "across"];
    private static readonly string[] SeriesNames = ["q", "length", "width", "along", "across", "theta"];

    /// <summary>Lag sums of every coordinate of the used tracks, and the lag ranges (K curve lags, fitted lags).</summary>
    private sealed record Inputs(int Tracks, int MaxLen, int K, int FitLags, int[][] Frames, List<LagSums>[] Sums, List<LagSums> ThetaSums, double[][] Q)
    {
        /// <summary>Upper end of every tau search (frames): 20 x the longest track.</summary>
        public double MaxTau => 20.0 * MaxLen;
    }

    /// <summary>The point estimates: one OU fit per coordinate, the orientation fit, the Sokal time of q.</summary>
    private sealed record Point(OuFit[] Fits, double[] CTheta, long[] ThetaPairs, PlateauFit ThetaFit, (double TauInt, int Window, bool Reached) Sokal);

    /// <summary>Per bootstrap resample: tau, variance and D of every coordinate, every curve, tau_theta and Sokal's tau_int.</summary>
    private sealed record Resamples(int B, double[,] Tau, double[,] Var, double[,] D, double[][,] Curve, double[] Theta, double[] Plateau, double[] TauInt);

    /// <summary>Correlation curves, Ornstein-Uhlenbeck fits per coordinate, the Sokal integrated time of q and the
    /// orientation correlation time over the used tracks (docs/dynamics.md), each with a bootstrap over tracks
    /// (<paramref name="options"/>: longest lag, resamples, seed).</summary>
    public static DynamicsResult Run(IReadOnlyList<TrackRecord> allTracks, DynamicsOptions options, ResamplingPlan? plan = null)
    {
        var tracks = allTracks.Where(t => t.Used && t.Contour is not null).ToList();
        if (tracks.Count == 0) return DynamicsResult.Empty;
        var inp = Prepare(tracks, options.MaxLagFrames);
        var point = PointEstimates(inp);
        plan ??= ResamplingPlan.OverTracks(inp.Tracks, options.BootstrapResamples, options.Seed);
        if (plan.Items != inp.Tracks) throw new ArgumentException($"{nameof(plan)} covers {plan.Items} tracks, {inp.Tracks} are used");
        var boot = Resample(inp, plan);
        // Spatial blocks: widen the fitted intervals by the block-edge factor from the delete-one-block jackknife
        // (docs/statistics.md#block-edges), K extra fits instead of one per track.
        var jack = plan.EdgeCorrected ? Resample(inp, plan with { Draws = plan.LeaveOneUnitOut() }) : null;
        var neighbours = jack is null ? [] : plan.NeighbourUnits();
        Estimate Edge(Estimate e, Func<Resamples, int, double> of)
        {
            if (jack is null) return e;
            var v = new double[jack.B];
            for (int b = 0; b < jack.B; b++) v[b] = of(jack, b);
            return Bootstrap.Widened(e, Bootstrap.BlockEdgeInflation(v, neighbours));
        }
        int K = inp.K;
        var coords = new List<OuCoordinate>();
        for (int s = 1; s < Names.Length; s++)
        {
            var f = point.Fits[s];
            int row = s;
            coords.Add(new OuCoordinate(Coordinates[s - 1].Name, Coordinates[s - 1].Meaning, Edge(Tau(f.TauFrames, boot.Tau, s, plan, inp), (r, b) => r.Tau[row, b]).WithResolutionLimit(inp.MaxLen),
                Edge(Est(f.SignalVariance, boot.Var, s, plan), (r, b) => r.Var[row, b]),
                Edge(Est(f.SignalVariance / f.TauFrames, boot.D, s, plan), (r, b) => r.D[row, b]), f.NoiseVariance, f.UncorrectedTauFrames));
        }
        var series = Curves(inp, point, boot);
        var theta = Edge(Estimate.Fitted(point.ThetaFit.TauFrames, boot.Theta, plan.Units, plan.UnitName, OrientationCorrelation.MinTauFrames, inp.MaxTau), (r, b) => r.Theta[b])
            .WithResolutionLimit(inp.MaxLen);
        var tauInt = Edge(Bootstrap.Interval(point.Sokal.TauInt, boot.TauInt, plan.Units, plan.UnitName), (r, b) => r.TauInt[b]);
        var q = point.Fits[0];
        return new DynamicsResult(K, inp.FitLags, series, Edge(Tau(q.TauFrames, boot.Tau, 0, plan, inp), (r, b) => r.Tau[0, b]).WithResolutionLimit(inp.MaxLen), q.UncorrectedTauFrames, tauInt, point.Sokal.Window, point.Sokal.Reached,
            theta, Edge(PlateauEstimate(point.ThetaFit.Plateau, boot.Plateau, plan), (r, b) => r.Plateau[b]), q.SignalVariance, coords, inp.Tracks,
            DynamicsResult.ModelName(point.ThetaFit.Model), NearlyRound(tracks, q.NoiseVariance));
    }

    /// <summary>A fitted OU tau with its search bounds [0.05 frame, 20 x the longest track] (at_bound detection, docs/dynamics.md#at-bound);
    /// the callers also mark a tau above the longest track at_bound (<see cref="Estimate.WithResolutionLimit"/>).</summary>
    private static Estimate Tau(double value, double[,] boot, int row, ResamplingPlan plan, Inputs inp)
        => Estimate.Fitted(value, Enumerable.Range(0, boot.GetLength(1)).Select(i => boot[row, i]).ToArray(), plan.Units, plan.UnitName,
            OrnsteinUhlenbeckFit.MinTauFrames, inp.MaxTau);

    /// <summary>The plateau with its percentile interval; when the point fit and every resample choose no plateau the
    /// estimate is 0 [0, 0] and still ok (the data choose the model without a plateau every time).</summary>
    private static Estimate PlateauEstimate(double value, double[] boot, ResamplingPlan plan)
    {
        var e = Bootstrap.Interval(value, boot, plan.Units, plan.UnitName);
        bool allZero = value == 0 && boot.Length > 1 && boot.All(v => v == 0);
        return allZero && plan.Units >= Estimate.MinUnits ? e with { Status = EstimateStatus.Ok, Reason = null } : e;
    }

    /// <summary>Outlines whose elongation q is within the noise of 0: q &lt; 2 eta_q, with eta_q^2 the white-noise variance
    /// of the signed elongation from its OU fit (docs/dynamics.md#nearly-round-outlines).</summary>
    private static int NearlyRound(List<TrackRecord> tracks, double noiseVarianceQ)
    {
        if (!(noiseVarianceQ > 0)) return 0;
        double limit = 2 * Math.Sqrt(noiseVarianceQ);
        return tracks.Sum(t => t.Elongation.Count(q => Math.Abs(q) < limit));
    }

    /// <summary>Half-width (frames) of the window of the local director (docs/dynamics.md#signed-elongation).</summary>
    public const int DirectorHalfWindowFrames = 8;

    /// <summary>
    /// Signed elongation of one track: the cell nematic tensor q (cos 2 theta, sin 2 theta) projected on the local director,
    /// q_s(t) = q(t) cos 2(theta(t) - theta_ref(t)), theta_ref(t) = 0.5 atan2(sum q sin 2 theta, sum q cos 2 theta) over the
    /// other frames within <paramref name="halfWindow"/> of t (frame t itself left out so its own noise does not pull the
    /// reference; int.MaxValue = the track's mean director; docs/dynamics.md#signed-elongation).
    /// Unlike q &gt;= 0 it changes sign when a nearly round cell's long axis flips; a window short against tau_theta keeps
    /// the cell's rotation out of q_s.
    /// </summary>
    internal static double[] SignedElongation(double[] q, double[] thetaRad, int halfWindow = int.MaxValue)
    {
        int n = q.Length;
        var cx = new double[n + 1]; var cy = new double[n + 1];
        for (int i = 0; i < n; i++) { cx[i + 1] = cx[i] + q[i] * Math.Cos(2 * thetaRad[i]); cy[i + 1] = cy[i] + q[i] * Math.Sin(2 * thetaRad[i]); }
        var r = new double[n];
        for (int i = 0; i < n; i++)
        {
            int lo = halfWindow >= n ? 0 : Math.Max(0, i - halfWindow), hi = halfWindow >= n ? n : Math.Min(n, i + halfWindow + 1);
            double sx = cx[hi] - cx[lo], sy = cy[hi] - cy[lo];
            if (hi - lo > 1) { sx -= q[i] * Math.Cos(2 * thetaRad[i]); sy -= q[i] * Math.Sin(2 * thetaRad[i]); }
            double reference = 0.5 * Math.Atan2(sy, sx);
            r[i] = q[i] * Math.Cos(2 * (thetaRad[i] - reference));
        }
        return r;
    }

    private static Estimate Est(double value, double[,] boot, int row, ResamplingPlan plan)
        => Bootstrap.Interval(value, Enumerable.Range(0, boot.GetLength(1)).Select(i => boot[row, i]), plan.Units, plan.UnitName);

    private static Inputs Prepare(List<TrackRecord> tracks, int maxLagFrames)
    {
        int maxLen = tracks.Max(t => t.FrameIndex[^1] - t.FrameIndex[0] + 1);
        var lengths = tracks.Select(t => t.Frames).OrderBy(n => n).ToArray();
        int medianLen = lengths[lengths.Length / 2];
        int K = Math.Min(maxLagFrames, maxLen - 1);
        int fitLags = Math.Min(K, Math.Max(4, medianLen / 3));
        var frames = tracks.Select(t => t.FrameIndex).ToArray();
        var qs = tracks.Select(t => SignedElongation(t.Elongation, t.ThetaRad, DirectorHalfWindowFrames)).ToArray();
        var values = new Func<TrackRecord, double[]>[] { t => qs[tracks.IndexOf(t)], t => t.LengthPx, t => t.WidthPx, t => t.Contour!.AlongSeries, t => t.Contour!.AcrossSeries };
        var sums = new List<LagSums>[Names.Length];
        for (int s = 0; s < Names.Length; s++)
            sums[s] = tracks.Select(t => PooledAutocovariance.Of(new TrackSeries(t.FrameIndex, values[s](t)), K)).ToList();
        var thetaSums = tracks.Select(t => OrientationCorrelation.Of(new TrackSeries(t.FrameIndex, t.ThetaRad), K)).ToList();
        return new Inputs(tracks.Count, maxLen, K, fitLags, frames, sums, thetaSums, qs);
    }

    private static Point PointEstimates(Inputs inp)
    {
        var fits = new OuFit[Names.Length];
        for (int s = 0; s < Names.Length; s++) fits[s] = OrnsteinUhlenbeckFit.Fit(inp.Sums[s], inp.Frames, [], inp.FitLags, inp.MaxTau);
        var cTheta = OrientationCorrelation.Pool(inp.ThetaSums, [], out var thetaPairs);
        var thetaFit = OrientationCorrelation.FitTracks(inp.ThetaSums, [], inp.K, inp.MaxTau);
        var cq = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(inp.Sums[0], [], out _));
        var sokal = IntegratedTime.Sokal(cq);
        return new Point(fits, cTheta, thetaPairs, thetaFit, (sokal.TauInt, sokal.Window, sokal.Reached));
    }

    /// <summary>Bootstrap over the plan's units: the resamples were drawn in order from one seeded stream; evaluated in parallel.</summary>
    private static Resamples Resample(Inputs inp, ResamplingPlan plan)
    {
        int K = inp.K, m = Names.Length;
        var draws = plan.Draws;
        int B = draws.Length;
        var r = new Resamples(B, new double[m, B], new double[m, B], new double[m, B], new double[m + 1][,], new double[B], new double[B], new double[B]);
        for (int s = 0; s <= m; s++) r.Curve[s] = new double[B, K + 1];
        var units = UnitSplit.Of(plan);
        Parallel.For(0, B, b =>
        {
            var w = draws[b];
            var split = units.Split(w);   // once per resample, for every pooled sum below (docs/statistics.md#how-a-resample-is-pooled)
            for (int s = 0; s < m; s++)
            {
                var f = OrnsteinUhlenbeckFit.Fit(inp.Sums[s], inp.Frames, w, inp.FitLags, inp.MaxTau, split);
                r.Tau[s, b] = f.TauFrames; r.Var[s, b] = f.SignalVariance; r.D[s, b] = f.SignalVariance / f.TauFrames;
                var c = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(inp.Sums[s], w, out _, int.MaxValue, split));
                for (int k = 0; k <= K; k++) r.Curve[s][b, k] = c[k];
                if (s == 0) r.TauInt[b] = IntegratedTime.Sokal(c).TauInt;
            }
            var ct = PooledAutocovariance.Pool(inp.ThetaSums, w, out var tp, int.MaxValue, split);
            for (int k = 0; k <= K; k++) r.Curve[m][b, k] = ct[k];
            var tf = OrientationCorrelation.FitTracks(inp.ThetaSums, w, K, inp.MaxTau, split);
            r.Theta[b] = tf.TauFrames; r.Plateau[b] = tf.Plateau;
        });
        return r;
    }

    /// <summary>Every pooled curve with its bootstrap band and fitted model (the OU model; for theta the chosen model, plateau 0 when none).</summary>
    private static List<SeriesCorrelation> Curves(Inputs inp, Point point, Resamples boot)
    {
        int K = inp.K, m = Names.Length;
        var series = new List<SeriesCorrelation>();
        for (int s = 0; s <= m; s++)
        {
            double[] corr; long[] pairs; double[] model;
            if (s < m)
            {
                corr = PooledAutocovariance.Correlation(PooledAutocovariance.Pool(inp.Sums[s], [], out pairs));
                model = OrnsteinUhlenbeckFit.ModelCorrelation(inp.Frames, point.Fits[s], K);
            }
            else
            {
                corr = point.CTheta; pairs = point.ThetaPairs;
                var tf = point.ThetaFit;
                model = new double[K + 1];
                for (int k = 0; k <= K; k++) model[k] = k == 0 ? 1 : tf.Plateau + tf.Amplitude * Math.Exp(-k / tf.TauFrames);
            }
            var lo = new double[K + 1]; var hi = new double[K + 1];
            for (int k = 0; k <= K; k++)
            {
                (lo[k], hi[k]) = Bootstrap.PercentileBounds(Enumerable.Range(0, boot.B).Select(b => boot.Curve[s][b, k]));
            }
            series.Add(new SeriesCorrelation(SeriesNames[s], corr, pairs, lo, hi, model));
        }
        return series;
    }
}
