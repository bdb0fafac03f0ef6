using System.Globalization;

namespace ShapeNoise.Nematic;

/// <summary>
/// A length option parsed once: either a multiple of the mean cell radius R0 ("2R0" = 2 x R0) or a plain number in the
/// run's length unit (um when the pixel size is known, else px). <see cref="ToPx"/> turns it into px for one run.
/// </summary>
/// <param name="Value">The factor of R0, or the length in the run's unit; positive and finite.</param>
/// <param name="TimesR0">True for a multiple of R0.</param>
public readonly record struct LengthSpec(double Value, bool TimesR0)
{
    /// <summary>Parses "2R0" (case-insensitive R0 suffix) or "12.5"; throws <see cref="ArgumentException"/> naming
    /// <paramref name="option"/> when the text is not a positive length.</summary>
    public static LengthSpec Parse(string spec, string option)
    {
        var t = spec.Trim();
        if (t.EndsWith("R0", StringComparison.OrdinalIgnoreCase))
        {
            if (double.TryParse(t[..^2], NumberStyles.Float, CultureInfo.InvariantCulture, out var f) && f > 0 && double.IsFinite(f)) return new(f, true);
        }
        else if (double.TryParse(t, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && v > 0 && double.IsFinite(v)) return new(v, false);
        throw new ArgumentException($"{option} must be a positive length or a multiple of R0 such as 2R0 (got '{spec}')");
    }

    /// <summary>The length in px: Value x r0Px for a multiple of R0, else Value / pixelSizeUm (pass 1 when lengths are in px).</summary>
    public double ToPx(double r0Px, double pixelSizeUm) => TimesR0 ? Value * r0Px : Value / pixelSizeUm;

    /// <summary>The option's text form ("2R0" or "12.5").</summary>
    public override string ToString() => Value.ToString("R", CultureInfo.InvariantCulture) + (TimesR0 ? "R0" : "");
}
