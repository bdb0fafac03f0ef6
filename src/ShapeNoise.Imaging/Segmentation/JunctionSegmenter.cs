using OpenCvSharp;

namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Options of the junction-marker segmentation; lengths derive from the expected cell diameter.</summary>
public sealed record SegmentOptions
{
    /// <summary>Expected cell diameter (um; px when the pixel size is unknown).</summary>
    public double CellDiameterUm { get; init; } = 10;
    /// <summary>Pixel size (um/px) used to convert the diameter; 1 when unknown.</summary>
    public double PixelSizeUm { get; init; } = 1;
    /// <summary>Background flattening: the image is divided by its Gaussian blur of this many cell diameters.</summary>
    public double FlattenDiameters { get; init; } = 2;
    /// <summary>Smoothing sigma as a fraction of the diameter.</summary>
    public double SmoothFraction { get; init; } = 0.1;
    /// <summary>Seeds: regional minima of the smoothed signal over a window of this fraction of the diameter
    /// (0.9 tuned on rendered monolayers of aspect-2 cells at SNR 8: one seed per cell).</summary>
    public double SeedWindowFraction { get; init; } = 0.9;
    /// <summary>Smoothing (px) of the image the flood runs on: about the point-spread width.</summary>
    public double BoundarySigmaPx { get; init; } = 0.6;
    /// <summary>Smoothing (px) of the junction signal whose crest the sub-pixel outlines follow
    /// (docs/segmentation.md#sub-pixel-boundaries); a Gaussian blur does not move the crest of a straight symmetric ridge.</summary>
    public double RidgeSigmaPx { get; init; } = 0.6;
    /// <summary>When &gt; 0: the boundary smoothing becomes max(<see cref="BoundarySigmaPx"/>, this × the junction width σ_j
    /// measured on a first segmentation), and the frame is segmented again with it (docs/segmentation.md#junction-width).</summary>
    public double BoundarySigmaWidthFactor { get; init; } = 0.5;
    /// <summary><c>analyze --raw</c>: move every traced outline onto the crest of the junction signal (default on;
    /// docs/segmentation.md#sub-pixel-boundaries); off: the label masks' midpoint outlines.</summary>
    public bool CrestOutlines { get; init; } = true;
    /// <summary>Sd (px) of the microscope's Gaussian point-spread function: when &gt; 0 the image the watershed floods is
    /// deconvolved (Richardson-Lucy) with a Gaussian of min(this, <see cref="DeconvolveMaxSigmaPx"/>) (the seeds are not);
    /// 0 = off, the default (docs/segmentation.md#deconvolution).</summary>
    public double DeconvolveSigmaPx { get; init; }
    /// <summary>Largest kernel (px) the deconvolution uses: broader PSFs are deconvolved only partly (1.5 px, measured on the
    /// tuning renders, docs/segmentation.md#deconvolution).</summary>
    public double DeconvolveMaxSigmaPx { get; init; } = 1.5;
    /// <summary>Richardson-Lucy iterations when <see cref="DeconvolveSigmaPx"/> &gt; 0 (8, chosen on the tuning renders,
    /// docs/segmentation.md#deconvolution).</summary>
    public int DeconvolveIterations { get; init; } = 8;
    /// <summary>Refine the boundaries by fitting a model of the junction image (off by default: it raises SEG on small
    /// and blurred cells but makes the masks' boundaries less steady from frame to frame;
    /// docs/segmentation.md#junction-model-fit).</summary>
    public bool ModelFit { get; init; }
    /// <summary>Strength β of the boundary-length prior of the model fit, per pixel of boundary length (Cauchy–Crofton,
    /// 8 neighbours) in units of the log-likelihood (docs/segmentation.md#junction-model-fit).</summary>
    public double ModelFitBeta { get; init; } = 3;
    /// <summary>Model fit: neighbouring cells merge when dropping their shared boundary from the model raises the
    /// log-likelihood by more than this (docs/segmentation.md#junction-model-fit); negative = no merging.</summary>
    public double ModelMergeMargin { get; init; } = 10;
    /// <summary>Model fit: heat-bath sweeps after the fit whose most frequent label per pixel becomes the labels
    /// (posterior-marginal labels, docs/segmentation.md#posterior-marginal-labels); 0 = off, the default (it costs about
    /// 2 ms per sweep per 100 x 100 px); 300 measured on the render family.</summary>
    public int MarginalSweeps { get; init; }
    /// <summary>Temperature T of the <see cref="MarginalSweeps"/>: the energy of the model fit is divided by T (2, chosen on
    /// the tuning renders, docs/segmentation.md#posterior-marginal-labels).</summary>
    public double MarginalTemperature { get; init; } = 2;
    /// <summary>Regions smaller than this fraction of the expected cell area are merged into a neighbour.</summary>
    public double MinAreaFraction { get; init; } = 0.15;

    /// <summary>Regions larger than this many expected cell areas are not cells (background, failed splits) and are dropped.</summary>
    public double MaxAreaFactor { get; init; } = 6;

    /// <summary>How seeds are chosen: h-minima of the smoothed signal with a noise-based depth (default) or the minima over
    /// a window of <see cref="SeedWindowFraction"/> diameters (the original method).</summary>
    public SeedMethod Seeds { get; init; } = SeedMethod.HMinima;
    /// <summary>h-minima seeds: a minimum of the seed image is a seed when its dynamic is at least this many noise sd of
    /// the seed image (measured noise of the flattened image, reduced by the smoothing); null = 2, or 1 with
    /// <see cref="ModelFit"/> on, whose merge test removes the extra splits (both chosen on the tuning renders;
    /// docs/segmentation.md#choice-of-seed-depth-and-ridge-contrast); 1.5 for <see cref="SeedMethod.Laplacian"/> seeds
    /// (docs/segmentation.md#laplacian-seeds).</summary>
    public double? SeedDepthSd { get; init; }
    /// <summary>The seed depth in use: <see cref="SeedDepthSd"/>, or its default (2; 1 with <see cref="ModelFit"/>; 1.5 for
    /// <see cref="SeedMethod.Laplacian"/> seeds).</summary>
    public double SeedDepth => SeedDepthSd ?? (Seeds == SeedMethod.Laplacian ? 1.5 : ModelFit ? 1 : 2);
    /// <summary><see cref="SeedMethod.Laplacian"/> seeds: scale σ_s of the Laplacian of Gaussian as a fraction of the cell
    /// diameter (0.18, chosen on the tuning renders; docs/segmentation.md#laplacian-seeds).</summary>
    public double SeedScaleFraction { get; init; } = 0.18;
    /// <summary>Neighbouring regions whose shared boundary rises less than this many noise sd (of the boundary image)
    /// above the brighter region's interior level are merged: the boundary has no ridge; 2 chosen with the seed depth
    /// (docs/segmentation.md#choice-of-seed-depth-and-ridge-contrast).</summary>
    public double RidgeContrastSd { get; init; } = 2;
    /// <summary>Passes of the ridge placement of boundaries (default 0 = off; measured to lower SEG on the render family,
    /// docs/segmentation.md#what-did-not-help): boundary pixels on the flank of a crest move to the crest's far side.</summary>
    public int RidgePasses { get; init; }
    /// <summary>Use the previous frame's cells, shrunk by <see cref="TrackErosionFraction"/> diameters, as seeds for the next frame.</summary>
    public bool TrackSeeds { get; init; }
    /// <summary>With <see cref="TrackSeeds"/>: the previous frame's cells are shrunk by this fraction of the diameter before seeding.</summary>
    public double TrackErosionFraction { get; init; } = 0.25;

    /// <summary>Sd (px) of the Gaussian the deconvolution uses: min(<see cref="DeconvolveSigmaPx"/>, <see cref="DeconvolveMaxSigmaPx"/>); 0 = off.</summary>
    public double DeconvolutionKernelPx => DeconvolveIterations > 0 ? Math.Min(DeconvolveSigmaPx, DeconvolveMaxSigmaPx) : 0;

    /// <summary>Expected cell diameter in pixels: CellDiameterUm / PixelSizeUm.</summary>
    public double DiameterPx => CellDiameterUm / PixelSizeUm;

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public SegmentOptions Validated()
    {
        if (!(CellDiameterUm > 0)) throw new ArgumentException($"--cell-diameter must be > 0 (got {CellDiameterUm})");
        if (!(DiameterPx >= 4)) throw new ArgumentException($"--cell-diameter is {DiameterPx:F1} px; cells must be at least 4 px across");
        if (!(FlattenDiameters > 0) || !(SmoothFraction > 0) || !(SeedWindowFraction > 0) || !(BoundarySigmaPx > 0) || !(RidgeSigmaPx > 0))
            throw new ArgumentException("--flatten, --smooth, --seed-window, --boundary-sigma and --ridge-sigma must be > 0");
        if (!(BoundarySigmaWidthFactor >= 0)) throw new ArgumentException($"the junction-width factor must be >= 0 (got {BoundarySigmaWidthFactor})");
        if (MinAreaFraction < 0 || !(MaxAreaFactor > 1)) throw new ArgumentException("--min-area-fraction must be >= 0 and --max-area-factor > 1");
        if (!(SeedDepth > 0)) throw new ArgumentException($"--seed-depth must be > 0 noise sd (got {SeedDepth})");
        if (!(SeedScaleFraction > 0 && SeedScaleFraction <= 1)) throw new ArgumentException($"--seed-scale must be in (0, 1] cell diameters (got {SeedScaleFraction})");
        if (Seeds == SeedMethod.Laplacian && !ModelFit)
            throw new ArgumentException("--seeds laplacian places extra seeds that the model fit's merge test removes: give --model-fit too");
        if (!(RidgeContrastSd >= 0)) throw new ArgumentException($"--ridge-contrast must be >= 0 noise sd (got {RidgeContrastSd})");
        if (RidgePasses is < 0 or > 50) throw new ArgumentException($"--ridge-passes must be in 0..50 (got {RidgePasses})");
        if (!(DeconvolveSigmaPx >= 0 && DeconvolveSigmaPx <= 0.25 * DiameterPx))
            throw new ArgumentException($"--deconvolve must be between 0 (off) and a quarter of the cell diameter, {0.25 * DiameterPx:0.#} px (got {DeconvolveSigmaPx})");
        if (!(DeconvolveMaxSigmaPx > 0)) throw new ArgumentException($"the largest deconvolution kernel must be > 0 px (got {DeconvolveMaxSigmaPx})");
        if (DeconvolveIterations is < 1 or > 100) throw new ArgumentException($"--deconvolve-iterations must be in 1..100 (got {DeconvolveIterations})");
        if (!(ModelFitBeta >= 0)) throw new ArgumentException($"--fit-prior must be >= 0 (got {ModelFitBeta})");
        if (MarginalSweeps is < 0 or > 100_000) throw new ArgumentException($"--marginal-sweeps must be in 0..100000 (got {MarginalSweeps})");
        if (MarginalSweeps > 0 && !ModelFit) throw new ArgumentException("--marginal-sweeps samples the junction model: give --model-fit too");
        if (!(MarginalTemperature > 0 && MarginalTemperature < 1e6)) throw new ArgumentException($"--marginal-temperature must be > 0 (got {MarginalTemperature})");
        if (!(TrackErosionFraction is >= 0 and < 0.5)) throw new ArgumentException($"--track-erosion must be in [0, 0.5) (got {TrackErosionFraction})");
        return this;
    }
}

/// <summary>How the segmentation chooses one seed per cell.</summary>
public enum SeedMethod
{
    /// <summary>Minima of the smoothed signal deeper than a noise-based depth (h-minima; docs/segmentation.md#method).</summary>
    HMinima,
    /// <summary>Pixels equal to the minimum over a window of <see cref="SegmentOptions.SeedWindowFraction"/> diameters and below the median.</summary>
    Window,
    /// <summary>h-minima of the scale-normalised Laplacian-of-Gaussian response −σ_s² ∇²(G_σs * F) of the flattened frame F,
    /// σ_s = <see cref="SegmentOptions.SeedScaleFraction"/> × D, with the depth in noise sd of that image
    /// (docs/segmentation.md#laplacian-seeds).</summary>
    Laplacian,
}

/// <summary>One segmented frame with what the QC needs.</summary>
/// <param name="Labels">Row-major labels, 0 = no cell, cells 1..N.</param>
/// <param name="Seeds">Pixel indices of the seeds.</param>
/// <param name="NoiseSd">Measured noise sd of the flattened image (relative units).</param>
/// <param name="RidgelessMerges">Merges across boundaries without a ridge.</param>
/// <param name="FragmentMerges">Fragments merged into a neighbour.</param>
/// <param name="RidgeMoves">Boundary pixels moved onto the ridge.</param>
public sealed record SegmentedFrame(int[] Labels, int[] Seeds, double NoiseSd, int RidgelessMerges, int FragmentMerges, int RidgeMoves)
{
    /// <summary>The flattened frame blurred by <see cref="SegmentOptions.RidgeSigmaPx"/>, row-major:
    /// the junction signal whose crest the sub-pixel outlines follow (docs/segmentation.md#sub-pixel-boundaries).</summary>
    public float[] RidgeSignal { get; init; } = [];
    /// <summary>Boundary smoothing σ_b (px) the frame was segmented with (after the junction-width rule).</summary>
    public double BoundarySigmaPx { get; init; }
    /// <summary>Junction width σ_j (px) measured on the frame when <see cref="SegmentOptions.BoundarySigmaWidthFactor"/> &gt; 0, else NaN.</summary>
    public double JunctionSigmaPx { get; init; } = double.NaN;
    /// <summary>Width σ_m (px) of the fitted junction model when <see cref="SegmentOptions.ModelFit"/> is on, else NaN.</summary>
    public double ModelSigmaPx { get; init; } = double.NaN;
    /// <summary>Band width (px; 0 = the pixel line) of the fitted junction model when <see cref="SegmentOptions.ModelFit"/> is on, else NaN.</summary>
    public double ModelBandPx { get; init; } = double.NaN;
    /// <summary>Pixels the model fit moved to another cell.</summary>
    public int ModelMoves { get; init; }
    /// <summary>Cells the model fit merged into a neighbour.</summary>
    public int ModelMerges { get; init; }
}

/// <summary>
/// Segments one frame of a junction or membrane marker into cells (docs/segmentation.md#method): flatten the background
/// (divide by a wide Gaussian blur), measure the noise, smooth, take h-minima seeds deeper than a noise-based depth,
/// flood them by marker-controlled watershed, merge regions whose shared boundary has no ridge and fragments below a
/// minimum area, place every boundary on the crest of the smoothed junction signal, drop regions too large to be a cell,
/// and relabel 1..N.
/// </summary>
/// <remarks>Marker-controlled watershed: Beucher S. and Meyer F. (1993), "The morphological approach to segmentation:
/// the watershed transformation", in Mathematical Morphology in Image Processing, Marcel Dekker, 433-481; flooding by
/// level as in Meyer F. (1991), "Un algorithme optimal de ligne de partage des eaux", Proc. 8e Congrès AFCET, 847-857;
/// noise: Immerkær J. (1996), Computer Vision and Image Understanding 64:300-302; dynamics: Grimaud M. (1992), Proc. SPIE
/// 1769:292-305. OpenCV does the blurs, the window minimum and the distance transform.</remarks>
public static class JunctionSegmenter
{
    /// <summary>Segments the row-major intensity frame <paramref name="raw"/> (<paramref name="width"/> x <paramref name="height"/>) and returns its labels, row-major, 0 = no cell, cells numbered 1..N.</summary>
    public static int[] Segment(int[] raw, int width, int height, SegmentOptions o, int[]? previous = null)
        => SegmentFrame(raw, width, height, o, previous).Labels;

    /// <summary>Segments one frame (see <see cref="JunctionSegmenter"/>); <paramref name="previous"/> (the previous frame's
    /// labels) seeds the cells when <see cref="SegmentOptions.TrackSeeds"/> is set.</summary>
    public static SegmentedFrame SegmentFrame(int[] raw, int width, int height, SegmentOptions o, int[]? previous = null)
    {
        using var frame = Prepared.Of(raw, width, height, o);
        var kept = Segmented(frame, o, previous);
        if (!o.ModelFit) return kept;
        var fit = JunctionModelFit.Refine(ToArray(frame.Flat), kept.Labels, width, height, frame.NoiseSd, o.ModelFitBeta, 0.5, Math.Max(1.5, Math.Min(4, 0.3 * o.DiameterPx)), o.ModelMergeMargin, sampleSweeps: o.MarginalSweeps, temperature: o.MarginalTemperature, seed: o.MarginalSweeps > 0 ? Seed(raw) : 0);
        // Merges leave gaps in the numbering, and so can the marginal labels' vote (a cell may lose every pixel).
        if (fit.Merges > 0 || o.MarginalSweeps > 0) kept = kept with { Labels = Regions.Relabel(kept.Labels) };
        return kept with { ModelSigmaPx = fit.SigmaPx, ModelBandPx = fit.BandPx, ModelMoves = fit.Moves, ModelMerges = fit.Merges };
    }

    /// <summary>The watershed segmentation before the model fit (docs/segmentation.md#method, steps 1–7).</summary>
    private static SegmentedFrame Segmented(Prepared frame, SegmentOptions o, int[]? previous)
    {
        int width = frame.Width, height = frame.Height;
        // Junction width first: it sets the boundary smoothing of the segmentation that is kept, measured on a first
        // segmentation; both passes share the flattened (and deconvolved) frame and its noise level.
        if (!(o.BoundarySigmaWidthFactor > 0)) return Pass(frame, o, previous);
        var inner = o with { BoundarySigmaWidthFactor = 0 };
        var first = Pass(frame, inner, previous);
        double sj = JunctionWidth(frame.Flat, first.Labels, width, height, o.DiameterPx);
        double sb = o.BoundarySigmaWidthFactor * sj;
        if (!(sb > o.BoundarySigmaPx + 0.1)) return first with { JunctionSigmaPx = sj };
        return Pass(frame, inner with { BoundarySigmaPx = sb }, previous) with { JunctionSigmaPx = sj };
    }

    /// <summary>What every segmentation pass of one frame reads (docs/segmentation.md#method, steps 1–2): the flattened
    /// frame, the image the boundaries are found on (<see cref="BoundarySource"/>) and the noise sd of the flattened image.</summary>
    private sealed class Prepared(int width, int height, Mat flat, Mat sharp, double noiseSd) : IDisposable
    {
        public int Width => width;
        public int Height => height;
        public Mat Flat => flat;
        /// <summary>The flattened frame deconvolved when <see cref="SegmentOptions.DeconvolutionKernelPx"/> &gt; 0, else <see cref="Flat"/> itself.</summary>
        public Mat Sharp => sharp;
        public double NoiseSd => noiseSd;

        /// <summary>Flattens <paramref name="raw"/> and prepares the boundary image; with <paramref name="measureNoise"/> false
        /// (only the images are needed, <see cref="RidgeSignal"/>) <see cref="NoiseSd"/> is NaN and the two full-frame sorts
        /// behind it are skipped.</summary>
        public static Prepared Of(int[] raw, int width, int height, SegmentOptions o, bool measureNoise = true)
        {
            var (f, wide, flat) = Flattened(raw, width, height, o);
            using (wide)
            {
                double noise = double.NaN;
                if (measureNoise)
                {
                    // Noise of the flattened image: measured on the counts (at least the quantisation noise of one count,
                    // 1/sqrt(12)), divided by the median background level (docs/segmentation.md#noise-level).
                    var wideArr = ToArray(wide);
                    Array.Sort(wideArr);
                    noise = Math.Max(NoiseLevel.Estimate(f, width, height), 1 / Math.Sqrt(12)) / Math.Max(1e-9, wideArr[wideArr.Length / 2]);
                }
                return new Prepared(width, height, flat, BoundarySource(flat, o), noise);
            }
        }

        public void Dispose()
        {
            if (!ReferenceEquals(Sharp, Flat)) Sharp.Dispose();
            Flat.Dispose();
        }
    }

    /// <summary>One segmentation pass with the boundary smoothing of <paramref name="o"/> (docs/segmentation.md#method, steps 3–7).</summary>
    private static SegmentedFrame Pass(Prepared frame, SegmentOptions o, int[]? previous)
    {
        int width = frame.Width, height = frame.Height, n = width * height;
        double d = o.DiameterPx, noise = frame.NoiseSd;
        double seedSigma = Math.Max(0.5, o.SmoothFraction * d);
        var smooth = Blurred(frame.Flat, seedSigma);
        var fine = Blurred(frame.Sharp, o.BoundarySigmaPx);
        var labels = new int[n];
        int next = 0;
        bool[]? free = null;
        if (o.TrackSeeds && previous is not null && previous.Length == n) { free = TrackedCores(previous, labels, width, height, o.TrackErosionFraction * d); next = labels.Max(); }
        var seeds = o.Seeds switch
        {
            SeedMethod.Window => WindowSeeds(smooth, width, height, o, d),
            SeedMethod.Laplacian => LaplacianSeeds(frame.Flat, noise, o, free),
            _ => Watershed.HMinima(smooth, width, height, o.SeedDepth * NoiseLevel.AfterBlur(noise, seedSigma), free),
        };
        foreach (var p in seeds) if (labels[p] == 0) labels[p] = ++next;
        if (o.Seeds == SeedMethod.Window) GroupSeeds(labels, width, height);
        Watershed.Flood(fine, labels, width, height);
        double area = Math.PI * d * d / 4;
        int ridgeless = Regions.MergeRidgeless(labels, fine, width, height, o.RidgeContrastSd * NoiseAfter(noise, o.BoundarySigmaPx, o));
        int fragments = Regions.MergeSmall(labels, width, height, (int)(o.MinAreaFraction * area));
        int moves = Regions.PlaceOnRidges(labels, fine, width, height, o.RidgePasses);
        Regions.DropLarge(labels, o.MaxAreaFactor * area);
        return new SegmentedFrame(Regions.Relabel(labels), seeds.ToArray(), noise, ridgeless, fragments, moves) { RidgeSignal = RidgeSigma(o) == o.BoundarySigmaPx ? fine : Blurred(frame.Sharp, RidgeSigma(o)), BoundarySigmaPx = o.BoundarySigmaPx };
    }

    /// <summary>The junction signal whose crest the sub-pixel outlines follow: the frame divided by its Gaussian blur of
    /// <see cref="SegmentOptions.FlattenDiameters"/> diameters, then blurred by <see cref="SegmentOptions.RidgeSigmaPx"/>
    /// (as <see cref="SegmentedFrame.RidgeSignal"/>; docs/segmentation.md#sub-pixel-boundaries).</summary>
    /// <param name="raw">Row-major intensities.</param>
    /// <param name="width">Frame width (px).</param>
    /// <param name="height">Frame height (px).</param>
    /// <param name="o">Segmentation options (diameter in px, flattening, ridge smoothing).</param>
    /// <param name="boundarySigmaPx">The boundary smoothing the frame was segmented with (<see cref="SegmentedFrame.BoundarySigmaPx"/>):
    /// the signal is blurred by the larger of it and <see cref="SegmentOptions.RidgeSigmaPx"/>.</param>
    public static float[] RidgeSignal(int[] raw, int width, int height, SegmentOptions o, double boundarySigmaPx = 0)
    {
        using var frame = Prepared.Of(raw, width, height, o, measureNoise: false);
        return Blurred(frame.Sharp, RidgeSigma(o with { BoundarySigmaPx = Math.Max(boundarySigmaPx, 1e-3) }));
    }

    /// <summary>Flattening (docs/segmentation.md#method, step 1): the counts as floats, their Gaussian blur of
    /// <see cref="SegmentOptions.FlattenDiameters"/> × D, and the counts divided by it (uneven illumination and bleaching
    /// are multiplicative). The caller disposes both images.</summary>
    private static (float[] Counts, Mat Wide, Mat Flat) Flattened(int[] raw, int width, int height, SegmentOptions o)
    {
        var f = new float[raw.Length];
        for (int i = 0; i < raw.Length; i++) f[i] = raw[i];
        using var img = FromArray(f, width, height);
        var wide = new Mat();
        Cv2.GaussianBlur(img, wide, new Size(0, 0), o.FlattenDiameters * o.DiameterPx);
        var flat = new Mat();
        Cv2.Divide(img, wide, flat);
        return (f, wide, flat);
    }

    /// <summary>The image the boundaries are found on (docs/segmentation.md#deconvolution): a deconvolved copy of the
    /// flattened frame (Richardson-Lucy, <see cref="SegmentOptions.DeconvolutionKernelPx"/>) when that is on, else the
    /// flattened frame itself. The seeds always come from the flattened frame: deconvolved seeds split cells.</summary>
    private static Mat BoundarySource(Mat flat, SegmentOptions o)
    {
        if (!(o.DeconvolutionKernelPx > 0)) return flat;
        var m = flat.Clone();
        Deconvolution.RichardsonLucy(m, o.DeconvolutionKernelPx, o.DeconvolveIterations);
        return m;
    }

    /// <summary>Sd of the measured white noise <paramref name="sd"/> after the deconvolution (if on) and a blur of
    /// <paramref name="blurSigmaPx"/> (<see cref="Deconvolution.NoiseGain"/>; without deconvolution <see cref="NoiseLevel.AfterBlur"/>).</summary>
    private static double NoiseAfter(double sd, double blurSigmaPx, SegmentOptions o)
        => o.DeconvolutionKernelPx > 0
            ? sd * Deconvolution.NoiseGain(o.DeconvolutionKernelPx, o.DeconvolveIterations, Math.Max(0.5, blurSigmaPx))
            : NoiseLevel.AfterBlur(sd, blurSigmaPx);

    /// <summary>Smoothing of the crest signal: the larger of <see cref="SegmentOptions.RidgeSigmaPx"/> and the boundary
    /// smoothing (broad junctions, whose boundary smoothing follows their width, get as steady a crest).</summary>
    private static double RidgeSigma(SegmentOptions o) => Math.Max(o.RidgeSigmaPx, o.BoundarySigmaPx);

    /// <summary>Junction width σ_j (px): mean flattened intensity I(r) in bins of 0.25 px of the distance r from the nearest
    /// boundary pixel (a pixel with a 4-neighbour of another label) of a segmentation, background I_b = its mean over
    /// r in [0.2, 0.3] D; σ_j = r_½ / √(2 ln 2) with r_½ where I(r) − I_b first falls to half of I(0) − I_b
    /// (half width at half maximum of a Gaussian; docs/segmentation.md#junction-width).</summary>
    public static double JunctionWidth(Mat flat, int[] labels, int w, int h, double d)
    {
        var mask = new byte[labels.Length];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x, l = labels[i];
                bool b = (x + 1 < w && labels[i + 1] != l) || (y + 1 < h && labels[i + w] != l) || (x > 0 && labels[i - 1] != l) || (y > 0 && labels[i - w] != l);
                mask[i] = b ? (byte)0 : (byte)255;
            }
        using var m = new Mat(h, w, MatType.CV_8UC1);
        System.Runtime.InteropServices.Marshal.Copy(mask, 0, m.Data, mask.Length);
        using var dist = new Mat();
        Cv2.DistanceTransform(m, dist, DistanceTypes.L2, DistanceTransformMasks.Precise);
        var dt = ToArray(dist); var f = ToArray(flat);
        const double bin = 0.25;
        int nb = (int)(0.3 * d / bin) + 2;
        var sum = new double[nb]; var cnt = new long[nb];
        for (int i = 0; i < f.Length; i++)
        {
            if (labels[i] == 0) continue;
            int k = (int)(dt[i] / bin);
            if (k < nb) { sum[k] += f[i]; cnt[k]++; }
        }
        double bg = 0; long nbg = 0;
        for (int k = (int)(0.2 * d / bin); k < nb; k++) { bg += sum[k]; nbg += cnt[k]; }
        if (nbg == 0 || cnt[0] == 0) return double.NaN;
        bg /= nbg;
        double peak = sum[0] / cnt[0] - bg;
        if (!(peak > 0)) return double.NaN;
        // Boundary pixels are the pixel centres on either side of the crack between two labels: half a pixel from it.
        double prev = peak, prevR = 0.5;
        for (int k = 1; k < nb; k++)
        {
            if (cnt[k] == 0) continue;
            double v = sum[k] / cnt[k] - bg, r = (k + 0.5) * bin + 0.5;
            if (v <= peak / 2) return (prevR + (prev - peak / 2) / (prev - v) * (r - prevR)) / Math.Sqrt(2 * Math.Log(2));
            prev = v; prevR = r;
        }
        return double.NaN;
    }

    /// <summary>Writes the previous frame's cells shrunk by <paramref name="erodePx"/> into <paramref name="labels"/>; returns where new seeds may go (outside every shrunk cell).</summary>
    private static bool[] TrackedCores(int[] previous, int[] labels, int w, int h, double erodePx)
    {
        var edge = new byte[previous.Length];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x, l = previous[i];
                bool b = l == 0 || (x + 1 < w && previous[i + 1] != l) || (y + 1 < h && previous[i + w] != l) || (x > 0 && previous[i - 1] != l) || (y > 0 && previous[i - w] != l);
                edge[i] = b ? (byte)0 : (byte)255;
            }
        using var m = new Mat(h, w, MatType.CV_8UC1);
        System.Runtime.InteropServices.Marshal.Copy(edge, 0, m.Data, edge.Length);
        using var dist = new Mat();
        Cv2.DistanceTransform(m, dist, DistanceTypes.L2, DistanceTransformMasks.Precise);
        var dt = ToArray(dist);
        var free = new bool[previous.Length];
        for (int i = 0; i < previous.Length; i++)
        {
            if (previous[i] > 0 && dt[i] > erodePx) labels[i] = previous[i];
            else free[i] = true;
        }
        return free;
    }

    /// <summary>The original seeds: pixels equal to the minimum over an elliptical window and below the median level.</summary>
    private static List<int> WindowSeeds(float[] sm, int width, int height, SegmentOptions o, double d)
    {
        int win = Math.Max(3, (int)Math.Round(o.SeedWindowFraction * d)) | 1;
        using var smooth = FromArray(sm, width, height);
        using var kernel = Cv2.GetStructuringElement(MorphShapes.Ellipse, new Size(win, win));
        using var eroded = new Mat();
        Cv2.Erode(smooth, eroded, kernel);
        var er = ToArray(eroded);
        var sorted = (float[])sm.Clone(); Array.Sort(sorted);
        float median = sorted[sorted.Length / 2];
        var seeds = new List<int>();
        for (int i = 0; i < sm.Length; i++) if (sm[i] <= er[i] && sm[i] < median) seeds.Add(i);
        return seeds;
    }

    /// <summary>Gives 8-connected seed pixels one label (OpenCV connected components).</summary>
    private static void GroupSeeds(int[] labels, int width, int height)
    {
        var bytes = new byte[labels.Length];
        for (int i = 0; i < labels.Length; i++) if (labels[i] > 0) bytes[i] = 255;
        using var mask = new Mat(height, width, MatType.CV_8UC1);
        System.Runtime.InteropServices.Marshal.Copy(bytes, 0, mask.Data, bytes.Length);
        using var markers = new Mat();
        Cv2.ConnectedComponents(mask, markers, PixelConnectivity.Connectivity8, MatType.CV_32S);
        System.Runtime.InteropServices.Marshal.Copy(markers.Data, labels, 0, labels.Length);
    }

    /// <summary>Marker-controlled watershed by flooding (see <see cref="Watershed.Flood"/>).</summary>
    public static void Flood(float[] level, int[] labels, int w, int h) => Watershed.Flood(level, labels, w, h);

    private static Mat FromArray(float[] f, int w, int h)
    {
        var m = new Mat(h, w, MatType.CV_32FC1);
        System.Runtime.InteropServices.Marshal.Copy(f, 0, m.Data, f.Length);
        return m;
    }

    /// <summary>Seed of the model fit's sampling for one frame: an FNV-1a hash of its pixel values, so the same frame
    /// gives the same labels and different frames draw different streams.</summary>
    private static int Seed(int[] raw)
    {
        uint hash = 2166136261;
        foreach (var v in raw) hash = (hash ^ (uint)v) * 16777619;
        return (int)(hash & 0x7fffffff);
    }

    private static float[] ToArray(Mat m)
    {
        var f = new float[m.Rows * m.Cols];
        System.Runtime.InteropServices.Marshal.Copy(m.Data, f, 0, f.Length);
        return f;
    }

    /// <summary>Seeds of <see cref="SeedMethod.Laplacian"/>: the h-minima of <see cref="LaplacianOfGaussian"/> at
    /// σ_s = <see cref="SegmentOptions.SeedScaleFraction"/> × D whose dynamic is at least the seed depth times the sd of the
    /// measured white noise <paramref name="noiseSd"/> after that filter.</summary>
    private static List<int> LaplacianSeeds(Mat flat, double noiseSd, SegmentOptions o, bool[]? free)
    {
        var (image, gain) = LaplacianOfGaussian(flat, o.SeedScaleFraction * o.DiameterPx);
        return Watershed.HMinima(image, flat.Width, flat.Height, o.SeedDepth * gain * noiseSd, free);
    }

    /// <summary>The scale-normalised Laplacian of Gaussian with the sign that makes cell interiors minima,
    /// L = −σ² ∇²(G_σ * F) (OpenCV's Gaussian blur, then its 3 x 3 Laplacian), and the sd of L for white noise of unit sd:
    /// the L2 norm of the filter's impulse response (for the continuous filter 1 / (σ √(2π))).</summary>
    /// <remarks>Blob detection by the scale-normalised Laplacian: Lindeberg T. (1998), "Feature detection with automatic
    /// scale selection", Int. J. Comput. Vision 30:79-116; Marr D. and Hildreth E. (1980), Proc. R. Soc. Lond. B 207:187-217.</remarks>
    internal static (float[] Image, double NoiseGain) LaplacianOfGaussian(Mat src, double sigma)
    {
        var image = ScaledLaplacian(src, sigma);
        int half = (int)Math.Ceiling(4 * sigma) + 2, n = 2 * half + 1;
        var delta = new float[n * n];
        delta[half * n + half] = 1;
        using var impulse = FromArray(delta, n, n);
        double ss = 0;
        foreach (float v in ScaledLaplacian(impulse, sigma)) ss += (double)v * v;
        return (image, Math.Sqrt(ss));
    }

    /// <summary>−σ² ∇²(G_σ * <paramref name="src"/>), row-major.</summary>
    private static float[] ScaledLaplacian(Mat src, double sigma)
    {
        using var blurred = new Mat();
        Cv2.GaussianBlur(src, blurred, new Size(0, 0), sigma);
        using var lap = new Mat();
        Cv2.Laplacian(blurred, lap, MatType.CV_32F, 1);
        var a = ToArray(lap);
        for (int i = 0; i < a.Length; i++) a[i] = (float)(-sigma * sigma * a[i]);
        return a;
    }

    private static float[] Blurred(Mat src, double sigma)
    {
        using var b = new Mat();
        Cv2.GaussianBlur(src, b, new Size(0, 0), sigma);
        return ToArray(b);
    }
}
