using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>One defect in one frame, linked into a defect track (px, frames). Vx, Vy: the defect's velocity relative to the
/// tissue (robust slope over its track, docs/defects.md#drift; in the lab frame with --keep-drift); FlowVx, FlowVy: the
/// coarse-grained cell velocity at the core, drift removed likewise.</summary>
public sealed record DefectObservation(int Frame, int TrackId, Defect Defect, double Vx, double Vy, double HeadwardSpeed,
    double FlowVx, double FlowVy, double FlowHeadwardSpeed);

/// <summary>A defect followed through frames, with its mean headward speeds (px/frame; NaN when undefined).</summary>
public sealed record DefectTrack(int Id, double Charge, int FirstFrame, int LastFrame, int Frames, double HeadwardSpeed, double FlowHeadwardSpeed)
{
    /// <summary>Frames with a finite headward speed (the line fit needs <see cref="HeadwardStatistics.MinSlopePoints"/> track
    /// members within its window): the track's weight in the time-weighted mean.</summary>
    public int SpeedSamples { get; init; } = Frames;
    /// <summary>Frames with a finite headward cell flow at the core.</summary>
    public int FlowSamples { get; init; } = Frames;
}

/// <summary>Mean cell velocity and director around +1/2 defects, in each defect's frame (e_head along +x); offsets in coarse widths.</summary>
public sealed record EnsembleFlow(double StepCoarse, int Half, double[] Vpar, double[] Vperp, double[] Qxx, double[] Qxy, int[] Samples);

/// <summary>Everything the defect stage measured (px, frames).</summary>
public sealed record DefectResult(double CoarsePx, double GridPx, IReadOnlyList<DefectObservation> Observations, IReadOnlyList<DefectTrack> Tracks,
    double PlusPerFrame, double MinusPerFrame, Estimate HeadwardSpeed, Estimate FlowHeadwardSpeed, double FractionHeadward,
    int PlusTracksUsed, int Births, int Deaths, EnsembleFlow Flow)
{
    /// <summary>Mean over frames of the local alignment of the cell axes (<see cref="FrameDefects.Alignment"/>); NaN without frames.</summary>
    public double MeanAlignment { get; init; } = double.NaN;

    /// <summary>The tissue's velocity u(t) per frame (px/frame; <see cref="TissueDrift"/>), whether or not it was removed.</summary>
    public IReadOnlyList<TissueDriftFrame> Drift { get; init; } = [];

    /// <summary>Whether u(t) was removed from the cell velocities and the defect kinematics (false with --keep-drift).</summary>
    public bool DriftRemoved { get; init; }

    /// <summary>Mean |u| over frames (px/frame; <see cref="TissueDrift.MeanSpeed"/>); NaN without velocities.</summary>
    public double DriftSpeedPx => TissueDrift.MeanSpeed(Drift);

    /// <summary>Cell flow at the +1/2 cores over the defects' own speed (<see cref="HeadwardStatistics.CoreFlowRatio"/>); NaN when undefined.</summary>
    public double CoreFlowRatio { get; init; } = double.NaN;

    /// <summary>Why the defect stage does not apply (the tissue is not confluent), or null when it does.</summary>
    public string? NotApplicableReason { get; init; }

    /// <summary>This result marked not applicable (docs/defects.md#where-defects-apply): both headward speeds become
    /// <see cref="EstimateStatus.NotApplicable"/> with <paramref name="reason"/>; the per-frame lists are kept for the tables.</summary>
    public DefectResult NotApplicable(string reason) => this with
    {
        NotApplicableReason = reason,
        HeadwardSpeed = Estimate.NotApplicableBecause(reason, HeadwardSpeed.N, "defect tracks"),
        FlowHeadwardSpeed = Estimate.NotApplicableBecause(reason, FlowHeadwardSpeed.N, "defect tracks"),
        FractionHeadward = double.NaN,
    };

    /// <summary>The result of a run with no cells or no finite mean radius.</summary>
    public static DefectResult Empty => new(double.NaN, double.NaN, [], [], 0, 0, Estimate.NaN, Estimate.NaN, double.NaN, 0, 0, 0,
        new EnsembleFlow(0.5, 6, [], [], [], [], []));
}

/// <summary>
/// The defect stage (docs/measures.md#nematic-field-and-defects), in parts: per frame, cell Q and velocities (from an
/// <see cref="IVelocitySource"/>) coarse-grained and defects found (<see cref="FrameDefects"/>); the ensemble flow about
/// +1/2 defects accumulated in frame order (<see cref="EnsembleFlowAccumulator"/>); same-charge defects linked frame to
/// frame (<see cref="DefectLinker"/>); headward speeds pooled over +1/2 defect tracks (<see cref="HeadwardStatistics"/>).
/// Unless <see cref="DefectOptions.KeepDrift"/>, the tissue's velocity u(t) (<see cref="TissueDrift"/>) is subtracted from
/// every cell velocity before coarse-graining and defect cores are followed relative to the tissue (docs/defects.md#drift).
/// </summary>
/// <remarks>Headward motion of +1/2 defects as the signature of extensile activity: Giomi L. et al. (2013), Phys. Rev.
/// Lett. 110:228101; Saw T.B. et al. (2017), Nature 544:212-216; Kawaguchi K., Kageyama R. and Sano M. (2017), Nature
/// 545:327-331 (neural progenitors, contractile-like tailward motion vs extensile headward motion).</remarks>
public static class DefectAnalysis
{
    /// <summary>Least mean local alignment (<see cref="FrameDefects.Alignment"/>) for the defect stage to apply
    /// (docs/defects.md#where-defects-apply): midway between what random cell axes and an aligned tissue give.</summary>
    public const double MinAlignment = 0.5;

    /// <summary>Runs the defect stage over every analysed outline.</summary>
    /// <param name="widthPx">Image width.</param><param name="heightPx">Image height.</param>
    /// <param name="cells">Analysed outlines, in frame order.</param><param name="tracks">Their tracks.</param>
    /// <param name="r0Px">Mean cell radius.</param><param name="pixelSizeUm">Pixel size for lengths given in um (1 when lengths are in px).</param>
    /// <param name="o">Options.</param>
    /// <param name="velocities">Source of the cell velocities (px/frame), bound once to this run; null = tracked centroids
    /// (<see cref="CentroidVelocities"/>).</param>
    public static DefectResult Run(int widthPx, int heightPx, IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks,
        double r0Px, double pixelSizeUm, DefectOptions o, IVelocitySource? velocities = null)
    {
        if (cells.Count == 0 || !double.IsFinite(r0Px)) return DefectResult.Empty;
        double coarse = o.CoarseWidth.ToPx(r0Px, pixelSizeUm);
        double grid = o.GridSpacing.ToPx(r0Px, pixelSizeUm);
        var velocityOf = (velocities ?? CentroidVelocities.Instance).Bind(cells, tracks);
        bool remove = !o.KeepDrift;
        var frames = FindPerFrame(widthPx, heightPx, cells, velocityOf, grid, coarse, o.Ensemble, remove);
        var drift = new TissueDriftFrame[frames.Length];
        for (int f = 0; f < frames.Length; f++) drift[f] = frames[f].TissueVelocity;
        var shift = remove ? TissueDrift.Displacement(drift) : null;

        // Accumulated in frame order, so every sum is taken in the same order as a sequential pass.
        var ensemble = new EnsembleFlowAccumulator(o.Ensemble);
        int plus = 0, minus = 0;
        foreach (var fd in frames)
        {
            foreach (var d in fd.Defects) if (d.Charge == 0.5) plus++; else if (d.Charge == -0.5) minus++;
            ensemble.Add(fd.Ensemble);
        }
        var links = DefectLinker.Link(frames, coarse, shift);
        var (observations, dtracks) = HeadwardStatistics.Observe(frames, links, shift);
        var h = HeadwardStatistics.Summarise(dtracks, observations, o.BootstrapResamples, o.Seed);
        int n = frames.Length;
        return new DefectResult(coarse, grid, observations, dtracks, n > 0 ? plus / (double)n : 0, n > 0 ? minus / (double)n : 0,
            h.Headward, h.FlowHeadward, h.FractionHeadward, h.TracksUsed, links.Births, links.Deaths, ensemble.Result())
        { MeanAlignment = MeanOf(frames), Drift = drift, DriftRemoved = remove, CoreFlowRatio = HeadwardStatistics.CoreFlowRatio(observations) };
    }

    private static double MeanOf(FrameDefects[] frames)
    {
        double s = 0; int n = 0;
        foreach (var f in frames) if (double.IsFinite(f.Alignment)) { s += f.Alignment; n++; }
        return n > 0 ? s / n : double.NaN;
    }

    /// <summary>Every frame's defects. Frames are independent: each is coarse-grained and searched in parallel (cells
    /// arrive in frame order and are walked frame by frame; grids are dropped after each frame, so memory stays flat). Each
    /// frame's tissue velocity u (<see cref="TissueDrift.Of"/>) is kept in <see cref="FrameDefects.TissueVelocity"/> and,
    /// when <paramref name="removeDrift"/>, subtracted from its cells' velocities before coarse-graining (docs/defects.md#drift).</summary>
    public static FrameDefects[] FindPerFrame(int widthPx, int heightPx, IReadOnlyList<CellRecord> cells, Func<CellRecord, (double Vx, double Vy)> velocityOf,
        double gridPx, double coarsePx, EnsembleFlowGrid ensemble, bool removeDrift = false)
    {
        var frameRuns = FrameRuns.Of(cells);
        var results = new FrameDefects[frameRuns.Count];
        Parallel.For(0, frameRuns.Count, f =>
        {
            var run = frameRuns[f];
            var samples = new CellSample[run.Count];
            for (int i = 0; i < run.Count; i++) samples[i] = CellSample.Of(cells[run.Start + i], velocityOf(cells[run.Start + i]));
            var (ux, uy, n) = TissueDrift.Of(samples);
            if (removeDrift && n > 0)
                for (int i = 0; i < samples.Length; i++) samples[i] = samples[i] with { Vx = samples[i].Vx - ux, Vy = samples[i].Vy - uy };
            results[f] = FrameDefects.Find(run.Frame, samples, widthPx, heightPx, gridPx, coarsePx, ensemble) with
            { TissueVelocity = new TissueDriftFrame(run.Frame, ux, uy, n) };
        });
        return results;
    }
}
