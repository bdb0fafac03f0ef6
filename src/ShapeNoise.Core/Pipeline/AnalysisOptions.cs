using ShapeNoise.TimeSeries;
using System.Text.Json.Serialization;
using ShapeNoise.Dynamics;
using ShapeNoise.Fluctuations;
using ShapeNoise.Outlines;
using ShapeNoise.Tracking;

namespace ShapeNoise.Pipeline;

/// <summary>Where the cell velocities of the defect analysis come from.</summary>
public enum VelocitySource
{
    /// <summary>Velocity of a cell = displacement of its tracked centroid between frames (px/frame).</summary>
    Centroids,
    /// <summary>Velocity from dense optical flow of the raw intensity movie at each cell's centroid (px/frame).</summary>
    Flow,
}

/// <summary>File format of the simulation parameters.</summary>
public enum SimFormat
{
    /// <summary>JSON: sim-params.json.</summary>
    Json,
    /// <summary>TOML: sim-params.toml (same content; undefined numbers are nan, TOML has no null).</summary>
    Toml,
}

/// <summary>Options of <c>analyze</c>, flat as the CLI and run.json see them; <see cref="Validated"/> checks them, and the
/// <c>For*</c> properties hand each stage its own (self-checking) record. Defaults are the spec's.</summary>
public sealed record AnalysisOptions
{
    /// <summary>Rays per outline, M (multiple of 8, at least 16).</summary>
    public int Rays { get; init; } = 64;
    /// <summary>Objects with fewer pixels are excluded (spec: --min-area, 30 px).</summary>
    public int MinAreaPx { get; init; } = 30;
    /// <summary>Objects within this many px of the image edge are excluded (spec: 1 px).</summary>
    public int BorderMarginPx { get; init; } = 1;
    /// <summary>Only tracks with at least this many frames enter the statistics (spec: --min-track, 10).</summary>
    public int MinTrackFrames { get; init; } = 10;
    /// <summary>A track lost, merged or split for at most this many frames resumes when its cell reappears near its last
    /// position (--max-gap, default 2; docs/measures.md#one-frame-errors).</summary>
    public int MaxGapFrames { get; init; } = 2;
    /// <summary>Outline placement.</summary>
    public OutlineMethod Outline { get; init; } = OutlineMethod.Midpoint;
    /// <summary>Overlap fraction that makes two masks in consecutive frames candidates for the same cell.</summary>
    public double LinkOverlapFraction { get; init; } = 0.25;
    /// <summary>Pixel size (um/px); overrides the movie's metadata and makes its pixels square.</summary>
    public double? PixelSizeUm { get; init; }
    /// <summary>Frame interval (min); overrides the movie's metadata.</summary>
    public double? FrameIntervalMin { get; init; }
    /// <summary>Bootstrap resamples over tracks.</summary>
    public int BootstrapResamples { get; init; } = 1000;
    /// <summary>Seed of every random resample.</summary>
    public int Seed { get; init; } = 1;
    /// <summary>Longest lag (frames) of the autocorrelation curves.</summary>
    public int MaxLagFrames { get; init; } = 30;
    /// <summary>Time unit of the dimensionless simulation parameters: "tau_q", "min", or a number of minutes.</summary>
    public string TimeUnit { get; init; } = "tau_q";
    /// <summary>Format of the simulation-parameter file.</summary>
    public SimFormat SimFormat { get; init; } = SimFormat.Json;
    /// <summary>Gaussian width of the coarse-graining: a length in the run's unit, or a multiple of R0 ("2R0").</summary>
    public string CoarseWidth { get; init; } = "2R0";
    /// <summary>Coarse widths at which the defect stage is re-run for the robustness sweep ("1R0,2R0,3R0,4R0"); null = no
    /// sweep (docs/motion.md#coarse-width-sweep).</summary>
    public string? CoarseSweep { get; init; }
    /// <summary>Grid spacing of the coarse-grained fields: a length in the run's unit, or a multiple of R0 ("0.5R0").</summary>
    public string GridSpacing { get; init; } = "0.5R0";
    /// <summary>Cell velocities for the defect analysis: tracked centroids, or dense optical flow of the raw movie (--raw only).</summary>
    public VelocitySource Velocity { get; init; } = VelocitySource.Centroids;
    /// <summary>Keep stage drift (the tissue's median velocity per frame) in the defect stage's velocities and defect
    /// kinematics (--keep-drift); by default it is removed (docs/defects.md#drift).</summary>
    public bool KeepDrift { get; init; }
    /// <summary>Outline tables: the table's cell ids are stable track ids (otherwise cells are linked by centroid).</summary>
    public bool IdsAreTracks { get; init; }
    /// <summary>Outline tables: largest centroid displacement (px) between frames for linking; null = the mean cell radius.</summary>
    public double? MaxDisplacementPx { get; init; }
    /// <summary>Output folder of a fixed-cell movie analysed the same way, whose fluctuations are the noise floor (or null).</summary>
    public string? FloorFrom { get; init; }
    /// <summary>How measurement noise is removed from the headline variances (docs/measures.md#temporal-noise-model):
    /// temporal (default), modes (the high-mode floor) or fixed-cells (needs <see cref="FloorFrom"/>).</summary>
    public NoiseModel NoiseModel { get; init; } = NoiseModel.Temporal;

    /// <summary>The outline stage's options (checked when built).</summary>
    [JsonIgnore] public OutlineOptions ForOutlines => new(Outline, BorderMarginPx, MinAreaPx);
    /// <summary>The tracking stage's options (checked when built).</summary>
    [JsonIgnore] public TrackingOptions ForTracking => new(LinkOverlapFraction, MaxGapFrames, MinTrackFrames);
    /// <summary>The pooling stage's options (checked when built).</summary>
    [JsonIgnore] public PoolingOptions ForPooling => new(BootstrapResamples, Seed, NoiseModel, MaxLagFrames);
    /// <summary>The defect stage's options: --coarse and --grid parsed once (<see cref="Nematic.LengthSpec.Parse"/>), with
    /// the bootstrap resamples, seed and --keep-drift. A method, not a property, so run.json keeps the option strings only.</summary>
    public Nematic.DefectOptions ToDefectOptions() =>
        new(Nematic.LengthSpec.Parse(CoarseWidth, "--coarse"), Nematic.LengthSpec.Parse(GridSpacing, "--grid"), BootstrapResamples, Seed, keepDrift: KeepDrift);
    /// <summary>The dynamics stage's options (checked when built).</summary>
    [JsonIgnore] public DynamicsOptions ForDynamics => new(MaxLagFrames, BootstrapResamples, Seed);
    /// <summary>The collective-motion stage's options (docs/motion.md).</summary>
    [JsonIgnore] public Motion.MotionOptions ForMotion => new(BootstrapResamples, Seed, MaxLagFrames, KeepDrift);

    /// <summary>Throws <see cref="ArgumentException"/> when a value is out of range: builds every stage's options (which
    /// check themselves) and checks the rest. Messages start with the property's name (<c>nameof</c>); the CLI turns it
    /// into the flag (ShapeNoise.Cli.OptionNames).</summary>
    public AnalysisOptions Validated()
    {
        if (Rays < 16 || Rays % 8 != 0) throw new ArgumentException($"{nameof(Rays)} must be a multiple of 8 and at least 16 (got {Rays})");
        _ = ForOutlines;
        _ = ForTracking;
        if (PixelSizeUm is { } s && !(s > 0 && double.IsFinite(s))) throw new ArgumentException($"{nameof(PixelSizeUm)} must be a positive number (got {s})");
        if (FrameIntervalMin is { } t && !(t > 0 && double.IsFinite(t))) throw new ArgumentException($"{nameof(FrameIntervalMin)} must be a positive number (got {t})");
        _ = ForDynamics;
        if (TimeUnit is not ("tau_q" or "min") && !(double.TryParse(TimeUnit, System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out var tu) && tu > 0 && double.IsFinite(tu)))
            throw new ArgumentException($"{nameof(TimeUnit)} must be tau_q, min or a positive number of minutes (got '{TimeUnit}')");
        _ = ToDefectOptions();
        if (CoarseSweep is { } sweep) Nematic.CoarseSweep.Parse(sweep, nameof(CoarseSweep));
        _ = ForPooling;
        if (NoiseModel == NoiseModel.FixedCells && FloorFrom is null)
            throw new ArgumentException("--noise-model fixed-cells needs the fixed-cell reference of --floor-from");
        if (FloorFrom is not null && NoiseModel != NoiseModel.FixedCells)
            throw new ArgumentException($"--floor-from is used only with --noise-model fixed-cells (got --noise-model {Pooling.Name(NoiseModel)})");
        return this;
    }
}
