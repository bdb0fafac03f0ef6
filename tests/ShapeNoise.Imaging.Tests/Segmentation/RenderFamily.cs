using ShapeNoise.Imaging.Segmentation;
using ShapeNoise.Segmentation;
using ShapeNoise.Synthesis;
using ShapeNoise.Outlines;
using ShapeNoise.Reading;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Segmentation;

/// <summary>One member of the render family (docs/segmentation.md#render-family): a monolayer of cells of area-equivalent
/// diameter <paramref name="DiameterPx"/> on a canvas of about <paramref name="CanvasPx"/> px, rendered with the physical
/// junction renderer.</summary>
public sealed record RenderMember(string Name, double DiameterPx, double Snr, double PsfPx, double LineWidthPx,
    double Illumination = 0.3, double Bleach = 0.3, double Haze = 0.2, double Cytoplasm = 0.1, int CanvasPx = 200, int Frames = 4)
{
    public override string ToString() => $"{Name} (D {DiameterPx:0.#} px, SNR {Snr:0.#}, PSF {PsfPx:0.0#} px, line {LineWidthPx:0.#} px, haze {Haze:0.##}, cyto {Cytoplasm:0.##})";

    /// <summary>Whether the acceptance thresholds apply (issue 17: SNR >= 5 and D >= 8 px).</summary>
    public bool Asserted => Snr >= 5 && DiameterPx >= 8;

    public MonolayerMovie Tissue(int seed, int? frames = null)
    {
        double area = Math.PI * DiameterPx * DiameterPx / 4;
        int cells = (int)Math.Round(CanvasPx * CanvasPx / area);
        return MonolayerMovie.Generate(new MonolayerMovieOptions { Cells = cells, Frames = frames ?? Frames, CellAreaPx2 = area, Seed = seed });
    }

    public RawRenderOptions Render(int seed) => new RawRenderOptions
    {
        Snr = Snr, PsfSigmaPx = PsfPx, LineWidthPx = LineWidthPx, Illumination = Illumination, Bleach = Bleach, Haze = Haze, Cytoplasm = Cytoplasm, Seed = seed,
    }.Validated();
}

/// <summary>Scores of one member: SEG and F1 pooled over frames, and the jitter on a static copy.</summary>
public readonly record struct MemberScore(SegmentationScore Score, BoundaryJitter Jitter);

public static class RenderFamily
{
    /// <summary>The CI family: six members spanning line width, PSF, SNR, cell size, haze and cytoplasm.</summary>
    public static readonly RenderMember[] Ci =
    [
        new("base", 14, 8, 1.2, 1),
        new("dim-wide", 14, 5, 2.0, 2, Haze: 0.4),
        new("small", 8, 8, 1.0, 1),
        new("large-thick", 24, 6, 2.5, 3, Haze: 0.5, Cytoplasm: 0.2),
        new("sharp-cyto", 10, 20, 0.8, 1.5, Cytoplasm: 0.3, Illumination: 0.4),
        new("hard", 7.2, 3, 1.5, 1),
    ];

    /// <summary>Held-back seeds: never used while choosing methods or defaults (docs/segmentation.md#render-family).</summary>
    public static readonly int[] HeldBackSeeds = [900, 901, 902, 903, 904, 905];

    /// <summary>Segments every frame of the member's movie (seeded by <paramref name="seed"/>) and pools SEG/F1.</summary>
    public static (SegmentationScore Score, List<int[]> Truth, List<int[]> Segmented, int W, int H) Run(RenderMember m, int seed, SegmentOptions? options = null)
    {
        var movie = m.Tissue(seed);
        var truth = movie.Frames().ToList();
        var ro = m.Render(seed + 7);
        var rng = new Random(ro.Seed);
        var o = options ?? new SegmentOptions();
        o = o with { CellDiameterUm = m.DiameterPx, PixelSizeUm = 1 };
        var seg = new List<int[]>(); var sums = new List<SegmentationScore.Sums>();
        int[]? previous = null;
        var raws = new List<int[]>();
        for (int t = 0; t < truth.Count; t++) raws.Add(JunctionRenderer.Render(truth[t], movie.Width, movie.Height, t, truth.Count, ro, rng));
        bool temporal = Environment.GetEnvironmentVariable("SHAPENOISE_SEG_TEMPORAL") == "1";
        for (int t = 0; t < truth.Count; t++)
        {
            var raw = raws[t];
            if (temporal)
            {
                raw = new int[raws[t].Length];
                for (int i = 0; i < raw.Length; i++)
                {
                    int a = t > 0 ? raws[t - 1][i] : raws[t][i], c = t + 1 < raws.Count ? raws[t + 1][i] : raws[t][i];
                    raw[i] = a + 2 * raws[t][i] + c;
                }
            }
            var s = JunctionSegmenter.Segment(raw, movie.Width, movie.Height, o, previous);
            previous = s;
            seg.Add(s);
            sums.Add(SegmentationScore.Accumulate(truth[t], s));
        }
        return (SegmentationScore.Pool(sums), truth, seg, movie.Width, movie.Height);
    }

    /// <summary>Boundary jitter: the member's first tissue frame held still, rendered <paramref name="frames"/> times with fresh noise and no bleaching.</summary>
    public static BoundaryJitter Jitter(RenderMember m, int seed, int frames = 6, SegmentOptions? options = null)
        => JitterBoth(m, seed, frames, options).Mask;

    private static double Sq(double x) => x * x;

    /// <summary>Midpoint outlines of every cell of a label frame, passed through <paramref name="map"/>.</summary>
    public static Dictionary<int, Point2[]> Outlines(int[] labels, int w, int h, Func<Point2[], Point2[]> map)
    {
        var polys = new Dictionary<int, Point2[]>();
        var scan = LabelScan.Of(new LabelFrame(0, w, h, labels));
        for (int i = 0; i < scan.Boxes.Length; i++)
        {
            var ol = OutlineTracer.Trace(scan.DenseImage, scan.Width, scan.Height, scan.Boxes[i], i + 1, OutlineMethod.Midpoint, 1, 3);
            if (ol.Status == OutlineStatus.Ok) polys[ol.Label] = map(ol.Vertices);
        }
        return polys;
    }

    /// <summary>Jitter of the label masks and of the outlines refined onto the ridge crest (<see cref="RidgeRefinement"/>),
    /// on the same static tissue and noise.</summary>
    public static (BoundaryJitter Mask, BoundaryJitter Refined, double MovedFraction, double MaskErrorPx, double RefinedErrorPx) JitterBoth(RenderMember m, int seed, int frames = 6, SegmentOptions? options = null)
    {
        var movie = m.Tissue(seed, 2);
        var truth = movie.Frames().First();
        var ro = m.Render(seed + 7) with { Bleach = 0 };
        var rng = new Random(ro.Seed);
        var o = (options ?? new SegmentOptions()) with { CellDiameterUm = m.DiameterPx, PixelSizeUm = 1 };
        var seg = new List<int[]>();
        var refined = new List<IReadOnlyDictionary<int, Point2[]>>();
        long moved = 0, total = 0;
        int[]? previous = null;
        for (int t = 0; t < frames; t++)
        {
            var raw = JunctionRenderer.Render(truth, movie.Width, movie.Height, t, frames, ro, rng);
            var sf = JunctionSegmenter.SegmentFrame(raw, movie.Width, movie.Height, o, previous);
            previous = sf.Labels;
            seg.Add(sf.Labels);
            var polys = Outlines(sf.Labels, movie.Width, movie.Height, v =>
            {
                var (r, mv) = RidgeRefinement.Refine(v, sf.RidgeSignal, movie.Width, movie.Height);
                moved += mv; total += r.Length;
                return r;
            });
            refined.Add(polys);
        }
        // Error against the true contact: frames (truth, segmented) of the jitter measure; its frame-to-frame rms is the
        // rms of r_seg - r_truth along the rays (the truth contact is the crack between truth labels: midpoint outline).
        var truthPolys = Outlines(truth, movie.Width, movie.Height, v => v);
        double maskErr = 0, refErr = 0;
        for (int t = 0; t < frames; t++)
        {
            maskErr += Sq(BoundaryJitter.Measure(truth, [truth, seg[t]], movie.Width, movie.Height).FrameToFrameRmsPx);
            refErr += Sq(BoundaryJitter.MeasureOutlines(truth, [truth, seg[t]], [truthPolys, refined[t]], movie.Width, movie.Height).FrameToFrameRmsPx);
        }
        return (BoundaryJitter.Measure(truth, seg, movie.Width, movie.Height),
            BoundaryJitter.MeasureOutlines(truth, seg, refined, movie.Width, movie.Height), total > 0 ? (double)moved / total : 0,
            Math.Sqrt(maskErr / frames), Math.Sqrt(refErr / frames));
    }
}
