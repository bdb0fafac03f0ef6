using ShapeNoise.Outlines;

namespace ShapeNoise.Pipeline;

/// <summary>Where the cell velocities of the defect analysis come from.</summary>
public enum VelocitySource { Centroids, Flow }

/// <summary>File format of the simulation parameters.</summary>
public enum SimFormat { Json, Toml }

/// <summary>Options of <c>analyze</c>; validated on construction. Defaults are the spec's.</summary>
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
    /// <summary>A track lost for at most this many frames resumes when its cell reappears near its last position (spec: --max-gap, 0).</summary>
    public int MaxGapFrames { get; init; }
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
    /// <summary>Grid spacing of the coarse-grained fields: a length in the run's unit, or a multiple of R0 ("0.5R0").</summary>
    public string GridSpacing { get; init; } = "0.5R0";
    /// <summary>Cell velocities for the defect analysis: tracked centroids, or dense optical flow of the raw movie (--raw only).</summary>
    public VelocitySource Velocity { get; init; } = VelocitySource.Centroids;
    /// <summary>Outline tables: the table's cell ids are stable track ids (otherwise cells are linked by centroid).</summary>
    public bool IdsAreTracks { get; init; }
    /// <summary>Outline tables: largest centroid displacement (px) between frames for linking; null = the mean cell radius.</summary>
    public double? MaxDisplacementPx { get; init; }
    /// <summary>Output folder of a fixed-cell movie analysed the same way, whose fluctuations are the noise floor (or null).</summary>
    public string? FloorFrom { get; init; }

    /// <summary>The defect stage's options: --coarse and --grid parsed once (<see cref="Nematic.LengthSpec.Parse"/>), with
    /// the bootstrap resamples and seed. A method, not a property, so run.json keeps the option strings only.</summary>
    public Nematic.DefectOptions ToDefectOptions() =>
        new(Nematic.LengthSpec.Parse(CoarseWidth, "--coarse"), Nematic.LengthSpec.Parse(GridSpacing, "--grid"), BootstrapResamples, Seed);

    /// <summary>Throws <see cref="ArgumentException"/> naming the option when a value is out of range.</summary>
    public AnalysisOptions Validated()
    {
        if (Rays < 16 || Rays % 8 != 0) throw new ArgumentException($"--rays must be a multiple of 8 and at least 16 (got {Rays})");
        if (MinAreaPx < 3) throw new ArgumentException($"--min-area must be at least 3 px (got {MinAreaPx})");
        if (BorderMarginPx < 0) throw new ArgumentException($"--border-margin must be >= 0 (got {BorderMarginPx})");
        if (MinTrackFrames < 3) throw new ArgumentException($"--min-track must be at least 3 frames (got {MinTrackFrames})");
        if (MaxGapFrames < 0) throw new ArgumentException($"--max-gap must be >= 0 frames (got {MaxGapFrames})");
        if (LinkOverlapFraction is <= 0 or > 1) throw new ArgumentException($"--link-overlap must be in (0, 1] (got {LinkOverlapFraction})");
        if (PixelSizeUm is { } s && !(s > 0 && double.IsFinite(s))) throw new ArgumentException($"--pixel-size must be a positive number (got {s})");
        if (FrameIntervalMin is { } t && !(t > 0 && double.IsFinite(t))) throw new ArgumentException($"--frame-interval must be a positive number (got {t})");
        if (MaxLagFrames < 2) throw new ArgumentException($"--max-lag must be at least 2 frames (got {MaxLagFrames})");
        if (TimeUnit is not ("tau_q" or "min") && !(double.TryParse(TimeUnit, System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out var tu) && tu > 0 && double.IsFinite(tu)))
            throw new ArgumentException($"--time-unit must be tau_q, min or a positive number of minutes (got '{TimeUnit}')");
        if (BootstrapResamples < 0) throw new ArgumentException($"--bootstrap must be >= 0 (got {BootstrapResamples})");
        _ = ToDefectOptions();
        return this;
    }
}
