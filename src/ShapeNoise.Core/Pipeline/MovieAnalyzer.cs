using ShapeNoise.Fluctuations;
using ShapeNoise.Outlines;
using ShapeNoise.Reading;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Pipeline;

/// <summary>Label movie in, per-outline, per-track and pooled fluctuation measures out (docs/measures.md#outline-definitions to #movie-pooling).</summary>
public static class MovieAnalyzer
{
    /// <summary>Progress: frames done of total.</summary>
    /// <param name="FramesDone">Frames done (the frame loop) or steps done (the stages after it).</param>
    /// <param name="FramesTotal">Frames or steps in all.</param>
    /// <param name="Stage">"frames" during the frame loop, then the stage that has just started.</param>
    public readonly record struct Progress(int FramesDone, int FramesTotal, string Stage = "frames");

    /// <summary>One frame's outlines and their links to the previous frame's (null for the first frame).</summary>
    /// <param name="Index">Frame index.</param>
    /// <param name="Outlines">The frame's outlines.</param>
    /// <param name="Links">Links to the previous frame's outlines (null for the first frame).</param>
    /// <param name="Divisions">Divisions seen in the links.</param>
    /// <param name="Merges">Merges seen in the links.</param>
    /// <param name="LabelledPx">Labelled pixels of the frame (label movies); -1 when there is no mask (outline tables).</param>
    /// <param name="CoveredPx">Pixels covered once gaps of at most <see cref="Coverage.MaxGapPx"/> px between masks are
    /// closed (<see cref="Coverage.CoveredPixels"/>); -1 when there is no mask.</param>
    public sealed record FrameOutlines(int Index, Outline[] Outlines, FrameLinks? Links, int Divisions, int Merges, int LabelledPx = -1, int CoveredPx = -1);

    /// <summary>Runs outlines, shape, tracking and fluctuations over <paramref name="movie"/>, one frame at a time.</summary>
    /// <param name="movie">The label movie.</param>
    /// <param name="options">Analysis options.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="floorReference">Optional noise floor measured on a reference movie.</param>
    /// <param name="times">Optional phase timer.</param>
    /// <param name="velocities">Cell velocities of the defect stage; null = tracked centroids.</param>
    /// <param name="junctions">Raw movies: the junction signal per frame; every traced outline is then moved onto its
    /// crest (<see cref="RidgeRefinement"/>, docs/segmentation.md#sub-pixel-boundaries). Null: outlines as traced.</param>
    public static AnalysisResult Run(ILabelMovie movie, AnalysisOptions options, IProgress<Progress>? progress = null,
        NoiseFloorReference? floorReference = null, PhaseTimes? times = null, Nematic.IVelocitySource? velocities = null,
        IJunctionSignal? junctions = null)
    {
        times ??= new PhaseTimes();
        options.Validated();
        // Decoding, scanning and tracing of the next frames overlap the measuring of this one (two frames ahead at most).
        return RunFrames(movie.Info, Prefetch.Ahead(LabelFrames(movie, options, times, junctions), 2), options, progress, floorReference, times, velocities);
    }

    /// <summary>Label frames to outlines (largest 4-connected component per label) linked by mask overlap.</summary>
    private static IEnumerable<FrameOutlines> LabelFrames(ILabelMovie movie, AnalysisOptions options, PhaseTimes times, IJunctionSignal? junctions)
    {
        var info = movie.Info;
        LabelScan? prevScan = null;
        int[]? spare = null;   // the dense image of the scan before the previous one: nothing reads it any more
        using var frameStream = movie.Frames().GetEnumerator();
        while (times.Time("decode", frameStream.MoveNext))
        {
            var frame = frameStream.Current;
            if (frame.Width != info.Width || frame.Height != info.Height)
                throw new InputException(info.Path, $"frame {frame.Index + 1} is {frame.Width}x{frame.Height}, the first is {info.Width}x{info.Height}");
            var scan = times.Time("scan", () => LabelScan.Of(frame, spare));
            // Coverage with thin gaps between masks closed (docs/defects.md#where-defects-apply).
            int coveredPx = times.Time("coverage", () => Coverage.CoveredPixels(scan.DenseImage, scan.Width, scan.Height));
            movie.Recycle(frame.Labels);   // read for the last time by the scan (everything after reads the dense image)
            if (scan.Boxes.Length == 0)
                throw new InputException(info.Path, $"frame {frame.Index + 1} is empty (all background, no labelled cells)");
            var outlines = new Outline[scan.Boxes.Length];
            times.Time("outlines", () => Parallel.For(0, outlines.Length, i =>
                outlines[i] = OutlineTracer.Trace(scan.DenseImage, scan.Width, scan.Height, scan.Boxes[i], i + 1,
                    options.Outline, options.BorderMarginPx, options.MinAreaPx)));
            if (junctions?.Frame(frame.Index) is { } signal) times.Time("outlines", () => OnCrests(outlines, signal, scan.Width, scan.Height));
            var prev = prevScan;
            FrameLinks? links = prev is null ? null
                : times.Time("tracking", () => OverlapLinking.Link(prev.DenseImage, PixelCounts(prev), scan.DenseImage, PixelCounts(scan), options.LinkOverlapFraction));
            // The previous scan's dense image was read for the last time by the linking above (the outlines and links
            // hold their own arrays); it becomes the next scan's.
            spare = prev?.DenseImage;
            prevScan = scan;
            yield return new FrameOutlines(frame.Index, outlines, links, links?.Divisions ?? 0, links?.Merges ?? 0, PixelCounts(scan).Sum(), coveredPx);
        }
    }

    /// <summary>Replaces the vertices of every traced outline by <see cref="RidgeRefinement.Refine"/> on <paramref name="signal"/>.</summary>
    private static int OnCrests(Outline[] outlines, float[] signal, int w, int h)
    {
        if (signal.Length != w * h) throw new ArgumentException($"junction signal has {signal.Length} values, the frame {w} x {h}");
        Parallel.For(0, outlines.Length, i =>
        {
            var o = outlines[i];
            if (o.Status == OutlineStatus.Ok) outlines[i] = o with { Vertices = RidgeRefinement.Refine(o.Vertices, signal, w, h).Vertices };
        });
        return 0;
    }

    /// <summary>Shape, tracks and fluctuations from a stream of linked outlines (label movies and outline tables alike):
    /// per frame shape, then <see cref="Tracker"/>, finished tracks to <see cref="TrackFluctuations"/>; then pooling,
    /// dynamics, defects and the hypothesis test, and <see cref="AnalysisWarnings"/>.</summary>
    public static AnalysisResult RunFrames(MovieInfo info, IEnumerable<FrameOutlines> frameOutlines, AnalysisOptions options, IProgress<Progress>? progress,
        NoiseFloorReference? floorReference, PhaseTimes times, Nematic.IVelocitySource? velocities = null)
    {
        CheckRun(info, options, floorReference);
        var warnings = new List<string>();
        var units = ResolveUnits(info, options, warnings);
        var tracking = options.ForTracking;
        using var tracker = new Tracker(options.Rays, tracking);
        var tally = new FrameTally(info.FrameCount);
        var tracks = new List<TrackRecord>();
        // Finished tracks to records: each record depends on its track alone, so a large batch (at the end of the movie nearly
        // every track finishes at once) is computed in parallel and kept in the tracker's order.
        void Collect()
        {
            var done = tracker.TakeFinished();
            var records = new TrackRecord[done.Count];
            if (done.Count < 64) for (int i = 0; i < done.Count; i++) records[i] = TrackFluctuations.Of(done[i], tracking.MinTrackFrames, options.MaxLagFrames);
            else Parallel.For(0, done.Count, i => records[i] = TrackFluctuations.Of(done[i], tracking.MinTrackFrames, options.MaxLagFrames));
            tracks.AddRange(records);
        }
        foreach (var fo in frameOutlines)
        {
            var shapes = times.Time("shape", () => ShapesOf(fo.Outlines, options.Rays));
            var placed = times.Time("tracking", () => tracker.Step(fo.Index, fo.Outlines, shapes, fo.Links));
            tally.Add(fo, shapes, placed);
            times.Time("fluctuations", () => { Collect(); return 0; });
            progress?.Report(new Progress(tally.Frames, info.FrameCount));
        }
        if (tally.Frames < 2)
            throw new InputException(info.Path, $"has {tally.Frames} frame(s); fluctuations need a movie of at least 2 frames");
        times.Time("fluctuations", () => { tracker.Finish(afterBatch: Collect); Collect(); return 0; });
        tracks.Sort((x, y) => x.Id.CompareTo(y.Id));
        // One-frame outliers leave every statistic and the nematic field (docs/measures.md#one-frame-errors).
        var trackCounts = tracker.Counts();
        if (trackCounts.Outliers > 0) tally.Cells.RemoveAll(c => tracker.IsOutlier(c.TrackId, c.Frame));

        progress?.Report(new Progress(0, 3, "fluctuation statistics"));
        // Field coverage, per frame: covered pixels (labelled ones and the background in gaps of at most Coverage.MaxGapPx
        // between masks) over the field; raw: labelled pixels only (analysed cells and the ones excluded at the border or
        // as too small). Outline tables have no mask: both are the outline areas (docs/defects.md#where-defects-apply).
        double fieldPx2 = (double)info.Width * info.Height * tally.Frames;
        double coverage = fieldPx2 > 0 ? tally.CoveredAreaSumPx2 / fieldPx2 : double.NaN;
        double coverageRaw = fieldPx2 > 0 ? tally.LabelledAreaSumPx2 / fieldPx2 : double.NaN;
        var cells = tally.Cells;
        double r0 = tally.MeanCellRadiusPx();
        foreach (var phase in (string[])["fluctuations", "dynamics", "defects", "motion"]) times.Add(phase, 0);   // the table's order
        // The nematic field, the defects and the collective motion read the cells and tracks only, not the spatial blocks,
        // the pooling or the correlation times: they run beside those (each stage's numbers are its own, whatever the order).
        var field = Task.Run(() => FieldStages(info, cells, tracks, r0, units, coverage, options, velocities, times));
        try
        {
            // Confluent tissue: spatial block bootstrap; isolated cells: over tracks (docs/statistics.md#within-movie-intervals).
            var spatial = times.Time("fluctuations", () => SpatialBlocks.For(tracks, coverage, options.BootstrapResamples, options.Seed));
            var pooled = times.Time("fluctuations", () => Pooling.Of(tracks, options.Rays, options.ForPooling, floorReference, spatial.Plan));
            int used = 0;
            foreach (var t in tracks) if (t.Used) used++;
            var counts = tally.Counts(tracks.Count, used, Pooling.TracksBelowFloor(tracks, floorReference)) with
            {
                Divisions = trackCounts.Divisions, Merges = trackCounts.Merges, Outliers = trackCounts.Outliers,
                BridgedMerges = trackCounts.BridgedMerges, BridgedSplits = trackCounts.BridgedSplits,
                Fragments = TrackFragments.Count(tracks, tracking.MaxGapFrames),
            };
            progress?.Report(new Progress(1, 3, "correlation times"));
            var dynamics = times.Time("dynamics", () => Dynamics.DynamicsAnalysis.Run(tracks, options.ForDynamics, spatial.Plan));
            progress?.Report(new Progress(2, 3, "nematic field and defects"));
            var (defects, hypothesis, defectStats, sweep, motion) = field.GetAwaiter().GetResult();   // rethrows the stage's own exception
            warnings.AddRange(AnalysisWarnings.Of(new AnalysisWarnings.Inputs(counts, tracking.MinTrackFrames, dynamics.SokalWindowReached, dynamics.MaxLag,
                coverage, defects.Tracks.Count, defects.PlusTracksUsed, hypothesis.DefectTracks, tracking.MaxGapFrames)
            { CoreFlowRatio = defects.NotApplicableReason is null ? defects.CoreFlowRatio : double.NaN, DriftRemoved = defects.DriftRemoved }));
            progress?.Report(new Progress(3, 3, "done"));
            return new AnalysisResult(info, options, units, counts, cells, tracks, pooled, r0, floorReference, warnings, dynamics, defects, hypothesis)
            {
                Coverage = coverage, CoverageRaw = coverageRaw,
                Motion = motion, DefectStatistics = defectStats, CoarseSweep = sweep, ResamplingUnit = spatial.Plan.UnitName, BlockSizePx = spatial.Plan.BlockSizePx, ShapeCorrelationLengthPx = spatial.CorrelationLengthPx,
            };
        }
        catch
        {
            try { field.Wait(); } catch (AggregateException) { }   // no stage left running once the run has failed
            throw;
        }
    }

    /// <summary>The coarse-grained field stages over the cells and tracks: defects (docs/defects.md), the shape-noise
    /// hypothesis, defect statistics and the coarse-width sweep, and collective motion (docs/motion.md).</summary>
    private static (Nematic.DefectResult Defects, Nematic.HypothesisResult Hypothesis, Nematic.DefectStatisticsResult Statistics,
        List<Nematic.CoarseSweepPoint> Sweep, ShapeNoise.Motion.MotionResult Motion) FieldStages(MovieInfo info, List<CellRecord> cells,
        List<TrackRecord> tracks, double r0, Units units, double coverage, AnalysisOptions options, Nematic.IVelocitySource? velocities, PhaseTimes times)
    {
        var defectOptions = options.ToDefectOptions();
        // One binding of the velocity source for the defect and motion stages (optical flow reads the raw movie when bound).
        var bound = new Nematic.BoundVelocities((velocities ?? Nematic.CentroidVelocities.Instance).Bind(cells, tracks));
        var defects = times.Time("defects", () => Nematic.DefectAnalysis.Run(info.Width, info.Height, cells, tracks, r0, units.S, defectOptions, bound));
        var hypothesis = times.Time("defects", () => Nematic.ShapeNoiseHypothesis.Test(cells, tracks, defects, defectOptions));
        // Defects only where the tissue is confluent (docs/defects.md#where-defects-apply).
        string? notConfluent = !(coverage >= SpatialBlocks.ConfluentCoverage)
            ? $"cells cover {100 * coverage:0} % of the field (coarse-grained fields need a confluent tissue, at least {100 * SpatialBlocks.ConfluentCoverage:0} %)" : null;
        string? why = notConfluent is not null
            ? $"cells cover {100 * coverage:0} % of the field (defects need a confluent tissue, at least {100 * SpatialBlocks.ConfluentCoverage:0} %)"
            : double.IsFinite(defects.MeanAlignment) && defects.MeanAlignment < Nematic.DefectAnalysis.MinAlignment
                ? $"cell axes are not aligned over the coarse width (mean alignment {defects.MeanAlignment:0.00}, defects need at least {Nematic.DefectAnalysis.MinAlignment:0.00})"
                : null;
        if (why is not null)
        {
            defects = defects.NotApplicable(why);
            hypothesis = hypothesis with { Status = EstimateStatus.NotApplicable };
        }
        // Defect densities, lifetimes and events over the tissue searched (docs/motion.md#defect-statistics).
        var defectStats = times.Time("defects", () => Nematic.DefectStatistics.Of(defects, info.Width, info.Height,
            double.IsFinite(coverage) ? coverage * info.Width * info.Height : 0, options.BootstrapResamples, options.Seed));
        // Robustness of the defect picture to the smoothing (docs/motion.md#coarse-width-sweep), where defects apply.
        var sweep = options.CoarseSweep is { } widths && why is null
            ? times.Time("defects", () => Nematic.CoarseSweep.Run(Nematic.CoarseSweep.Parse(widths, "--coarse-sweep"), info.Width, info.Height,
                cells, tracks, r0, units.S, coverage, defectOptions, bound))
            : [];
        // Collective motion (docs/motion.md): cell velocities always, coarse-grained fields only in a confluent tissue.
        var motion = times.Time("motion", () => double.IsFinite(defects.CoarsePx)
            ? ShapeNoise.Motion.MotionAnalysis.Run(info.Width, info.Height, cells, bound.VelocityOf, defects.CoarsePx, defects.GridPx, options.ForMotion, notConfluent)
            : ShapeNoise.Motion.MotionResult.Empty("no cells or no mean cell radius"));
        return (defects, hypothesis, defectStats, sweep, motion);
    }

    /// <summary>Refuses a movie of fewer than 2 frames and a noise-floor reference measured with another ray count.</summary>
    private static void CheckRun(MovieInfo info, AnalysisOptions options, NoiseFloorReference? floorReference)
    {
        if (info.FrameCount < 2)
            throw new InputException(info.Path, $"has {info.FrameCount} frame(s); fluctuations need a movie of at least 2 frames (and tracks of --min-track {options.MinTrackFrames})");
        if (floorReference is not null && floorReference.Rays != options.Rays)
            throw new InputException(options.FloorFrom ?? "--floor-from", $"floor was measured with {floorReference.Rays} rays, this run uses {options.Rays}");
        if (options.NoiseModel == NoiseModel.FixedCells && floorReference is null)
            throw new ArgumentException("--noise-model fixed-cells needs the fixed-cell reference of --floor-from");
    }

    /// <summary>Shape measures, radii and modes of every Ok outline of a frame (independent, so in parallel); null for excluded ones.</summary>
    private static OutlineShape?[] ShapesOf(Outline[] outlines, int rays)
    {
        var shapes = new OutlineShape?[outlines.Length];
        Parallel.For(0, outlines.Length, i =>
        {
            if (outlines[i].Status == OutlineStatus.Ok) shapes[i] = OutlineShape.Of(outlines[i].Vertices, rays);
        });
        return shapes;
    }

    /// <summary>Cell records and the counts of what was seen and excluded, frame by frame.</summary>
    private sealed class FrameTally(int expectedFrames)
    {
        private int _objects, _border, _small, _nonStar;
        public int Frames { get; private set; }
        public List<CellRecord> Cells { get; } = [];
        public double LabelledAreaSumPx2 { get; private set; }
        public double CoveredAreaSumPx2 { get; private set; }

        public void Add(FrameOutlines fo, OutlineShape?[] shapes, Placement[] placed)
        {
            // Room for the whole movie at the first frame's count: the list grows once or not at all, not by doubling
            // through large-object-heap arrays (about 230 000 records on the benchmark movie).
            if (Frames == 0 && Cells.Capacity == 0) Cells.Capacity = (int)Math.Min(Array.MaxLength / 2, (long)fo.Outlines.Length * Math.Max(1, expectedFrames));
            _objects += fo.Outlines.Length;
            double outlineAreaPx2 = 0;
            for (int i = 0; i < fo.Outlines.Length; i++)
            {
                var o = fo.Outlines[i];
                if (o.Status == OutlineStatus.Border) { _border++; outlineAreaPx2 += o.ComponentPixels; continue; }
                if (o.Status == OutlineStatus.Small) { _small++; outlineAreaPx2 += o.ComponentPixels; continue; }
                var sh = shapes[i]!; var p = placed[i];
                if (!sh.StarShaped) _nonStar++;
                Cells.Add(new CellRecord(fo.Index, o.Label, p.TrackId, sh.Shape, p.ThetaContinuousRad, sh.StarShaped,
                    p.Modes![0].Real, 2 * p.Modes[2].Magnitude, o.Vertices.Length));
                outlineAreaPx2 += sh.Shape.AreaPx2;
            }
            // Label movies: pixel counts of the mask; outline tables: the outline areas, with no gap closing.
            LabelledAreaSumPx2 += fo.LabelledPx >= 0 ? fo.LabelledPx : outlineAreaPx2;
            CoveredAreaSumPx2 += fo.CoveredPx >= 0 ? fo.CoveredPx : outlineAreaPx2;
            Frames++;
        }

        /// <summary>R0 = sqrt(mean area / pi) over the analysed outlines (NaN when there are none).</summary>
        public double MeanCellRadiusPx()
        {
            double sum = 0;
            foreach (var c in Cells) sum += c.Shape.AreaPx2;   // the outlines still analysed (one-frame outliers removed)
            return Cells.Count > 0 ? Math.Sqrt(sum / Cells.Count / Math.PI) : double.NaN;
        }

        public AnalysisCounts Counts(int tracks, int used, int below)
            => new(Frames, _objects, Cells.Count, _border, _small, _nonStar, tracks, used, below, 0, 0);   // divisions and merges: the tracker's, of analysed cells
    }

    private static int[] PixelCounts(LabelScan s)
    {
        var c = new int[s.Boxes.Length];
        for (int i = 0; i < c.Length; i++) c[i] = s.Boxes[i].PixelCount;
        return c;
    }

    /// <summary>Pixel size and frame interval: an option first (it overrides the metadata), then the movie's metadata,
    /// else px and frames. Sources: "option", the metadata's own ("OME-XML", "ImageJ header", "TIFF resolution tags"),
    /// or "none" (docs/measures.md#coordinates-and-units).</summary>
    public static Units ResolveUnits(MovieInfo info, AnalysisOptions o, List<string> warnings)
    {
        if (info.PixelSizeYUm is { } sy && o.PixelSizeUm is null)
            throw new InputException(info.Path, $"pixels are not square ({info.PixelSizeUm} x {sy} um); open the movie through the reader that resamples them, or give --pixel-size");
        static string Src(string s) => string.IsNullOrEmpty(s) || s == "none" ? "metadata" : s;
        (double? s, string ss) = o.PixelSizeUm is { } os ? (os, "option") : info.PixelSizeUm is { } ms ? (ms, Src(info.PixelSizeSource)) : ((double?)null, "none");
        (double? t, string ts) = o.FrameIntervalMin is { } ot ? (ot, "option") : info.FrameIntervalMin is { } mt ? (mt, Src(info.FrameIntervalSource)) : ((double?)null, "none");
        if (info.Resampling is { } r) warnings.Add($"non-square pixels: {r}");
        if (s is null) warnings.Add("pixel size unknown (no metadata, no --pixel-size): lengths are in px");
        if (t is null) warnings.Add("frame interval unknown (no metadata, no --frame-interval): times are in frames");
        return new Units(s, ss, t, ts);
    }
}
