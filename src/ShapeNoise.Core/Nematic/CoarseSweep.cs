using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Nematic;

/// <summary>The defect picture at one coarse-graining width (px, frames): defects per frame, +1/2 density per px^2 of the
/// tissue searched, and the time-weighted +1/2 headward speed with its interval.</summary>
/// <param name="Width">The width as given (e.g. "3R0").</param>
/// <param name="CoarsePx">The width in px.</param>
/// <param name="PlusPerFrame">Mean +1/2 defects per frame.</param>
/// <param name="MinusPerFrame">Mean -1/2 defects per frame.</param>
/// <param name="PlusDensityPerPx2">Mean +1/2 defects per frame per px^2 of tissue searched (<see cref="DefectStatistics"/>'s area).</param>
/// <param name="HeadwardSpeed">Time-weighted +1/2 headward speed (px/frame) with its interval (<see cref="HeadwardStatistics"/>).</param>
/// <param name="PlusTracks">+1/2 defect tracks behind the speed.</param>
public sealed record CoarseSweepPoint(LengthSpec Width, double CoarsePx, double PlusPerFrame, double MinusPerFrame, double PlusDensityPerPx2,
    Estimate HeadwardSpeed, int PlusTracks);

/// <summary>
/// Robustness of the defect picture to the smoothing (docs/motion.md#coarse-width-sweep): the defect stage re-run with each
/// coarse width of the sweep (same grid spacing, velocities, drift removal, resamples and seed), so a reader sees whether
/// the density and the direction of +1/2 motion depend on the width.
/// </summary>
/// <remarks>The dependence of defect counts on the coarse-graining length is discussed in Saw T.B. et al. (2017), Nature
/// 544:212-216 (methods) and Blanch-Mercader C. et al. (2018), Phys. Rev. Lett. 120:208101.</remarks>
public static class CoarseSweep
{
    /// <summary>Parses "1R0,2R0,3R0" (comma-separated <see cref="LengthSpec"/>s); throws naming <paramref name="option"/>.</summary>
    public static LengthSpec[] Parse(string spec, string option)
    {
        var parts = spec.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries);
        if (parts.Length == 0) throw new ArgumentException($"{option} needs at least one width, e.g. 1R0,2R0,3R0,4R0 (got '{spec}')");
        return Array.ConvertAll(parts, p => LengthSpec.Parse(p, option));
    }

    /// <summary>Runs the defect stage once per width of <paramref name="widths"/> (in order).</summary>
    public static List<CoarseSweepPoint> Run(IReadOnlyList<LengthSpec> widths, int widthPx, int heightPx, IReadOnlyList<CellRecord> cells,
        IReadOnlyList<TrackRecord> tracks, double r0Px, double pixelSizeUm, double coverage, DefectOptions o, IVelocitySource velocities)
    {
        var points = new List<CoarseSweepPoint>(widths.Count);
        foreach (var w in widths)
        {
            var opt = new DefectOptions(w, o.GridSpacing, o.BootstrapResamples, o.Seed, o.Ensemble, o.KeepDrift);
            var d = DefectAnalysis.Run(widthPx, heightPx, cells, tracks, r0Px, pixelSizeUm, opt, velocities);
            double g = d.CoarsePx;
            double area = Math.Max(0, widthPx - 2 * g) * Math.Max(0, heightPx - 2 * g) * coverage;
            points.Add(new CoarseSweepPoint(w, g, d.PlusPerFrame, d.MinusPerFrame, area > 0 ? d.PlusPerFrame / area : double.NaN,
                d.HeadwardSpeed, d.PlusTracksUsed));
        }
        return points;
    }
}
