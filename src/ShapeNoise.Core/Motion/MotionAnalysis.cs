using ShapeNoise.Nematic;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Motion;

/// <summary>Options of the collective-motion stage; validated on construction.</summary>
/// <param name="BootstrapResamples">Moving-block bootstrap resamples over frames (0 = no intervals).</param>
/// <param name="Seed">Seed of the resampling.</param>
/// <param name="MaxLagFrames">Longest lag of the temporal velocity autocorrelation.</param>
/// <param name="KeepDrift">Keep the tissue's velocity u(t) in the cell velocities (docs/defects.md#drift).</param>
public sealed record MotionOptions(int BootstrapResamples, int Seed, int MaxLagFrames, bool KeepDrift)
{
    /// <summary>Throws on a negative resample count or a lag below 1.</summary>
    public MotionOptions Validated()
    {
        if (BootstrapResamples < 0) throw new ArgumentException($"{nameof(BootstrapResamples)} must be at least 0");
        if (MaxLagFrames < 1) throw new ArgumentException($"{nameof(MaxLagFrames)} must be at least 1");
        return this;
    }
}

/// <summary>One frame's collective-motion numbers (px, frames): polar order of the raw cell velocities, mean and rms speed
/// after drift removal, the tissue velocity u, enstrophy and mean nematic order of the coarse field (NaN where undefined).</summary>
public readonly record struct MotionFrame(int Frame, int Cells, double PolarOrder, double MeanSpeedPx, double RmsSpeedPx,
    double DriftVx, double DriftVy, double Enstrophy, double MeanOrder);

/// <summary>Everything the collective-motion stage measured (px, frames; docs/motion.md).</summary>
public sealed record MotionResult(Estimate PolarOrder, Estimate MeanSpeed, Estimate RmsSpeed, Estimate VelocityCorrelationLength,
    Estimate VelocityCorrelationLength1e, Estimate VorticityCorrelationLength, Estimate Enstrophy, Estimate VelocityAutocorrelationTime,
    Estimate NematicCorrelationLength, Estimate MeanOrder, RadialCorrelation Velocity, RadialCorrelation Vorticity, RadialCorrelation Nematic,
    double[] VelocityAutocorrelation, IReadOnlyList<MotionFrame> Frames, double CorrelationSpacingPx, int BlockFrames)
{
    /// <summary>The vorticity of the middle frame on the correlation grid (for a figure); null when the fields do not apply.</summary>
    public VorticityMap? VorticitySnapshot { get; init; }

    /// <summary>Why the coarse-field measures (correlations, enstrophy, order) do not apply, or null when they do.</summary>
    public string? FieldNotApplicableReason { get; init; }

    /// <summary>The result of a run without cells or velocities.</summary>
    public static MotionResult Empty(string reason)
    {
        var na = Estimate.NotApplicableBecause(reason, 0, "time blocks");
        var none = new RadialCorrelation([], [], []);
        return new MotionResult(na, na, na, na, na, na, na, na, na, na, none, none, none, [], [], double.NaN, 0) { FieldNotApplicableReason = reason };
    }
}

/// <summary>
/// The collective-motion stage (docs/motion.md): per frame, the cells' velocities (from an <see cref="IVelocitySource"/>)
/// give the polar order (before drift removal), the mean and rms speed (after it); the coarse-grained velocity and Q fields
/// (<see cref="CoarseGraining"/>, the defect stage's width) give the velocity, vorticity and nematic correlations
/// (<see cref="FieldCorrelation"/>), the enstrophy and the mean order; tracked cells give the temporal velocity
/// autocorrelation. Each frame leaves sums that add up over frames, so the moving-block bootstrap over frames re-weights
/// sums instead of recomputing fields (docs/motion.md#intervals).
/// </summary>
/// <remarks>Vicsek T. et al. (1995), Phys. Rev. Lett. 75:1226 (polar order); Blanch-Mercader C. et al. (2018), Phys. Rev.
/// Lett. 120:208101 (velocity and vorticity correlations of epithelial turbulence); Doostmohammadi A. et al. (2018), Nat.
/// Commun. 9:3246 (active nematics); Künsch H.R. (1989), Ann. Statist. 17:1217 (moving-block bootstrap).</remarks>
public static class MotionAnalysis
{
    /// <summary>Runs the stage. <paramref name="fieldNotApplicable"/>: why the coarse-field measures do not apply (a tissue
    /// that is not confluent), or null.</summary>
    public static MotionResult Run(int widthPx, int heightPx, IReadOnlyList<CellRecord> cells, Func<CellRecord, (double Vx, double Vy)> velocityOf,
        double coarsePx, double gridPx, MotionOptions o, string? fieldNotApplicable)
    {
        o.Validated();
        if (cells.Count == 0 || !(coarsePx > 0) || !(gridPx > 0)) return MotionResult.Empty("no cells or no coarse width");
        int stride = Math.Max(1, (int)Math.Floor(0.5 * coarsePx / gridPx));
        var runs = FrameRuns.Of(cells);
        var frames = new FrameSums[runs.Count];
        Parallel.For(0, runs.Count, f => frames[f] = FrameSums.Of(runs[f].Frame, Samples(cells, runs[f], velocityOf), widthPx, heightPx,
            gridPx, coarsePx, stride, !o.KeepDrift, fieldNotApplicable is null, keepMap: f == runs.Count / 2));
        FieldCorrelation.ReleaseWorkspaces();
        var lags = LagSums.Of(cells, runs, frames, velocityOf, o.MaxLagFrames);
        return Summarise(frames, lags, gridPx * stride, o, fieldNotApplicable);
    }

    private static CellSample[] Samples(IReadOnlyList<CellRecord> cells, (int Frame, int Start, int Count) run, Func<CellRecord, (double Vx, double Vy)> velocityOf)
    {
        var s = new CellSample[run.Count];
        for (int i = 0; i < run.Count; i++) s[i] = CellSample.Of(cells[run.Start + i], velocityOf(cells[run.Start + i]));
        return s;
    }

    /// <summary>Values and moving-block intervals of every measure from the per-frame sums.</summary>
    private static MotionResult Summarise(FrameSums[] frames, LagSums lags, double spacingPx, MotionOptions o, string? fieldNotApplicable)
    {
        int n = frames.Length;
        var all = new double[n]; Array.Fill(all, 1);
        var point = Measures.Of(frames, lags, all, spacingPx);
        int block = MovingBlockBootstrap.BlockLength(n, n, double.IsFinite(point.TauFrames) ? (int)Math.Ceiling(2 * point.TauFrames) : 2);
        int units = n / block;
        var draws = o.BootstrapResamples > 0 && units > 0 ? MovingBlockBootstrap.FrameWeights(n, block, o.BootstrapResamples, o.Seed) : [];
        var resampled = new Measures[draws.Length];
        for (int b = 0; b < draws.Length; b++) resampled[b] = Measures.Of(frames, lags, draws[b], spacingPx);
        double rangePx = point.Velocity.R.Length > 0 ? point.Velocity.R[^1] : double.NaN;
        Estimate E(Func<Measures, double> f) => Bootstrap.Interval(f(point), Select(resampled, f), units, "time blocks");
        Estimate Length(Func<Measures, double> f) => LengthEstimate(f(point), Select(resampled, f), units, rangePx);
        Estimate Field(Estimate e) => fieldNotApplicable is null ? e : Estimate.NotApplicableBecause(fieldNotApplicable, units, "time blocks");
        var tau = Estimate.Fitted(point.TauFrames, Select(resampled, m => m.TauFrames), units, "time blocks", 0, o.MaxLagFrames);
        return new MotionResult(E(m => m.PolarOrder), E(m => m.MeanSpeed), E(m => m.RmsSpeed),
            Field(Length(m => m.VelocityZero)), Field(Length(m => m.Velocity1e)), Field(Length(m => m.VorticityZero)), Field(E(m => m.Enstrophy)),
            tau, Field(Length(m => m.Nematic1e)), Field(E(m => m.MeanOrder)), point.Velocity, point.Vorticity, point.Nematic, point.Autocorrelation,
            Array.ConvertAll(frames, f => f.Numbers), spacingPx, block) { FieldNotApplicableReason = fieldNotApplicable, VorticitySnapshot = frames[n / 2].Map };
    }

    private static double[] Select(Measures[] m, Func<Measures, double> f)
    {
        var v = new double[m.Length];
        for (int i = 0; i < m.Length; i++) v[i] = f(m[i]);
        return v;
    }

    /// <summary>A correlation length: at_bound (lower bound = the range) when the curve does not cross within the range in
    /// the data or in more than <see cref="Estimate.MaxFractionAtBound"/> of the resamples (docs/motion.md#correlation-lengths).</summary>
    private static Estimate LengthEstimate(double value, double[] resampled, int units, double rangePx)
    {
        var capped = new double[resampled.Length];
        for (int i = 0; i < capped.Length; i++) capped[i] = double.IsNaN(resampled[i]) ? rangePx : resampled[i];
        var e = Estimate.Fitted(double.IsNaN(value) ? rangePx : value, capped, units, "time blocks", 0, rangePx);
        return e.Status == EstimateStatus.AtBound ? e with { Reason = $"the correlation does not fall to the level within {rangePx:0.#} px (half the field) in the data or in {100 * e.FractionAtBound:0}% of resamples" } : e;
    }

    /// <summary>The measures of one weighting of the frames (all ones: the data; a bootstrap draw: a resample).</summary>
    private sealed record Measures(double PolarOrder, double MeanSpeed, double RmsSpeed, double Enstrophy, double MeanOrder,
        RadialCorrelation Velocity, RadialCorrelation Vorticity, RadialCorrelation Nematic, double[] Autocorrelation)
    {
        public double VelocityZero => VelocityFieldStatistics.FirstZero(Velocity);
        public double Velocity1e => VelocityFieldStatistics.CrossingOf(Velocity, 1 / Math.E);
        public double VorticityZero => VelocityFieldStatistics.FirstZero(Vorticity);
        public double Nematic1e => VelocityFieldStatistics.CrossingOf(Nematic, 1 / Math.E);
        public double TauFrames => VelocityFieldStatistics.AutocorrelationTime(Autocorrelation);

        public static Measures Of(FrameSums[] frames, LagSums lags, double[] w, double spacingPx)
        {
            int bins = frames[0].Velocity.Sum.Length;
            var v = RadialSums.Zero(bins); var om = RadialSums.Zero(bins); var q = RadialSums.Zero(bins);
            double phi = 0, phiW = 0, speed = 0, sq = 0, cellsW = 0, ens = 0, ensN = 0, order = 0, orderN = 0;
            for (int f = 0; f < frames.Length; f++)
            {
                if (w[f] == 0) continue;
                var s = frames[f];
                if (double.IsFinite(s.Numbers.PolarOrder)) { phi += w[f] * s.Numbers.PolarOrder; phiW += w[f]; }
                speed += w[f] * s.SpeedSum; sq += w[f] * s.FluctuationSqSum; cellsW += w[f] * s.MovingCells;
                ens += w[f] * s.VorticitySqSum; ensN += w[f] * s.VorticityNodes;
                order += w[f] * s.OrderSum; orderN += w[f] * s.OrderNodes;
                v.Add(s.Velocity, w[f]); om.Add(s.Vorticity, w[f]); q.Add(s.Nematic, w[f]);
            }
            return new Measures(phiW > 0 ? phi / phiW : double.NaN, cellsW > 0 ? speed / cellsW : double.NaN,
                cellsW > 0 ? Math.Sqrt(sq / cellsW) : double.NaN, ensN > 0 ? ens / (2 * ensN) : double.NaN, orderN > 0 ? order / orderN : double.NaN,
                v.Normalised(spacingPx), om.Normalised(spacingPx), q.Normalised(spacingPx), lags.Correlation(w));
        }
    }
}
