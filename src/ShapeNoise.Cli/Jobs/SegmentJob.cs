using ShapeNoise.Imaging.Segmentation;
using ShapeNoise.Imaging.Writing;
using System.Text.Json.Nodes;
using OpenCvSharp;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;
using ShapeNoise.Segmentation;

namespace ShapeNoise.Cli.Jobs;

/// <summary>The <c>segment</c> and <c>score</c> jobs.</summary>
public static class SegmentJob
{
    /// <summary>Segments every frame of a raw movie into labels.tif (uint16, OME-XML with the movie's scale) plus a QC
    /// overlay every <paramref name="qcEvery"/> frames, written atomically.</summary>
    public static (int Frames, double MeanCells) Run(string input, OutputTarget outDir, SegmentOptions options, double? pixelSizeUm, double? frameIntervalMin,
        int qcEvery = 10, IEnumerable<string>? commandLine = null, IProgress<(int Done, int Total)>? progress = null, MovieSelection? selection = null,
        List<double>? boundarySigmaPx = null)
    {
        OutputFolder.Check(outDir);
        // Raw intensities arrive as integers (8- or 16-bit); the plane is picked and non-square pixels made square on opening.
        using var movie = LabelMovies.Open(input, (selection ?? MovieSelection.None) with { PixelSizeUm = pixelSizeUm ?? selection?.PixelSizeUm, FrameIntervalMin = frameIntervalMin ?? selection?.FrameIntervalMin });
        var info = movie.Info;
        double? s = info.PixelSizeUm, dt = info.FrameIntervalMin;
        var o = (options with { PixelSizeUm = s ?? 1 }).Validated();
        int frames = 0; long cells = 0;
        var qc = new List<FrameQc>();
        OutputFolder.Write(outDir, dir =>
        {
            var pages = Segmented(movie.Frames(), o).Select(fr =>
            {
                var (f, r) = fr;
                var labels = r.Labels;
                int n = labels.Max();
                if (n > 65535) throw new InputException(input, $"frame {f.Index + 1} has more than 65535 cells");
                if (qcEvery > 0 && f.Index % qcEvery == 0) Overlay(f.Labels, labels, f.Width, f.Height, Path.Combine(dir, $"qc-frame-{f.Index:D3}.png"), r.Seeds);
                int inCells = 0;
                foreach (var v in labels) if (v > 0) inCells++;
                qc.Add(new FrameQc(f.Index, n, inCells / (double)labels.Length, r.Seeds.Length, r.RidgelessMerges, r.FragmentMerges, r.NoiseSd, r.JunctionSigmaPx, r.BoundarySigmaPx, r.ModelSigmaPx, r.ModelBandPx, r.ModelMoves, r.ModelMerges));
                boundarySigmaPx?.Add(r.BoundarySigmaPx);
                frames++; cells += n;
                progress?.Report((frames, info.FrameCount));
                return labels;
            });
            var xml = TiffWriter.OmeXml(info.Width, info.Height, info.FrameCount, "uint16", s, dt);
            TiffWriter.Write(Path.Combine(dir, "labels.tif"), info.Width, info.Height, pages, TiffWriter.PixelType.UInt16, xml);
            var opts = OptionsJson.Node(o);
            var prov = Provenance.Describe("segment", movie.Files, opts, commandLine);
            prov["movie"] = Provenance.Movie(info, s, info.PixelSizeSource, dt, info.FrameIntervalSource);
            var warnings = CountJumps(qc, CountJumpFraction);
            foreach (var w in warnings) Console.Error.WriteLine($"warning: {w}");
            var perFrame = new JsonArray();
            foreach (var q in qc)
                perFrame.Add((JsonNode)new JsonObject
                {
                    ["frame"] = q.Frame, ["cells"] = q.Cells, ["cell_area_fraction"] = Math.Round(q.CellAreaFraction, 4), ["seeds"] = q.Seeds,
                    ["ridgeless_merges"] = q.RidgelessMerges, ["fragment_merges"] = q.FragmentMerges, ["noise_sd"] = Math.Round(q.NoiseSd, 5),
                    ["junction_sigma_px"] = double.IsFinite(q.JunctionSigmaPx) ? Math.Round(q.JunctionSigmaPx, 3) : null,
                    ["boundary_sigma_px"] = double.IsFinite(q.BoundarySigmaPx) ? Math.Round(q.BoundarySigmaPx, 3) : null,
                    ["model_sigma_px"] = double.IsFinite(q.ModelSigmaPx) ? Math.Round(q.ModelSigmaPx, 3) : null,
                    ["model_band_px"] = double.IsFinite(q.ModelBandPx) ? q.ModelBandPx : null,
                    ["model_moves"] = double.IsFinite(q.ModelSigmaPx) ? q.ModelMoves : null,
                    ["model_merges"] = double.IsFinite(q.ModelSigmaPx) ? q.ModelMerges : null,
                });
            prov["qc"] = new JsonObject { ["frames"] = perFrame, ["warnings"] = new JsonArray(warnings.Select(w => (JsonNode)JsonValue.Create(w)!).ToArray()) };
            File.WriteAllText(Path.Combine(dir, "run.json"), prov.ToJsonString(Summary.Indented));
        });
        return (frames, frames > 0 ? cells / (double)frames : 0);
    }

    /// <summary>Each frame with its segmentation, in frame order. Frames are independent unless
    /// <see cref="SegmentOptions.TrackSeeds"/> is on, so they are segmented a core's worth at a time (each frame's result
    /// depends only on its own pixels, the same on any number of cores); with tracked seeds one after another.</summary>
    private static IEnumerable<(LabelFrame Frame, SegmentedFrame Result)> Segmented(IEnumerable<LabelFrame> frames, SegmentOptions o)
    {
        if (o.TrackSeeds)
        {
            int[]? previous = null;
            foreach (var f in frames)
            {
                var r = JunctionSegmenter.SegmentFrame(f.Labels, f.Width, f.Height, o, previous);
                previous = r.Labels;
                yield return (f, r);
            }
            yield break;
        }
        int batch = Math.Max(1, Environment.ProcessorCount);
        var chunk = new List<LabelFrame>(batch);
        foreach (var f in frames)
        {
            chunk.Add(f);
            if (chunk.Count < batch) continue;
            foreach (var done in Batch(chunk, o)) yield return done;
            chunk.Clear();
        }
        foreach (var done in Batch(chunk, o)) yield return done;
    }

    private static (LabelFrame, SegmentedFrame)[] Batch(List<LabelFrame> chunk, SegmentOptions o)
    {
        var pairs = new (LabelFrame, SegmentedFrame)[chunk.Count];
        try
        {
            Parallel.For(0, chunk.Count, k => pairs[k] = (chunk[k], JunctionSegmenter.SegmentFrame(chunk[k].Labels, chunk[k].Width, chunk[k].Height, o)));
        }
        catch (AggregateException e) when (e.InnerExceptions.Count > 0)
        {
            // The error of the first failing frame, as the sequential loop would have raised it (exit codes map on its type).
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(e.InnerExceptions[0]).Throw();
        }
        return pairs;
    }

    /// <summary>Relative change of the cell count between consecutive frames above which <c>segment</c> warns (docs/segmentation.md#qc).</summary>
    public const double CountJumpFraction = 0.1;

    /// <summary>QC of one segmented frame (run.json "qc").</summary>
    public readonly record struct FrameQc(int Frame, int Cells, double CellAreaFraction, int Seeds, int RidgelessMerges, int FragmentMerges, double NoiseSd,
        double JunctionSigmaPx = double.NaN, double BoundarySigmaPx = double.NaN, double ModelSigmaPx = double.NaN, double ModelBandPx = double.NaN,
        int ModelMoves = 0, int ModelMerges = 0);

    /// <summary>One warning per pair of consecutive frames whose cell counts differ by more than <paramref name="fraction"/> of the larger.</summary>
    public static List<string> CountJumps(IReadOnlyList<FrameQc> qc, double fraction)
    {
        var w = new List<string>();
        for (int i = 1; i < qc.Count; i++)
        {
            int a = qc[i - 1].Cells, b = qc[i].Cells;
            if (Math.Abs(b - a) > fraction * Math.Max(a, b))
                w.Add($"cell count jumps from {a} (frame {qc[i - 1].Frame + 1}) to {b} (frame {qc[i].Frame + 1}): check the QC overlays, --cell-diameter, --seed-depth");
        }
        return w;
    }

    /// <summary>Raw image with the segmented boundaries drawn in colour (orange) and the seeds (green).</summary>
    public static void Overlay(int[] raw, int[] labels, int w, int h, string path, int[]? seeds = null)
    {
        int min = raw.Min(), max = Math.Max(raw.Max(), min + 1);
        var bgr = new byte[w * h * 3];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x;
                byte v = (byte)(255.0 * (raw[i] - min) / (max - min));
                bool edge = (x + 1 < w && labels[i + 1] != labels[i]) || (y + 1 < h && labels[i + w] != labels[i]);
                bgr[3 * i] = edge ? (byte)0 : v; bgr[3 * i + 1] = edge ? (byte)200 : v; bgr[3 * i + 2] = edge ? (byte)255 : v;
            }
        if (seeds is not null)
            foreach (var p in seeds) { bgr[3 * p] = 0; bgr[3 * p + 1] = 255; bgr[3 * p + 2] = 0; }
        using var img = new Mat(h, w, MatType.CV_8UC3);
        System.Runtime.InteropServices.Marshal.Copy(bgr, 0, img.Data, bgr.Length);
        Cv2.ImWrite(path, img);
    }

    /// <summary>SEG and detection F1 of a label movie against reference labels, pooled over frames.</summary>
    public static SegmentationScore Score(string labelsPath, string truthPath)
    {
        using var a = LabelMovies.Open(labelsPath);
        using var b = LabelMovies.Open(truthPath);
        if (a.Info.Width != b.Info.Width || a.Info.Height != b.Info.Height || a.Info.FrameCount != b.Info.FrameCount)
            throw new InputException(labelsPath, $"is {a.Info.Width}x{a.Info.Height}x{a.Info.FrameCount}, the reference {truthPath} is {b.Info.Width}x{b.Info.Height}x{b.Info.FrameCount}");
        return SegmentationScore.Pool(a.Frames().Zip(b.Frames(), (x, y) => SegmentationScore.Accumulate(y.Labels, x.Labels)));
    }
}

/// <summary><c>analyze --raw</c>: segment a raw movie, analyse the labels, and keep the segmentation in the output folder.</summary>
public static class RawAnalyzeJob
{
    public static ShapeNoise.Pipeline.AnalysisResult Run(string raw, OutputTarget outDir, ShapeNoise.Pipeline.AnalysisOptions options, SegmentOptions seg,
        IProgress<ShapeNoise.Pipeline.MovieAnalyzer.Progress>? progress = null, IEnumerable<string>? commandLine = null, MovieSelection? selection = null)
    {
        OutputFolder.Check(outDir);
        string temp = Path.Combine(Path.GetTempPath(), $"shapenoise-seg-{Environment.ProcessId}-{Guid.NewGuid():N}");
        using var scratch = Scratch.Register(temp);
        try
        {
            var sigmas = new List<double>();
            SegmentJob.Run(raw, temp, seg, options.PixelSizeUm, options.FrameIntervalMin, selection: selection, boundarySigmaPx: sigmas);
            // Outlines on the crest of the junction signal (docs/segmentation.md#sub-pixel-boundaries), read with the same
            // scale as the segmentation.
            var sel = (selection ?? MovieSelection.None) with { PixelSizeUm = options.PixelSizeUm ?? selection?.PixelSizeUm, FrameIntervalMin = options.FrameIntervalMin ?? selection?.FrameIntervalMin };
            using var junctions = seg.CrestOutlines ? new RawJunctionSignal(raw, seg, sel, sigmas) : null;
            return AnalyzeJob.Run(Path.Combine(temp, "labels.tif"), outDir, options, LabelMovies.Open, progress, commandLine, new ShapeNoise.Imaging.Drawing.DefectOverlays(), [raw],
                options.Velocity == ShapeNoise.Pipeline.VelocitySource.Flow ? new ShapeNoise.Imaging.Flow.OpticalFlowVelocity(raw, selection) : null,
                dir => CopySegmentation(temp, dir), junctions);
        }
        finally { Scratch.Delete(temp); }
    }

    /// <summary>Copies the segmentation's files into the analysis folder's segmentation/ subfolder.</summary>
    private static void CopySegmentation(string segDir, string dir)
    {
        string target = Path.Combine(dir, "segmentation");
        Directory.CreateDirectory(target);
        foreach (var f in Directory.GetFiles(segDir)) File.Copy(f, Path.Combine(target, Path.GetFileName(f)));
    }
}
