using System.Text.Json.Serialization;
using ShapeNoise.Motion;

namespace ShapeNoise.Synthesis;

/// <summary>The prescribed tissue flow that carries the cells of the synthetic monolayer (docs/motion.md#synthetic-flows).</summary>
public enum TissueFlow
{
    /// <summary>Every cell moves at the same velocity, <see cref="MonolayerMovieOptions.FlowSpeedPx"/> (0 = a still tissue).</summary>
    Uniform,
    /// <summary>A flock: the uniform velocity plus a weak incompressible random field (<see cref="PlaneWaveFlow"/>) of rms
    /// <see cref="MonolayerMovieOptions.FlowNoise"/> times the speed, on a periodic canvas.</summary>
    Flock,
    /// <summary>Swirls: an incompressible random field of one wavelength (<see cref="PlaneWaveFlow"/>) of rms speed
    /// <see cref="MonolayerMovieOptions.FlowRmsPx"/>, on a periodic canvas.</summary>
    Swirl,
}

/// <summary>How the +1/2 defect of the synthetic monolayer moves.</summary>
public enum DefectMotion
{
    /// <summary>The +1/2 defect moves along its head direction (the comet's head), at <see cref="MonolayerMovieOptions.DefectSpeedPx"/>.</summary>
    Headward,
    /// <summary>The +1/2 defect moves against its head direction.</summary>
    Tailward,
    /// <summary>The defects stay in place.</summary>
    None,
}

/// <summary>Options of the confluent-monolayer scenario; validated on construction.</summary>
public sealed record MonolayerMovieOptions
{
    /// <summary>Number of cells (Voronoi seeds) on the canvas.</summary>
    public int Cells { get; init; } = 600;
    /// <summary>Number of frames.</summary>
    public int Frames { get; init; } = 60;
    /// <summary>Mean cell area (px^2).</summary>
    public double CellAreaPx2 { get; init; } = 250;
    /// <summary>Aspect ratio of the cells' metric ellipse (length over width along the director).</summary>
    public double Aspect { get; init; } = 2.0;
    /// <summary>Distance between the +1/2 and the -1/2 defect at frame 0, as a fraction of the canvas width.</summary>
    public double Separation { get; init; } = 0.35;
    /// <summary>How the +1/2 defect moves: along its head direction, against it, or not at all.</summary>
    public DefectMotion Motion { get; init; } = DefectMotion.Headward;
    /// <summary>Speed of the +1/2 defect (px per frame).</summary>
    public double DefectSpeedPx { get; init; } = 0.4;
    /// <summary>Uniform flow carrying every cell (px per frame).</summary>
    public double FlowSpeedPx { get; init; }
    /// <summary>Direction of the flow relative to the +1/2 defect's head direction (degrees; 0 = headward).</summary>
    public double FlowAngleDeg { get; init; }
    /// <summary>Kind of tissue flow: uniform (default, at <see cref="FlowSpeedPx"/>), flock or swirl (docs/motion.md#synthetic-flows).</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public TissueFlow Flow { get; init; }
    /// <summary>Flock only: rms speed of the noise field relative to <see cref="FlowSpeedPx"/>; null = <see cref="DefaultFlowNoise"/>.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? FlowNoise { get; init; }
    /// <summary>Swirl only: rms speed of the field about its frame mean (px/frame); null = <see cref="DefaultFlowRmsPx"/>.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? FlowRmsPx { get; init; }
    /// <summary>Flock and swirl: wavelength 2 pi / k of the random field (px); null = <see cref="DefaultFlowWavelengthDiameters"/>
    /// cell diameters 2 sqrt(area / pi).</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? FlowWavelengthPx { get; init; }
    /// <summary>Flock and swirl: correlation time of the random field at a fixed point (frames); null = <see cref="DefaultFlowTauFrames"/>.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? FlowTauFrames { get; init; }
    /// <summary>Correlation time of the shape noise across the long axis (B) in frames; null = <see cref="TauFrames"/> (which
    /// then sets both; docs/sim-params.md#monolayer-round-trip).</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? TauAcrossFrames { get; init; }

    /// <summary>Default <see cref="FlowNoise"/>: the flock's noise rms is 0.3 of its speed (polar order about 1 - 0.3^2 / 4 = 0.98).</summary>
    public const double DefaultFlowNoise = 0.3;
    /// <summary>Default <see cref="FlowRmsPx"/> (px/frame): cells move a fraction of their radius per frame.</summary>
    public const double DefaultFlowRmsPx = 0.4;
    /// <summary>Default <see cref="FlowWavelengthPx"/> in cell diameters.</summary>
    public const double DefaultFlowWavelengthDiameters = 9;
    /// <summary>Default <see cref="FlowTauFrames"/> (frames).</summary>
    public const double DefaultFlowTauFrames = 20;
    /// <summary>Number of plane waves of the flock's and the swirl's random field.</summary>
    public const int FlowWaves = 32;
    /// <summary>The flow's wavelength in effect (px).</summary>
    public double WavelengthPx => FlowWavelengthPx ?? DefaultFlowWavelengthDiameters * 2 * Math.Sqrt(CellAreaPx2 / Math.PI);
    /// <summary>Canvas width and height; 0 = square, just large enough for the cells.</summary>
    public int Width { get; init; }
    /// <summary>Canvas height (px); 0 = square, just large enough for the cells (see <see cref="Width"/>).</summary>
    public int Height { get; init; }
    /// <summary>Relative standard deviation of each cell's metric length A (shape noise along the long axis).</summary>
    public double SigmaAlong { get; init; } = 0.12;
    /// <summary>Relative standard deviation of each cell's metric width B (shape noise across the long axis).</summary>
    public double SigmaAcross { get; init; } = 0.06;
    /// <summary>Correlation time of the shape noise (frames).</summary>
    public double TauFrames { get; init; } = 5;
    /// <summary>Spatial correlation length of the shape noise (px): each seed's innovation is the Gaussian-kernel
    /// (exp(-d^2 / 2 l^2)) weighted sum of iid innovations of all seeds, normalised to unit variance; 0 = independent seeds.</summary>
    public double NoiseCorrelationPx { get; init; }
    /// <summary>Pixel size written into the movie's metadata (µm per px).</summary>
    public double PixelSizeUm { get; init; } = 0.5;
    /// <summary>Frame interval written into the movie's metadata (min).</summary>
    public double FrameIntervalMin { get; init; } = 5;
    /// <summary>Seed of every random draw of the scenario; the same seed gives the same movie.</summary>
    public int Seed { get; init; } = 11;
    /// <summary>Number of +1/2 / -1/2 defect pairs, one per tile of a grid over the canvas. With more than one pair the
    /// tissue is cut into regions (cells belong to the nearest +1/2 core) whose shape-noise anisotropy differs, and each
    /// +1/2 moves at a signed headward speed set by <see cref="SpeedFollowsAnisotropy"/> (docs/defects.md#many-defect-tissue).</summary>
    public int Pairs { get; init; } = 1;
    /// <summary>With several pairs: true = each +1/2's signed headward speed is <see cref="DefectSpeedPx"/> z_k, with z_k in
    /// [-1, 1] the standardised log anisotropy level of its region (the shape-noise hypothesis holds); false = the same
    /// speeds assigned by an independent random permutation (speed independent of anisotropy).</summary>
    public bool SpeedFollowsAnisotropy { get; init; } = true;
    /// <summary>With several pairs: region k scales sigma_along by G^(z_k / 2) and sigma_across by G^(-z_k / 2), so its
    /// variance ratio var_L / var_W is multiplied by G^(2 z_k); G is this spread (1 = every region alike).</summary>
    public double AnisotropySpread { get; init; } = 1.6;

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public MonolayerMovieOptions Validated()
    {
        if (Cells < 20) throw new ArgumentException($"--cells must be >= 20 (got {Cells})");
        if (Frames < 2) throw new ArgumentException($"--frames must be >= 2 (got {Frames})");
        if (!(CellAreaPx2 >= 40)) throw new ArgumentException($"--cell-area must be >= 40 px^2 (got {CellAreaPx2})");
        if (!(Aspect >= 1 && Aspect <= 5)) throw new ArgumentException($"--aspect must be in [1, 5] (got {Aspect})");
        if (!(Separation > 0.1 && Separation < 0.7)) throw new ArgumentException($"--separation must be in (0.1, 0.7) (got {Separation})");
        if (SigmaAlong < 0 || SigmaAcross < 0 || SigmaAlong > 0.3 || SigmaAcross > 0.3) throw new ArgumentException("--sigma-along and --sigma-across must be in [0, 0.3] (relative)");
        if (!(TauFrames > 0)) throw new ArgumentException("--tau must be > 0 frames");
        if (!(NoiseCorrelationPx >= 0)) throw new ArgumentException($"--noise-correlation must be >= 0 px (got {NoiseCorrelationPx})");
        if (DefectSpeedPx < 0 || FlowSpeedPx < 0) throw new ArgumentException("--defect-speed and --flow-speed must be >= 0");
        if (!(PixelSizeUm > 0) || !(FrameIntervalMin > 0)) throw new ArgumentException("--pixel-size and --frame-interval must be > 0");
        if (Pairs < 1 || Pairs > 64) throw new ArgumentException($"--pairs must be in [1, 64] (got {Pairs})");
        if (Pairs > 1 && Motion != DefectMotion.Headward) throw new ArgumentException("--motion applies to a single pair; with --pairs > 1 every +1/2 moves at its region's speed (see --hypothesis)");
        if (Pairs > 1 && FlowSpeedPx != 0) throw new ArgumentException("--flow-speed applies to a single pair (the many-pair field is not periodic)");
        if (!(AnisotropySpread >= 1 && AnisotropySpread <= 4)) throw new ArgumentException($"--anisotropy-spread must be in [1, 4] (got {AnisotropySpread})");
        if (TauAcrossFrames is { } tb && !(tb > 0)) throw new ArgumentException("the correlation time across the long axis must be > 0 frames");
        ValidateFlow();
        return this;
    }

    private void ValidateFlow()
    {
        if (Flow == TissueFlow.Uniform)
        {
            if (FlowNoise is not null || FlowRmsPx is not null || FlowWavelengthPx is not null || FlowTauFrames is not null)
                throw new ArgumentException("--flow-noise, --flow-rms, --flow-wavelength and --flow-tau apply to --flow flock or swirl");
            return;
        }
        string kind = Flow.ToString().ToLowerInvariant();
        if (Pairs > 1) throw new ArgumentException($"--flow {kind} applies to a single pair");
        if (Flow == TissueFlow.Flock && !(FlowSpeedPx > 0)) throw new ArgumentException("--flow flock needs --flow-speed > 0 (px per frame)");
        if (Flow == TissueFlow.Swirl && FlowSpeedPx != 0) throw new ArgumentException("--flow swirl takes its speed from --flow-rms, not --flow-speed");
        if (Flow == TissueFlow.Swirl && FlowNoise is not null) throw new ArgumentException("--flow-noise applies to --flow flock");
        if (Flow == TissueFlow.Flock && FlowRmsPx is not null) throw new ArgumentException("--flow-rms applies to --flow swirl (the flock's noise is --flow-noise)");
        if (FlowNoise is { } n && !(n >= 0 && n <= 1)) throw new ArgumentException($"--flow-noise must be in [0, 1] (got {n})");
        if (FlowRmsPx is { } r && !(r > 0 && r <= 5)) throw new ArgumentException($"--flow-rms must be in (0, 5] px per frame (got {r})");
        double d = 2 * Math.Sqrt(CellAreaPx2 / Math.PI);
        if (FlowWavelengthPx is { } l && !(l >= 2 * d)) throw new ArgumentException($"--flow-wavelength must be >= 2 cell diameters ({2 * d:F1} px; got {l})");
        if (FlowTauFrames is { } t && !(t > 0)) throw new ArgumentException($"--flow-tau must be > 0 frames (got {t})");
    }
}

/// <summary>Prescribed truth of the monolayer scenario, per frame (px, frames). The single-pair fields describe pair 0.</summary>
public sealed record MonolayerTruth(double[] PlusX, double[] PlusY, double[] MinusX, double[] MinusY, double HeadX, double HeadY,
    double DefectHeadwardSpeedPx, double FlowVx, double FlowVy, double FlowHeadwardSpeedPx, double ThetaOffset, int Cells)
{
    /// <summary>Every +1/2 defect (one per pair), with its path, head direction per frame, speed and region anisotropy.</summary>
    public IReadOnlyList<PlusDefectTruth> Plus { get; init; } = [];
    /// <summary>Every -1/2 defect's (fixed) position (px).</summary>
    public IReadOnlyList<(double X, double Y)> Minus { get; init; } = [];
}

/// <summary>One frame of the cells (Voronoi seeds, index i stable over frames): seed position (px), the velocity the
/// imposed flow gives it at that position in that frame (px/frame; the step it takes to the next frame before relaxation),
/// and the label id it is drawn with.</summary>
public sealed record CellFrame(double[] X, double[] Y, double[] Vx, double[] Vy, int[] Label);

/// <summary>Realised truth of the imposed flow (docs/motion.md#synthetic-flows), px and frames.</summary>
/// <param name="Kind">The flow kind.</param>
/// <param name="PolarOrder">Mean over frames of |sum_i v_i| / sum_i |v_i| over the cells' imposed velocities.</param>
/// <param name="MeanSpeedPx">Mean over frames of the cells' mean |v_i|.</param>
/// <param name="RmsSpeedPx">sqrt(mean over frames of the cells' mean |v_i - frame mean|^2).</param>
/// <param name="FieldRmsSpeedPx">The same rms of the field on the truth grid (pooled over frames): what the amplitude was set to.</param>
/// <param name="Correlation">C_vv(r) of the field on the truth grid, the mean over up to 8 evenly spaced frames.</param>
/// <param name="FirstZeroPx">First zero crossing of <paramref name="Correlation"/> (px; NaN if none).</param>
/// <param name="OneOverEPx">Where <paramref name="Correlation"/> first falls to 1/e (px; NaN if none).</param>
/// <param name="AnalyticFirstZeroPx">2.405 / k, J0's first zero (px; NaN for a uniform flow).</param>
/// <param name="WavelengthPx">Wavelength of the random field (px; NaN for a uniform flow).</param>
/// <param name="GridSpacingPx">Spacing of the truth grid (px).</param>
/// <param name="TauFrames">Correlation time of the random field (frames; NaN for a uniform flow).</param>
/// <param name="RealisedPolarOrder">Polar order of the seeds' actual steps x_i(t + 1) - x_i(t) (imposed flow plus relaxation), mean over frames.</param>
/// <param name="RealisedRmsSpeedPx">Rms about the frame mean of the seeds' actual steps (px/frame).</param>
/// <param name="FollowSlope">sum d_i . v_i / sum v_i . v_i over cells and frames: how much of the imposed velocity the seeds' steps d realise.</param>
public sealed record FlowTruth(TissueFlow Kind, double PolarOrder, double MeanSpeedPx, double RmsSpeedPx, double FieldRmsSpeedPx,
    RadialCorrelation Correlation, double FirstZeroPx, double OneOverEPx, double AnalyticFirstZeroPx, double WavelengthPx,
    double GridSpacingPx, double TauFrames, double RealisedPolarOrder, double RealisedRmsSpeedPx, double FollowSlope);

/// <summary>One prescribed +1/2 defect: position and unit head direction per frame (px), signed headward speed (px/frame),
/// and its region's shape-noise level z in [-1, 1] with the factor G^(2 z) on var_L / var_W.</summary>
public sealed record PlusDefectTruth(double[] X, double[] Y, double[] HeadX, double[] HeadY, double HeadwardSpeedPx, double Level, double AnisotropyFactor);

/// <summary>
/// A confluent tissue (every pixel belongs to a cell) whose cells are elongated along a prescribed director field that
/// holds a +1/2 / -1/2 defect pair. Our own generator:
/// <list type="number">
/// <item>Director: theta(x) = phi_+(x)/2 - phi_-(x)/2 + pi/2, with phi_+- the polar angles about the two cores, so the
/// +1/2 comet's head points away from the -1/2 (along -x).</item>
/// <item>Cells: an anisotropic centroidal Voronoi tessellation. Each seed carries the metric
/// M = R(theta) diag(1/A^2, 1/B^2) R(theta)^T of the director at its position (A/B = aspect, A B fixed by the cell area);
/// every pixel joins the seed nearest in that seed's metric; seeds start from dart throwing with an anisotropic exclusion
/// and are relaxed to the centroids of their cells (Lloyd's algorithm), so cells pack as ellipses aligned with the field.</item>
/// <item>Shape noise: each seed's A and B are scaled by 1 + sigma x(t) with x an independent unit-variance AR(1) process
/// (correlation time tau), so cells fluctuate along and across their long axis.</item>
/// <item>Motion: each frame the +1/2 core moves by the chosen speed along (headward) or against (tailward) its head, every
/// seed is carried by the uniform flow, and two Lloyd steps let the packing follow the moving field.</item>
/// </list>
/// Label ids are redrawn every frame.
/// </summary>
/// <remarks>Lloyd S.P. (1982), "Least squares quantization in PCM", IEEE Trans. Inf. Theory 28:129-137; anisotropic
/// centroidal Voronoi tessellations: Du Q. and Wang D. (2005), "Anisotropic centroidal Voronoi tessellations and their
/// applications", SIAM J. Sci. Comput. 26:737-761.</remarks>
public sealed class MonolayerMovie
{
    /// <summary>The validated options the movie was generated with.</summary>
    public MonolayerMovieOptions Options { get; }
    /// <summary>Canvas width (px).</summary>
    public int Width { get; }
    /// <summary>Canvas height (px).</summary>
    public int Height { get; }
    /// <summary>The prescribed truth of this draw (defect positions per frame, head direction, defect and flow speeds, seed count), for recovery tests.</summary>
    public MonolayerTruth Truth { get; }
    private readonly double _a, _b;
    private double[]? _noiseA, _noiseB;   // per-seed shape noise of the frame being generated (null while seeding)
    private List<(double X, double Y)> _initial = [];
    private readonly PlaneWaveFlow? _flow;
    private readonly List<CellFrame> _cells = [];
    /// <summary>J0's first zero (Abramowitz and Stegun, table 9.5).</summary>
    public const double BesselJ0FirstZero = 2.404825557695773;
    /// <summary>Lloyd steps per frame that let the packing follow the moving field.</summary>
    public const int RelaxStepsPerFrame = 4;
    /// <summary>Lloyd steps per frame with a flock or a swirl, each with its smooth part removed (<see cref="RemoveSmoothPart"/>).</summary>
    public const int FlowRelaxStepsPerFrame = 2;

    private MonolayerMovie(MonolayerMovieOptions o, int w, int h, MonolayerTruth truth, double a, double b, PlaneWaveFlow? flow)
    { Options = o; Width = w; Height = h; Truth = truth; _a = a; _b = b; _flow = flow; }

    /// <summary>The random field of a flock or a swirl (null for a uniform flow).</summary>
    public PlaneWaveFlow? FlowField => _flow;

    /// <summary>Every frame's cells with their imposed velocities, filled while <see cref="Frames"/> is enumerated.</summary>
    public IReadOnlyList<CellFrame> CellFrames => _cells;

    /// <summary>The imposed velocity at (x, y) in frame t (px/frame): the uniform flow U, plus the random field for a flock or a swirl.</summary>
    public (double Vx, double Vy) Velocity(int t, double x, double y) => Velocity(_flow, Truth.FlowVx, Truth.FlowVy, t, x, y);

    private static (double Vx, double Vy) Velocity(PlaneWaveFlow? flow, double ux, double uy, int t, double x, double y)
    {
        if (flow is null) return (ux, uy);
        var (vx, vy) = flow.Velocity(t, x, y);
        return (ux + vx, uy + vy);
    }

    /// <summary>Validates <paramref name="o"/>, lays out the defect trajectories and the uniform flow, and seeds the packing
    /// (dart throwing, then 10 Lloyd steps in the anisotropic metric); frames are rendered on demand.</summary>
    public static MonolayerMovie Generate(MonolayerMovieOptions o)
    {
        o.Validated();
        int side = (int)Math.Ceiling(Math.Sqrt(o.Cells * o.CellAreaPx2));
        int w = o.Width > 0 ? o.Width : side, h = o.Height > 0 ? o.Height : side;
        // Hexagonal packing at unit metric spacing has 0.866 units of area per seed, so A B = area / 0.866.
        double ab = o.CellAreaPx2 / 0.866, b = Math.Sqrt(ab / o.Aspect), a = o.Aspect * b;
        if (o.Pairs > 1) return Seed(o, w, h, a, b, ManyPairs(o, w, h), null);
        double d = o.Separation * w, x0 = 0.5 * w - 0.5 * d, y0 = 0.5 * h;
        double headX = -1, headY = 0;                           // theta offset pi/2 puts the head at -x (see the class summary)
        double sgn = o.Motion switch { DefectMotion.Headward => 1, DefectMotion.Tailward => -1, _ => 0 };
        var px = new double[o.Frames]; var py = new double[o.Frames]; var mx = new double[o.Frames]; var my = new double[o.Frames];
        double fa = o.FlowAngleDeg * Math.PI / 180;
        double fvx = o.FlowSpeedPx * (Math.Cos(fa) * headX - Math.Sin(fa) * headY), fvy = o.FlowSpeedPx * (Math.Sin(fa) * headX + Math.Cos(fa) * headY);
        var flow = o.Flow == TissueFlow.Uniform ? null : FlowFieldOf(o, w, h);
        for (int t = 0; t < o.Frames; t++)
        {
            if (flow is null || t == 0)
            {
                px[t] = x0 + sgn * o.DefectSpeedPx * t * headX; py[t] = y0;
                mx[t] = x0 + d; my[t] = y0;
                continue;
            }
            // Flock or swirl: both cores are carried by the flow where they are (defects fixed in the tissue), the +1/2 also
            // moves by its own speed along its head (docs/motion.md#synthetic-flows).
            var (pvx, pvy) = Velocity(flow, fvx, fvy, t - 1, Mod(px[t - 1], w), Mod(py[t - 1], h));
            var (mvx, mvy) = Velocity(flow, fvx, fvy, t - 1, Mod(mx[t - 1], w), Mod(my[t - 1], h));
            px[t] = px[t - 1] + sgn * o.DefectSpeedPx * headX + pvx; py[t] = py[t - 1] + sgn * o.DefectSpeedPx * headY + pvy;
            mx[t] = mx[t - 1] + mvx; my[t] = my[t - 1] + mvy;
        }
        var truth = new MonolayerTruth(px, py, mx, my, headX, headY, sgn * o.DefectSpeedPx, fvx, fvy, fvx * headX + fvy * headY, Math.PI / 2, 0)
        {
            Plus = [new PlusDefectTruth(px, py, Fill(o.Frames, headX), Fill(o.Frames, headY), sgn * o.DefectSpeedPx, 0, 1)],
            Minus = [(mx[0], my[0])],
        };
        return Seed(o, w, h, a, b, truth, flow);
    }

    private static double Mod(double v, int size) => v - size * Math.Floor(v / size);

    /// <summary>The truth grid of a flow: spacing h = max(1, wavelength / 24) px, covering the canvas up to 6 wavelengths a side.</summary>
    public static (int Nx, int Ny, double SpacingPx) TruthGrid(MonolayerMovieOptions o, int width, int height)
    {
        double lambda = o.WavelengthPx, hs = Math.Max(1, lambda / 24);
        return (Math.Max(2, (int)(Math.Min(width, 6 * lambda) / hs)), Math.Max(2, (int)(Math.Min(height, 6 * lambda) / hs)), hs);
    }

    /// <summary>The flock's noise field or the swirl's field: <see cref="MonolayerMovieOptions.FlowWaves"/> plane waves
    /// (seed + 3), the amplitude set so the rms speed about the frame mean on the truth grid, pooled over frames, is the
    /// flock's noise (FlowNoise x FlowSpeedPx) or the swirl's FlowRmsPx.</summary>
    private static PlaneWaveFlow FlowFieldOf(MonolayerMovieOptions o, int w, int h)
    {
        var f = PlaneWaveFlow.Create(MonolayerMovieOptions.FlowWaves, o.WavelengthPx, o.FlowTauFrames ?? MonolayerMovieOptions.DefaultFlowTauFrames, o.Frames, o.Seed + 3);
        double target = o.Flow == TissueFlow.Flock ? (o.FlowNoise ?? MonolayerMovieOptions.DefaultFlowNoise) * o.FlowSpeedPx : o.FlowRmsPx ?? MonolayerMovieOptions.DefaultFlowRmsPx;
        if (target == 0) return f.Scaled(0);
        var (nx, ny, hs) = TruthGrid(o, w, h);
        return f.Scaled(target / f.GridRmsSpeed(nx, ny, hs));
    }

    private static double[] Fill(int n, double v) { var r = new double[n]; Array.Fill(r, v); return r; }

    /// <summary>Dart throwing and 10 Lloyd steps in the anisotropic metric of frame 0.</summary>
    private static MonolayerMovie Seed(MonolayerMovieOptions o, int w, int h, double a, double b, MonolayerTruth truth, PlaneWaveFlow? flow)
    {
        var movie = new MonolayerMovie(o, w, h, truth, a, b, flow);
        var rng = new Random(o.Seed);
        var seeds = movie.DartThrow(rng, 0);
        var owner = new int[w * h];
        for (int it = 0; it < 10; it++) { movie.Assign(seeds, 0, owner); movie.Relax(seeds, owner); }
        return new MonolayerMovie(o, w, h, truth with { Cells = seeds.Count }, a, b, flow) { _initial = seeds };
    }

    /// <summary>Director angle of the prescribed field at (x, y) in frame t:
    /// theta = sum_k phi(x - p_k) / 2 - sum_k phi(x - m_k) / 2 + pi/2 over the +1/2 cores p_k and -1/2 cores m_k.</summary>
    public double Director(int t, double x, double y)
    {
        if (Truth.Plus.Count <= 1)
            return 0.5 * Math.Atan2(y - Truth.PlusY[t], x - Truth.PlusX[t]) - 0.5 * Math.Atan2(y - Truth.MinusY[t], x - Truth.MinusX[t]) + Truth.ThetaOffset;
        return Field(Truth.Plus, Truth.Minus, t, x, y, -1);
    }

    /// <summary>The many-pair director at (x, y) in frame t, leaving out the +1/2 core <paramref name="skip"/> (-1 = none).</summary>
    private static double Field(IReadOnlyList<PlusDefectTruth> plus, IReadOnlyList<(double X, double Y)> minus, int t, double x, double y, int skip)
    {
        double th = Math.PI / 2;
        for (int k = 0; k < plus.Count; k++) if (k != skip) th += 0.5 * Math.Atan2(y - plus[k].Y[t], x - plus[k].X[t]);
        for (int k = 0; k < minus.Count; k++) th -= 0.5 * Math.Atan2(y - minus[k].Y, x - minus[k].X);
        return th;
    }

    /// <summary>
    /// The many-pair layout (docs/defects.md#many-defect-tissue): one pair per tile of a near-square grid, the +1/2 at 0.3 and
    /// the -1/2 at 0.7 of the tile width (jittered by 5 % of the tile); region levels z_k evenly spaced in [-1, 1] and
    /// shuffled; speeds v_k = speed z_k (or z of an independent permutation). Near core k the field is phi_k / 2 + c_k with
    /// c_k the rest of the sum at the core, so the comet's head points at angle pi + 2 c_k (c = 0 gives the single pair's
    /// head at -x); each frame every +1/2 steps by v_k along its head of the previous frame, and the -1/2 stay put.
    /// </summary>
    private static MonolayerTruth ManyPairs(MonolayerMovieOptions o, int w, int h)
    {
        int k = o.Pairs, nx = Math.Max(1, (int)Math.Round(Math.Sqrt(k * (double)w / h))), ny = (k + nx - 1) / nx;
        double tw = w / (double)nx, th = h / (double)ny;
        var rng = new Random(o.Seed + 7);
        var level = new double[k];
        for (int i = 0; i < k; i++) level[i] = k == 1 ? 0 : -1 + 2.0 * i / (k - 1);
        rng.Shuffle(level);
        var speedLevel = (double[])level.Clone();
        if (!o.SpeedFollowsAnisotropy) rng.Shuffle(speedLevel);
        var minus = new List<(double X, double Y)>();
        var px = new double[k][]; var py = new double[k][]; var hx = new double[k][]; var hy = new double[k][];
        for (int i = 0; i < k; i++)
        {
            int cx = i % nx, cy = i / nx;
            double jx = (rng.NextDouble() - 0.5) * 0.1 * tw, jy = (rng.NextDouble() - 0.5) * 0.1 * th;
            double yc = (cy + 0.5) * th + jy, half = 0.5 * o.Separation * tw;
            px[i] = new double[o.Frames]; py[i] = new double[o.Frames]; hx[i] = new double[o.Frames]; hy[i] = new double[o.Frames];
            px[i][0] = (cx + 0.5) * tw - half + jx; py[i][0] = yc;
            minus.Add(((cx + 0.5) * tw + half + jx, yc));
        }
        var plus = new PlusDefectTruth[k];
        for (int i = 0; i < k; i++)
            plus[i] = new PlusDefectTruth(px[i], py[i], hx[i], hy[i], o.DefectSpeedPx * speedLevel[i], level[i], Math.Pow(o.AnisotropySpread, 2 * level[i]));
        for (int t = 0; t < o.Frames; t++)
        {
            for (int i = 0; i < k; i++)
            {
                if (t > 0) { px[i][t] = px[i][t - 1] + plus[i].HeadwardSpeedPx * hx[i][t - 1]; py[i][t] = py[i][t - 1] + plus[i].HeadwardSpeedPx * hy[i][t - 1]; }
            }
            for (int i = 0; i < k; i++)
            {
                double head = Math.PI + 2 * Field(plus, minus, t, px[i][t], py[i][t], i);
                hx[i][t] = Math.Cos(head); hy[i][t] = Math.Sin(head);
            }
        }
        var m0 = minus[0];
        return new MonolayerTruth(px[0], py[0], Fill(o.Frames, m0.X), Fill(o.Frames, m0.Y), hx[0][0], hy[0][0], plus[0].HeadwardSpeedPx, 0, 0, 0, Math.PI / 2, 0)
        { Plus = plus, Minus = minus };
    }

    /// <summary>The frames in order (the tessellation evolves, so frames are produced sequentially).</summary>
    public IEnumerable<int[]> Frames()
    {
        var o = Options;
        var rng = new Random(o.Seed + 1);
        var seeds = new List<(double X, double Y)>(_initial);
        var owner = new int[Width * Height];
        double rho = Math.Exp(-1 / o.TauFrames), innov = Math.Sqrt(1 - rho * rho);
        double rhoB = o.TauAcrossFrames is { } tb ? Math.Exp(-1 / tb) : rho, innovB = Math.Sqrt(1 - rhoB * rhoB);
        _cells.Clear();
        _noiseA = new double[seeds.Count]; _noiseB = new double[seeds.Count];
        for (int i = 0; i < seeds.Count; i++) { _noiseA[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1); _noiseB[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1); }
        if (o.NoiseCorrelationPx > 0) { Smooth(seeds, _noiseA, o.NoiseCorrelationPx); Smooth(seeds, _noiseB, o.NoiseCorrelationPx); }
        for (int t = 0; t < o.Frames; t++)
        {
            if (t > 0)
            {
                if (o.NoiseCorrelationPx > 0)
                {
                    var ea = new double[seeds.Count]; var eb = new double[seeds.Count];
                    for (int i = 0; i < seeds.Count; i++) { ea[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1); eb[i] = MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1); }
                    Smooth(seeds, ea, o.NoiseCorrelationPx); Smooth(seeds, eb, o.NoiseCorrelationPx);
                    for (int i = 0; i < seeds.Count; i++) { _noiseA[i] = rho * _noiseA[i] + innov * ea[i]; _noiseB[i] = rhoB * _noiseB[i] + innovB * eb[i]; }
                }
                else
                for (int i = 0; i < seeds.Count; i++)
                {
                    _noiseA[i] = rho * _noiseA[i] + innov * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                    _noiseB[i] = rhoB * _noiseB[i] + innovB * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
                }
                for (int i = 0; i < seeds.Count; i++)
                {
                    var (x, y) = seeds[i];
                    var (vx, vy) = Velocity(t - 1, x, y);
                    x = Wrap(x + vx, Width); y = Wrap(y + vy, Height);
                    seeds[i] = (x, y);
                }
                for (int it = 0; it < (_flow is null ? RelaxStepsPerFrame : FlowRelaxStepsPerFrame); it++) { Assign(seeds, t, owner); Relax(seeds, owner); }
            }
            Assign(seeds, t, owner);
            var ids = new int[seeds.Count];
            var used = new HashSet<int>();
            for (int i = 0; i < ids.Length; i++) { int id; do id = 1 + rng.Next(65535); while (!used.Add(id)); ids[i] = id; }
            var img = new int[owner.Length];
            for (int p = 0; p < owner.Length; p++) img[p] = ids[owner[p]];
            Record(seeds, t, ids);
            yield return img;
        }
    }

    private void Record(List<(double X, double Y)> seeds, int t, int[] ids)
    {
        int n = seeds.Count;
        var f = new CellFrame(new double[n], new double[n], new double[n], new double[n], (int[])ids.Clone());
        for (int i = 0; i < n; i++)
        {
            (f.X[i], f.Y[i]) = seeds[i];
            (f.Vx[i], f.Vy[i]) = Velocity(t, f.X[i], f.Y[i]);
        }
        _cells.Add(f);
    }

    /// <summary>The realised truth of the imposed flow from the cells' velocities of every frame and the field on the truth
    /// grid (docs/motion.md#synthetic-flows). Needs <see cref="Frames"/> enumerated to the end.</summary>
    /// <exception cref="InvalidOperationException">The frames have not all been generated.</exception>
    public FlowTruth FlowStatistics()
    {
        var o = Options;
        if (_cells.Count != o.Frames) throw new InvalidOperationException("generate every frame (Frames()) before the flow truth");
        double phi = 0, ms = 0, mean = 0;
        foreach (var f in _cells)
        {
            phi += VelocityFieldStatistics.PolarOrder(f.Vx, f.Vy);
            double r = VelocityFieldStatistics.RmsSpeed(f.Vx, f.Vy);
            ms += r * r; mean += VelocityFieldStatistics.MeanSpeed(f.Vx, f.Vy);
        }
        int T = o.Frames;
        var (nx, ny, hs) = TruthGrid(o, Width, Height);
        int bins = Math.Max(2, Math.Min(Math.Min(nx, ny) / 2, (int)(2 * o.WavelengthPx / hs) + 1)), samples = Math.Min(8, T);
        var sumC = new double[bins]; var count = new int[bins]; var pairs = new long[bins]; double[] r0 = [];
        double fieldMs = 0;
        for (int q = 0; q < samples; q++)
        {
            int t = samples == 1 ? 0 : (int)Math.Round(q * (T - 1) / (double)(samples - 1));
            var (vx, vy) = GridVelocity(t, nx, ny, hs);
            var c = VelocityFieldStatistics.VelocityCorrelation(nx, ny, hs, vx, vy, default, bins);
            r0 = c.R;
            for (int b = 0; b < bins; b++)
            {
                pairs[b] += c.Pairs[b];
                if (double.IsFinite(c.C[b])) { sumC[b] += c.C[b]; count[b]++; }
            }
        }
        for (int t = 0; t < T; t++)
        {
            var (vx, vy) = GridVelocity(t, nx, ny, hs);
            double r = VelocityFieldStatistics.RmsSpeed(vx, vy);
            fieldMs += r * r;
        }
        var (rPhi, rRms, slope) = Realised();
        var meanC = new double[bins];
        for (int b = 0; b < bins; b++) meanC[b] = count[b] > 0 ? sumC[b] / count[b] : double.NaN;
        var corr = new RadialCorrelation(r0, meanC, pairs);
        double k = _flow?.WavenumberPerPx ?? double.NaN;
        return new FlowTruth(o.Flow, phi / T, mean / T, Math.Sqrt(ms / T), Math.Sqrt(fieldMs / T), corr,
            VelocityFieldStatistics.FirstZero(corr), VelocityFieldStatistics.CrossingOf(corr, 1 / Math.E), BesselJ0FirstZero / k,
            _flow is null ? double.NaN : o.WavelengthPx, hs, _flow is null ? double.NaN : o.FlowTauFrames ?? MonolayerMovieOptions.DefaultFlowTauFrames,
            rPhi, rRms, slope);
    }

    /// <summary>Polar order and rms (about the frame mean) of the seeds' actual steps (nearest periodic image), mean over the
    /// T - 1 steps, and the regression slope sum d.v / sum v.v of the steps on the imposed velocities.</summary>
    private (double PolarOrder, double RmsPx, double Slope) Realised()
    {
        double phi = 0, ms = 0, dv = 0, vv = 0; int steps = _cells.Count - 1;
        if (steps < 1) return (double.NaN, double.NaN, double.NaN);
        for (int t = 0; t < steps; t++)
        {
            var a = _cells[t]; var b = _cells[t + 1]; int n = a.X.Length;
            var dx = new double[n]; var dy = new double[n];
            for (int i = 0; i < n; i++)
            {
                dx[i] = _flow is null ? b.X[i] - a.X[i] : MinImage(b.X[i] - a.X[i], Width);
                dy[i] = _flow is null ? b.Y[i] - a.Y[i] : MinImage(b.Y[i] - a.Y[i], Height);
                dv += dx[i] * a.Vx[i] + dy[i] * a.Vy[i]; vv += a.Vx[i] * a.Vx[i] + a.Vy[i] * a.Vy[i];
            }
            phi += VelocityFieldStatistics.PolarOrder(dx, dy);
            double r = VelocityFieldStatistics.RmsSpeed(dx, dy);
            ms += r * r;
        }
        return (phi / steps, Math.Sqrt(ms / steps), vv > 0 ? dv / vv : double.NaN);
    }

    private (double[] Vx, double[] Vy) GridVelocity(int t, int nx, int ny, double hs)
    {
        var vx = new double[nx * ny]; var vy = new double[nx * ny];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++) (vx[j * nx + i], vy[j * nx + i]) = Velocity(t, (i + 0.5) * hs, (j + 0.5) * hs);
        return (vx, vy);
    }

    /// <summary>Replaces iid unit normals e by e'_i = sum_j w_ij e_j / sqrt(sum_j w_ij^2), w_ij = exp(-d_ij^2 / 2 l^2)
    /// (d on the periodic canvas): unit variance, correlation between seeds decaying as a Gaussian of width sqrt(2) l.</summary>
    private void Smooth(List<(double X, double Y)> seeds, double[] e, double l)
    {
        int n = seeds.Count;
        var src = (double[])e.Clone();
        double cut2 = 16 * l * l;
        for (int i = 0; i < n; i++)
        {
            double s = 0, w2 = 0;
            for (int j = 0; j < n; j++)
            {
                double dx = Math.Abs(seeds[i].X - seeds[j].X), dy = Math.Abs(seeds[i].Y - seeds[j].Y);
                dx = Math.Min(dx, Width - dx); dy = Math.Min(dy, Height - dy);
                double d2 = dx * dx + dy * dy;
                if (d2 > cut2) continue;
                double w = Math.Exp(-d2 / (2 * l * l));
                s += w * src[j]; w2 += w * w;
            }
            e[i] = s / Math.Sqrt(w2);
        }
    }

    /// <summary>Shape-noise multipliers (G^(z/2), G^(-z/2)) of the region of (x, y) in frame t: the region of the nearest
    /// +1/2 core; (1, 1) for a single pair.</summary>
    private (double Along, double Across) RegionNoise(int t, double x, double y)
    {
        var plus = Truth.Plus;
        if (plus.Count <= 1) return (1, 1);
        int best = 0; double bd = double.PositiveInfinity;
        for (int k = 0; k < plus.Count; k++)
        {
            double dx = x - plus[k].X[t], dy = y - plus[k].Y[t], d2 = dx * dx + dy * dy;
            if (d2 < bd) { bd = d2; best = k; }
        }
        double g = Math.Pow(Options.AnisotropySpread, 0.5 * plus[best].Level);
        return (g, 1 / g);
    }

    private static double Wrap(double v, int size) => v < 0 ? v + size : v >= size ? v - size : v;

    private List<(double X, double Y)> DartThrow(Random rng, int t)
    {
        var seeds = new List<(double X, double Y)>();
        double cell = _a;                                         // bucket size
        int bx = (int)Math.Ceiling(Width / cell), by = (int)Math.Ceiling(Height / cell);
        var buckets = new List<int>[bx * by];
        for (int i = 0; i < buckets.Length; i++) buckets[i] = [];
        const double r = 0.7;                                     // exclusion radius in metric units (reaches the target count)
        int attempts = 0, target = Options.Cells;
        while (seeds.Count < target && attempts++ < 200 * target)
        {
            double x = rng.NextDouble() * Width, y = rng.NextDouble() * Height;
            var m = Metric(Director(t, x, y));
            int cx = (int)(x / cell), cy = (int)(y / cell);
            bool ok = true;
            for (int j = Math.Max(0, cy - 1); j <= Math.Min(by - 1, cy + 1) && ok; j++)
                for (int i = Math.Max(0, cx - 1); i <= Math.Min(bx - 1, cx + 1) && ok; i++)
                    foreach (var s in buckets[j * bx + i])
                        if (Dist2(m, seeds[s].X - x, seeds[s].Y - y) < r * r) { ok = false; break; }
            if (!ok) continue;
            buckets[cy * bx + cx].Add(seeds.Count);
            seeds.Add((x, y));
        }
        return seeds;
    }

    private (double Mxx, double Mxy, double Myy) Metric(double theta, double scaleA = 1, double scaleB = 1)
    {
        double c = Math.Cos(theta), s = Math.Sin(theta), ia = 1 / (_a * _a * scaleA * scaleA), ib = 1 / (_b * _b * scaleB * scaleB);
        return (c * c * ia + s * s * ib, c * s * (ia - ib), s * s * ia + c * c * ib);
    }

    private static double Dist2((double Mxx, double Mxy, double Myy) m, double dx, double dy) => m.Mxx * dx * dx + 2 * m.Mxy * dx * dy + m.Myy * dy * dy;

    /// <summary>Every pixel (centre) joins the seed nearest in that seed's own metric (seeds bucketed on a grid of cell length A).
    /// With a flock or a swirl the canvas is periodic: distances are taken to the nearest periodic image.</summary>
    private void Assign(List<(double X, double Y)> seeds, int t, int[] owner)
    {
        if (_flow is not null) { AssignPeriodic(seeds, t, owner); return; }
        double cell = _a;
        int bx = (int)Math.Ceiling(Width / cell), by = (int)Math.Ceiling(Height / cell);
        var (sx, sy, mxx, mxy, myy, start, items) = Buckets(seeds, t, bx, by, cell, cell);
        Parallel.For(0, Height, y =>
        {
            double fy = y + 0.5;
            int cy = Math.Min(by - 1, (int)(fy / cell));
            for (int x = 0; x < Width; x++)
            {
                double fx = x + 0.5;
                int cx = Math.Min(bx - 1, (int)(fx / cell));
                double best = double.PositiveInfinity; int bestS = 0;
                for (int r = 1; r <= 3 && double.IsPositiveInfinity(best); r++)   // widen the search if nothing is near
                    for (int j = Math.Max(0, cy - r); j <= Math.Min(by - 1, cy + r); j++)
                        for (int i = Math.Max(0, cx - r); i <= Math.Min(bx - 1, cx + r); i++)
                        {
                            int k = j * bx + i;
                            for (int q = start[k]; q < start[k + 1]; q++)
                            {
                                int s = items[q];
                                double dx = fx - sx[s], dy = fy - sy[s];
                                double d2 = mxx[s] * dx * dx + 2 * mxy[s] * dx * dy + myy[s] * dy * dy;
                                if (d2 < best) { best = d2; bestS = s; }
                            }
                        }
                owner[y * Width + x] = bestS;
            }
        });
    }

    /// <summary>Seed positions and metrics of frame t, bucketed on a bx x by grid of cells cw x ch (px): the seeds of bucket k
    /// are items[start[k] .. start[k + 1]), in seed order (a counting sort); shared by <see cref="Assign"/> and <see cref="AssignPeriodic"/>.</summary>
    private (double[] X, double[] Y, double[] Mxx, double[] Mxy, double[] Myy, int[] Start, int[] Items) Buckets(List<(double X, double Y)> seeds,
        int t, int bx, int by, double cw, double ch)
    {
        int n = seeds.Count;
        var sx = new double[n]; var sy = new double[n]; var mxx = new double[n]; var mxy = new double[n]; var myy = new double[n];
        var bucketOf = new int[n]; var start = new int[bx * by + 1];
        for (int s = 0; s < n; s++)
        {
            (sx[s], sy[s]) = seeds[s];
            (mxx[s], mxy[s], myy[s]) = SeedMetric(t, s, sx[s], sy[s]);
            bucketOf[s] = Math.Min(by - 1, (int)(sy[s] / ch)) * bx + Math.Min(bx - 1, (int)(sx[s] / cw));
            start[bucketOf[s] + 1]++;
        }
        for (int k = 0; k < bx * by; k++) start[k + 1] += start[k];
        var items = new int[n]; var fill = (int[])start.Clone();
        for (int s = 0; s < n; s++) items[fill[bucketOf[s]]++] = s;
        return (sx, sy, mxx, mxy, myy, start, items);
    }

    /// <summary>Metric of seed s in frame t: the director at the seed, A and B scaled by the shape noise and the region.</summary>
    private (double Mxx, double Mxy, double Myy) SeedMetric(int t, int s, double x, double y)
    {
        var (ra, rb) = RegionNoise(t, x, y);
        return Metric(Director(t, x, y),
            _noiseA is null ? 1 : Math.Max(0.3, 1 + Options.SigmaAlong * ra * _noiseA[s]), _noiseB is null ? 1 : Math.Max(0.3, 1 + Options.SigmaAcross * rb * _noiseB[s]));
    }

    private static double MinImage(double d, int size) => d > 0.5 * size ? d - size : d < -0.5 * size ? d + size : d;

    /// <summary><see cref="Assign"/> on the periodic canvas: bx = floor(W / A) buckets of equal width >= A per row (likewise
    /// by), the search wraps around, and offsets are reduced to the nearest periodic image.</summary>
    private void AssignPeriodic(List<(double X, double Y)> seeds, int t, int[] owner)
    {
        int bx = Math.Max(1, (int)(Width / _a)), by = Math.Max(1, (int)(Height / _a));
        double cw = Width / (double)bx, ch = Height / (double)by;
        var (sx, sy, mxx, mxy, myy, start, items) = Buckets(seeds, t, bx, by, cw, ch);
        Parallel.For(0, Height, y =>
        {
            double fy = y + 0.5;
            int cy = Math.Min(by - 1, (int)(fy / ch));
            for (int x = 0; x < Width; x++)
            {
                double fx = x + 0.5;
                int cx = Math.Min(bx - 1, (int)(fx / cw));
                double best = double.PositiveInfinity; int bestS = 0;
                for (int r = 1; r <= 3 && double.IsPositiveInfinity(best); r++)
                    for (int jj = cy - r; jj <= cy + r; jj++)
                        for (int ii = cx - r; ii <= cx + r; ii++)
                        {
                            int k = (int)Mod(jj, by) * bx + (int)Mod(ii, bx);
                            for (int q = start[k]; q < start[k + 1]; q++)
                            {
                                int s = items[q];
                                double dx = MinImage(fx - sx[s], Width), dy = MinImage(fy - sy[s], Height);
                                double d2 = mxx[s] * dx * dx + 2 * mxy[s] * dx * dy + myy[s] * dy * dy;
                                if (d2 < best) { best = d2; bestS = s; }
                            }
                        }
                owner[y * Width + x] = bestS;
            }
        });
    }

    /// <summary>Subtracts from each seed's Lloyd step d_i its Gaussian-weighted neighbourhood mean
    /// sum_j w_ij d_j / sum_j w_ij, w_ij = exp(-r_ij^2 / 2 l^2) (periodic distances, cut at 3 l; l = half a cell diameter).
    /// Lloyd steps act on a smooth displacement field like a Laplacian smoothing and would pull the cells back against the
    /// imposed flow; without their smooth part they only rearrange the packing locally (docs/motion.md#synthetic-flows).</summary>
    private void RemoveSmoothPart(List<(double X, double Y)> seeds, double[] dx, double[] dy, double l)
    {
        int n = seeds.Count;
        var mx = new double[n]; var my = new double[n];
        double cut2 = 9 * l * l;
        Parallel.For(0, n, i =>
        {
            double sx = 0, sy = 0, sw = 0;
            for (int j = 0; j < n; j++)
            {
                double ex = MinImage(seeds[j].X - seeds[i].X, Width), ey = MinImage(seeds[j].Y - seeds[i].Y, Height), d2 = ex * ex + ey * ey;
                if (d2 > cut2) continue;
                double w = Math.Exp(-d2 / (2 * l * l));
                sx += w * dx[j]; sy += w * dy[j]; sw += w;
            }
            mx[i] = sx / sw; my[i] = sy / sw;
        });
        for (int i = 0; i < n; i++) { dx[i] -= mx[i]; dy[i] -= my[i]; }
    }

    /// <summary>One Lloyd step: every seed moves to the centroid of its cell (on the periodic canvas with a flock or a
    /// swirl: the mean of the pixels' nearest-image offsets from the seed, wrapped back onto the canvas).</summary>
    private void Relax(List<(double X, double Y)> seeds, int[] owner)
    {
        if (_flow is not null)
        {
            var ox = new double[seeds.Count]; var oy = new double[seeds.Count]; var cnt = new int[seeds.Count];
            for (int y = 0; y < Height; y++)
                for (int x = 0; x < Width; x++)
                {
                    int s = owner[y * Width + x];
                    ox[s] += MinImage(x + 0.5 - seeds[s].X, Width); oy[s] += MinImage(y + 0.5 - seeds[s].Y, Height); cnt[s]++;
                }
            for (int s = 0; s < seeds.Count; s++) if (cnt[s] > 0) { ox[s] /= cnt[s]; oy[s] /= cnt[s]; }
            RemoveSmoothPart(seeds, ox, oy, Math.Sqrt(Options.CellAreaPx2 / Math.PI));
            for (int s = 0; s < seeds.Count; s++) seeds[s] = (Mod(seeds[s].X + ox[s], Width), Mod(seeds[s].Y + oy[s], Height));
            return;
        }
        var sx = new double[seeds.Count]; var sy = new double[seeds.Count]; var n = new int[seeds.Count];
        for (int y = 0; y < Height; y++)
            for (int x = 0; x < Width; x++)
            {
                int s = owner[y * Width + x];
                sx[s] += x + 0.5; sy[s] += y + 0.5; n[s]++;
            }
        for (int s = 0; s < seeds.Count; s++) if (n[s] > 0) seeds[s] = (sx[s] / n[s], sy[s] / n[s]);
    }
}
