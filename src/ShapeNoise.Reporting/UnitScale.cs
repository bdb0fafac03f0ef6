using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;

namespace ShapeNoise.Reporting;

/// <summary>
/// The run's units in one place: the factors that turn pixel and frame quantities into the run's length, area, time and
/// speed units (um and min when the pixel size and frame interval are known, else px and frames; docs/measures.md#units),
/// and the suffixes and labels that name them in files, tables and figures.
/// </summary>
/// <param name="PixelSizeKnown">Whether lengths are in um (else px).</param>
/// <param name="FrameIntervalKnown">Whether times are in min (else frames).</param>
/// <param name="UmPerPx">Length factor s (1 when the pixel size is unknown).</param>
/// <param name="MinPerFrame">Time factor dt (1 when the frame interval is unknown).</param>
public sealed record UnitScale(bool PixelSizeKnown, bool FrameIntervalKnown, double UmPerPx, double MinPerFrame)
{
    /// <summary>The scale of a run's <see cref="Units"/>.</summary>
    public static UnitScale Of(Units u) => new(u.PixelSizeUm is not null, u.FrameIntervalMin is not null, u.PixelSizeUm ?? 1.0, u.FrameIntervalMin ?? 1.0);

    /// <summary>The scale of numbers already written in the run's units (read back from an analysis folder): every factor is 1.</summary>
    public static UnitScale Written(bool pixelSizeKnown, bool frameIntervalKnown) => new(pixelSizeKnown, frameIntervalKnown, 1.0, 1.0);

    /// <summary>Length factor: run length per px (s).</summary>
    public double LengthFactor => UmPerPx;
    /// <summary>Area (and variance) factor: s².</summary>
    public double AreaFactor => UmPerPx * UmPerPx;
    /// <summary>Time factor: run time per frame (dt).</summary>
    public double TimeFactor => MinPerFrame;
    /// <summary>Speed factor: s / dt.</summary>
    public double SpeedFactor => UmPerPx / MinPerFrame;
    /// <summary>Diffusion-coefficient factor: s² / dt.</summary>
    public double DiffusionFactor => UmPerPx * UmPerPx / MinPerFrame;

    /// <summary>Squared-rate factor (enstrophy): 1 / dt².</summary>
    public double PerTimeSquaredFactor => 1 / (MinPerFrame * MinPerFrame);
    /// <summary>Density factor: per px² to per 1000 um² (1000 / s²; per 1000 px² when the pixel size is unknown).</summary>
    public double DensityFactor => 1000 / (UmPerPx * UmPerPx);
    /// <summary>Rate factor: per px² per frame to per 1000 um² per h (per frame when the frame interval is unknown).</summary>
    public double RateFactor => DensityFactor * (FrameIntervalKnown ? 60 / MinPerFrame : 1);
    /// <summary>The factor of a unit kind (1 for a ratio).</summary>
    public double Factor(UnitKind kind) => kind switch
    {
        UnitKind.Area => AreaFactor, UnitKind.Time => TimeFactor, UnitKind.Speed => SpeedFactor, UnitKind.Length => LengthFactor,
        UnitKind.PerTimeSquared => PerTimeSquaredFactor, UnitKind.Density => DensityFactor, UnitKind.Rate => RateFactor, _ => 1,
    };
    /// <summary>An estimate in px and frames scaled to the run's unit of <paramref name="kind"/>.</summary>
    public Estimate Of(UnitKind kind, Estimate e) => e.Scale(Factor(kind));

    /// <summary>A length in px in the run's unit.</summary>
    public double Length(double px) => px * LengthFactor;
    /// <summary>An area or variance in px² in the run's unit.</summary>
    public double Area(double px2) => px2 * AreaFactor;
    /// <summary>A time in frames in the run's unit.</summary>
    public double Time(double frames) => frames * TimeFactor;
    /// <summary>A speed in px/frame in the run's unit.</summary>
    public double Speed(double pxPerFrame) => pxPerFrame * SpeedFactor;
    /// <summary>An area estimate (px²) in the run's unit.</summary>
    public Estimate Area(Estimate px2) => px2.Scale(AreaFactor);
    /// <summary>A time estimate (frames) in the run's unit.</summary>
    public Estimate Time(Estimate frames) => frames.Scale(TimeFactor);
    /// <summary>A speed estimate (px/frame) in the run's unit.</summary>
    public Estimate Speed(Estimate pxPerFrame) => pxPerFrame.Scale(SpeedFactor);

    /// <summary>Length unit name: "um" or "px" (summary.json units.length, column suffix).</summary>
    public string LengthName => PixelSizeKnown ? "um" : "px";
    /// <summary>Time unit name: "min" or "frame" (summary.json units.time).</summary>
    public string TimeName => FrameIntervalKnown ? "min" : "frame";
    /// <summary>Area column suffix: "um2" or "px2".</summary>
    public string AreaSuffix => LengthName + "2";
    /// <summary>Time column suffix: "min" or "frames".</summary>
    public string TimeSuffix => FrameIntervalKnown ? "min" : "frames";
    /// <summary>Speed column suffix: "um_per_min" … "px_per_frame".</summary>
    public string SpeedSuffix => $"{LengthName}_per_{TimeName}";
    /// <summary>Diffusion column suffix: "um2_per_min" … "px2_per_frame".</summary>
    public string DiffusionSuffix => $"{AreaSuffix}_per_{TimeName}";
    /// <summary>Area label for people: "um²" or "px²".</summary>
    public string AreaLabel => LengthName + "²";
    /// <summary>Speed label for people: "um/min" … "px/frame".</summary>
    public string SpeedLabel => $"{LengthName}/{TimeName}";

    /// <summary>The label of a unit kind for people ("ratio" for a ratio).</summary>
    public string Label(UnitKind kind) => kind switch
    {
        UnitKind.Area => AreaSuffix,
        UnitKind.Time => TimeName,
        UnitKind.Speed => SpeedLabel,
        UnitKind.Length => LengthName,
        UnitKind.PerTimeSquared => $"1/{TimeName}²",
        UnitKind.Density => $"per 1000 {AreaLabel}",
        UnitKind.Rate => $"per 1000 {AreaLabel} per {(FrameIntervalKnown ? "h" : "frame")}",
        _ => "ratio",
    };

    /// <summary>The scale of summary.json's units ("um"/"px", "min"/"frame"); null for any other name.</summary>
    public static UnitScale? FromNames(string length, string time)
        => length is "um" or "px" && time is "min" or "frame" ? Written(length == "um", time == "min") : null;
}
