using System.Numerics;
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
    public sealed record FrameOutlines(int Index, Outline[] Outlines, FrameLinks? Links, int Divisions, int Merges);

    /// <summary>Runs outlines, shape, tracking and fluctuations over <paramref name="movie"/>, one frame at a time.</summary>
    public static AnalysisResult Run(ILabelMovie movie, AnalysisOptions options, IProgress<Progress>? progress = null,
        NoiseFloorReference? floorReference = null, PhaseTimes? times = null, Nematic.IVelocitySource? velocities = null)
    {
        times ??= new PhaseTimes();
        options.Validated();
        return RunFrames(movie.Info, LabelFrames(movie, options, times), options, progress, floorReference, times, velocities);
    }

    /// <summary>Label frames to outlines (largest 4-connected component per label) linked by mask overlap.</summary>
    private static IEnumerable<FrameOutlines> LabelFrames(ILabelMovie movie, AnalysisOptions options, PhaseTimes times)
    {
        var info = movie.Info;
        LabelScan? prevScan = null;
        using var frameStream = movie.Frames().GetEnumerator();
        while (times.Time("decode", frameStream.MoveNext))
        {
            var frame = frameStream.Current;
            if (frame.Width != info.Width || frame.Height != info.Height)
                throw new InputException(info.Path, $"frame {frame.Index + 1} is {frame.Width}x{frame.Height}, the first is {info.Width}x{info.Height}");
            var scan = times.Time("scan", () => LabelScan.Of(frame));
            if (scan.Boxes.Length == 0)
                throw new InputException(info.Path, $"frame {frame.Index + 1} is empty (all background, no labelled cells)");
            var outlines = new Outline[scan.Boxes.Length];
            times.Time("outlines", () => Parallel.For(0, outlines.Length, i =>
                outlines[i] = OutlineTracer.Trace(scan.DenseImage, scan.Width, scan.Height, scan.Boxes[i], i + 1,
                    options.Outline, options.BorderMarginPx, options.MinAreaPx)));
            var prev = prevScan;
            FrameLinks? links = prev is null ? null
                : times.Time("tracking", () => OverlapLinking.Link(prev.DenseImage, PixelCounts(prev), scan.DenseImage, PixelCounts(scan), options.LinkOverlapFraction));
            prevScan = scan;
            yield return new FrameOutlines(frame.Index, outlines, links, links?.Divisions ?? 0, links?.Merges ?? 0);
        }
    }

    /// <summary>Shape, tracks and fluctuations from a stream of linked outlines (label movies and outline tables alike).</summary>
    public static AnalysisResult RunFrames(MovieInfo info, IEnumerable<FrameOutlines> frameOutlines, AnalysisOptions options, IProgress<Progress>? progress,
        NoiseFloorReference? floorReference, PhaseTimes times, Nematic.IVelocitySource? velocities = null)
    {
        if (info.FrameCount < 2)
            throw new InputException(info.Path, $"has {info.FrameCount} frame(s); fluctuations need a movie of at least 2 frames (and tracks of --min-track {options.MinTrackFrames})");
        if (floorReference is not null && floorReference.Rays != options.Rays)
            throw new InputException(options.FloorFrom ?? "--floor-from", $"floor was measured with {floorReference.Rays} rays, this run uses {options.Rays}");
        var warnings = new List<string>();
        var units = ResolveUnits(info, options, warnings);

        int m = options.Rays, nm = m / 2 + 1;
        using var builder = new TrackBuilder(m, options.MinTrackFrames);
        var cells = new List<CellRecord>();
        int[]? prevSlot = null; // active-track slot of each object of the previous frame, or -1
        ShapeMeasures[]? prevShapes = null;
        var dormant = new List<(int Slot, int LastFrame, double X, double Y, double RadiusPx)>();   // lost tracks that may resume (--max-gap)
        int objects = 0, border = 0, small = 0, nonStar = 0, divisions = 0, merges = 0, frames = 0;
        foreach (var fo in frameOutlines)
        {
            var outlines = fo.Outlines;
            var links = fo.Links;
            objects += outlines.Length;
            long shapeStart = System.Diagnostics.Stopwatch.GetTimestamp();
            var slot = new int[outlines.Length];
            Array.Fill(slot, -1);
            var continued = prevSlot is null ? null : new bool[prevSlot.Length];
            // Per-outline shape, rays and modes are independent: computed in parallel, then appended to tracks in order.
            var shapes = new ShapeMeasures[outlines.Length]; var rays = new double[outlines.Length][]; var modesRaw = new Complex[outlines.Length][];
            var star = new bool[outlines.Length];
            Parallel.For(0, outlines.Length, i =>
            {
                var o = outlines[i];
                if (o.Status != OutlineStatus.Ok) return;
                shapes[i] = ShapeMeasures.Of(o.Vertices);
                rays[i] = new double[m];
                star[i] = RadialFunction.Sample(o.Vertices, new Point2(shapes[i].CentroidX, shapes[i].CentroidY), shapes[i].ThetaRad, rays[i]);
                modesRaw[i] = new Complex[nm];
                FourierModes.Of(rays[i], modesRaw[i]);
            });
            // Tracks lost earlier resume when a new outline appears near their last position within --max-gap frames
            // (optimal one-to-one assignment, gated by the track's own radius).
            var resume = new int[outlines.Length];
            Array.Fill(resume, -1);
            if (options.MaxGapFrames > 0)
            {
                foreach (var d in dormant.Where(d => fo.Index - d.LastFrame > options.MaxGapFrames + 1).ToList()) { builder.End(d.Slot, TrackEnd.Lost); dormant.Remove(d); }
                var newcomers = Enumerable.Range(0, outlines.Length).Where(i => outlines[i].Status == OutlineStatus.Ok
                    && !(links is not null && links.Predecessor[i] >= 0 && prevSlot![links.Predecessor[i]] >= 0)).ToArray();
                if (dormant.Count > 0 && newcomers.Length > 0)
                {
                    var cost = new double[dormant.Count, newcomers.Length];
                    for (int a = 0; a < dormant.Count; a++)
                        for (int b = 0; b < newcomers.Length; b++)
                        {
                            double dx = shapes[newcomers[b]].CentroidX - dormant[a].X, dy = shapes[newcomers[b]].CentroidY - dormant[a].Y;
                            double dist = Math.Sqrt(dx * dx + dy * dy);
                            cost[a, b] = dist <= dormant[a].RadiusPx ? dist : double.PositiveInfinity;
                        }
                    var match = Assignment.Solve(cost, double.MaxValue);
                    var taken = new List<int>();
                    for (int a = 0; a < dormant.Count; a++) if (match[a] >= 0) { resume[newcomers[match[a]]] = dormant[a].Slot; taken.Add(a); }
                    foreach (int a in taken.OrderByDescending(x => x)) dormant.RemoveAt(a);
                }
            }
            for (int i = 0; i < outlines.Length; i++)
            {
                var o = outlines[i];
                if (o.Status == OutlineStatus.Border) { border++; continue; }
                if (o.Status == OutlineStatus.Small) { small++; continue; }
                var shape = shapes[i];
                if (!star[i]) nonStar++;
                int a = links is null ? -1 : links.Predecessor[i];
                int s = a >= 0 && prevSlot![a] >= 0 ? prevSlot[a] : resume[i];
                if (a >= 0 && prevSlot![a] >= 0) continued![a] = true;
                var (trackSlot, thetaCont, modes) = builder.Append(s, fo.Index, shape, rays[i], modesRaw[i]);
                slot[i] = trackSlot;
                cells.Add(new CellRecord(fo.Index, o.Label, builder.IdOf(trackSlot), shape, thetaCont, star[i],
                    modes[0].Real, 2 * modes[2].Magnitude, o.Vertices.Length));
            }
            times.Add("shape", System.Diagnostics.Stopwatch.GetElapsedTime(shapeStart).TotalSeconds);
            long endStart = System.Diagnostics.Stopwatch.GetTimestamp();
            if (links is not null)
            {
                divisions += fo.Divisions; merges += fo.Merges;
                for (int a = 0; a < prevSlot!.Length; a++)
                {
                    if (prevSlot[a] < 0 || continued![a]) continue;
                    int b = links.Successor[a];
                    var why = links.Divided[a] ? TrackEnd.Division
                        : b >= 0 && links.Merged[b] ? TrackEnd.Merge
                        : b >= 0 && outlines[b].Status == OutlineStatus.Border ? TrackEnd.Border
                        : b >= 0 && outlines[b].Status == OutlineStatus.Small ? TrackEnd.Small
                        : TrackEnd.Lost;
                    if (why == TrackEnd.Lost && options.MaxGapFrames > 0)
                        dormant.Add((prevSlot[a], fo.Index - 1, prevShapes![a].CentroidX, prevShapes[a].CentroidY, Math.Sqrt(prevShapes[a].AreaPx2 / Math.PI)));
                    else builder.End(prevSlot[a], why);
                }
            }
            times.Add("fluctuations", System.Diagnostics.Stopwatch.GetElapsedTime(endStart).TotalSeconds);
            prevSlot = slot; prevShapes = shapes;
            frames++;
            progress?.Report(new Progress(frames, info.FrameCount));
        }
        if (frames < 2)
            throw new InputException(info.Path, $"has {frames} frame(s); fluctuations need a movie of at least 2 frames");
        foreach (var d in dormant) builder.End(d.Slot, TrackEnd.Lost);
        times.Time("fluctuations", () => { builder.EndAll(TrackEnd.MovieEnd); return 0; });
        var tracks = builder.Finished;
        tracks.Sort((x, y) => x.Id.CompareTo(y.Id));

        // Cells carry the final track ids; mark which tracks are used.
        progress?.Report(new Progress(0, 3, "fluctuation statistics"));
        var pooled = times.Time("fluctuations", () => Pool(tracks, m, options, floorReference));
        int used = 0, below = 0;
        foreach (var t in tracks)
        {
            if (!t.Used) continue;
            used++;
            if (t.Contour is { } c && (c.VarAlongRaw - NoiseFloor.AlongOf(c, floorReference) <= 0 || c.VarAcrossRaw - NoiseFloor.AcrossOf(c, floorReference) <= 0)) below++;
        }
        double meanArea = 0; int nArea = 0;
        foreach (var c in cells) { meanArea += c.Shape.AreaPx2; nArea++; }
        double r0 = nArea > 0 ? Math.Sqrt(meanArea / nArea / Math.PI) : double.NaN;
        if (used == 0) warnings.Add($"no track reached --min-track {options.MinTrackFrames} frames: pooled values are undefined");
        else if (used < 10) warnings.Add($"only {used} tracks enter the statistics: intervals are wide");
        if (nArea > 0 && nonStar > 0.1 * nArea) warnings.Add($"{nonStar} of {nArea} outlines are not star-shaped about their centroid: the radial function takes the farthest crossing");
        if (used > 0 && below > 0.25 * used) warnings.Add($"{below} of {used} tracks have contour fluctuations below the noise floor");
        var counts = new AnalysisCounts(frames, objects, nArea, border, small, nonStar, tracks.Count, used, below, divisions, merges);
        progress?.Report(new Progress(1, 3, "correlation times"));
        var dynamics = times.Time("dynamics", () => Dynamics.DynamicsAnalysis.Run(tracks, options));
        if (used > 0 && !dynamics.SokalWindowReached)
            warnings.Add($"the integrated correlation time of q did not converge within {dynamics.MaxLag} lags (Sokal window): tracks are short compared with tau_q");
        double coverage = frames > 0 && info.Width > 0 ? meanArea / ((double)info.Width * info.Height) / frames : double.NaN;
        if (coverage < 0.7)
            warnings.Add($"cells cover {100 * coverage:F0}% of the field: the nematic field and its defects assume a confluent tissue, so read the defect results with care");
        progress?.Report(new Progress(2, 3, "nematic field and defects"));
        var defects = times.Time("defects", () => Nematic.DefectAnalysis.Run(info.Width, info.Height, cells, tracks, r0, units.S, options.ToDefectOptions(), velocities));
        if (defects.Tracks.Count > 0 && defects.PlusTracksUsed == 0)
            warnings.Add("no +1/2 defect was followed for 3 or more frames: headward speeds are undefined");
        var hypothesis = times.Time("defects", () => Nematic.ShapeNoiseHypothesis.Test(cells, tracks, defects, options.ToDefectOptions()));
        if (defects.PlusTracksUsed > 0 && hypothesis.DefectTracks < 3)
            warnings.Add($"only {hypothesis.DefectTracks} +1/2 defect track(s) with a local anisotropy: the within-movie hypothesis test needs 3 or more; compare movies instead");
        progress?.Report(new Progress(3, 3, "done"));
        return new AnalysisResult(info, options, units, counts, cells, tracks, pooled, r0, floorReference, warnings, dynamics, defects, hypothesis);
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


    /// <summary>Frame-weighted pooling over used tracks with bootstrap intervals over tracks (docs/measures.md#movie-pooling).</summary>
    public static PooledFluctuations Pool(IReadOnlyList<TrackRecord> allTracks, int m, AnalysisOptions options, NoiseFloorReference? r)
    {
        var t = new List<TrackRecord>();
        foreach (var x in allTracks) if (x.Used && x.Contour is not null) t.Add(x);
        int n = t.Count;
        var N = new double[n]; var vL = new double[n]; var vW = new double[n];
        var aR = new double[n]; var cR = new double[n]; var aF = new double[n]; var cF = new double[n];
        for (int i = 0; i < n; i++)
        {
            var c = t[i].Contour!;
            N[i] = t[i].Frames;
            vL[i] = t[i].VarLPx2 - (r?.VarLPx2 ?? 0);
            vW[i] = t[i].VarWPx2 - (r?.VarWPx2 ?? 0);
            aR[i] = c.VarAlongRaw; cR[i] = c.VarAcrossRaw;
            aF[i] = NoiseFloor.AlongOf(c, r); cF[i] = NoiseFloor.AcrossOf(c, r);
        }
        double Mean(double[] v, int[] k) { double s = 0, w = 0; for (int i = 0; i < n; i++) { s += k[i] * N[i] * v[i]; w += k[i] * N[i]; } return w > 0 ? s / w : double.NaN; }
        double Diff(double[] a, double[] b, int[] k) => Mean(a, k) - Mean(b, k);
        int B = options.BootstrapResamples, seed = options.Seed;
        var anis = Bootstrap.Percentile(n, k => Mean(vL, k) / Mean(vW, k), B, seed);
        var anisC = Bootstrap.Percentile(n, k => Diff(aR, aF, k) / Diff(cR, cF, k), B, seed);
        var anisCRaw = Bootstrap.Percentile(n, k => Mean(aR, k) / Mean(cR, k), B, seed);
        var varL = Bootstrap.Percentile(n, k => Mean(vL, k), B, seed);
        var varW = Bootstrap.Percentile(n, k => Mean(vW, k), B, seed);
        var along = Bootstrap.Percentile(n, k => Diff(aR, aF, k), B, seed);
        var across = Bootstrap.Percentile(n, k => Diff(cR, cF, k), B, seed);
        var ones = new int[n]; Array.Fill(ones, 1);

        int nm = m / 2 + 1;
        var spec = new double[nm];
        double floorMode = 0, wsum = 0;
        const int bins = 9;
        var profRaw = new double[bins]; var profFloor = new double[bins]; var profW = new double[bins]; var centres = new double[bins];
        for (int b = 0; b < bins; b++) centres[b] = (b + 0.5) * 90.0 / bins;
        foreach (var x in t)
        {
            var c = x.Contour!;
            for (int j = 0; j < nm; j++) spec[j] += x.Frames * c.ModePower[j];
            floorMode += x.Frames * (r?.FloorPerModePx2 ?? c.FloorPerMode);
            wsum += x.Frames;
            double floorScale = r is null ? 1 : (c.FloorPerMode > 0 ? r.FloorPerModePx2 / c.FloorPerMode : 0);
            for (int k = 0; k < m; k++)
            {
                int b = Math.Min(bins - 1, (int)(c.NormalAngleDeg[k] / (90.0 / bins)));
                double w = x.Frames * c.ArcWeight[k];
                profRaw[b] += w * c.SampleVariance[k]; profFloor[b] += w * c.SampleFloor[k] * floorScale; profW[b] += w;
            }
        }
        for (int j = 0; j < nm; j++) spec[j] = wsum > 0 ? spec[j] / wsum : double.NaN;
        floorMode = wsum > 0 ? floorMode / wsum : double.NaN;
        var profCorr = new double[bins];
        for (int b = 0; b < bins; b++)
        {
            profRaw[b] = profW[b] > 0 ? profRaw[b] / profW[b] : double.NaN;
            profFloor[b] = profW[b] > 0 ? profFloor[b] / profW[b] : double.NaN;
            profCorr[b] = profRaw[b] - profFloor[b];
        }
        return new PooledFluctuations(anis, anisC, anisCRaw, varL, varW, along, across,
            Mean(aR, ones), Mean(cR, ones), Mean(aF, ones), Mean(cF, ones), floorMode, spec, centres, profRaw, profCorr, profFloor);
    }
}
