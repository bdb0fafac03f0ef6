namespace ShapeNoise.Reporting;

/// <summary>What a measure's unit is: a ratio (no unit), an area (length²), a time or a speed.</summary>
public enum UnitKind
{
    /// <summary>A ratio of two like quantities: no unit.</summary>
    Ratio,
    /// <summary>An area or a variance of lengths: um² or px².</summary>
    Area,
    /// <summary>A time: min or frames.</summary>
    Time,
    /// <summary>A speed: um/min … px/frame.</summary>
    Speed,
}

/// <summary>One measure of the output contract (docs/measures.md#definitions): its summary.json key, unit kind and what it is.</summary>
/// <param name="Name">The key in summary.json and the measure column of comparison.csv.</param>
/// <param name="Kind">Its unit kind.</param>
/// <param name="Statistic">What it is, in a few words (console and HTML labels).</param>
public sealed record Measure(string Name, UnitKind Kind, string Statistic)
{
    /// <summary>"name (statistic)" for a ratio, "name (unit, statistic)" otherwise; the statistic is left out when empty.</summary>
    public string Label(UnitScale u)
    {
        string unit = Kind == UnitKind.Ratio ? "" : u.Label(Kind);
        string inside = string.Join(", ", new[] { unit, Statistic }.Where(x => x.Length > 0));
        return inside.Length == 0 ? Name : $"{Name} ({inside})";
    }
}

/// <summary>The table of measures: one place for each measure's name, unit kind and statistic.</summary>
public static class Measures
{
    /// <summary>var_L / var_W (pooled).</summary>
    public static readonly Measure Anisotropy = new("anisotropy", UnitKind.Ratio, "var_L / var_W");
    /// <summary>var_along / var_across, floor-corrected.</summary>
    public static readonly Measure AnisotropyContour = new("anisotropy_contour", UnitKind.Ratio, "var_along / var_across");
    /// <summary>Pooled length variance.</summary>
    public static readonly Measure VarL = new("var_L", UnitKind.Area, "");
    /// <summary>Pooled width variance.</summary>
    public static readonly Measure VarW = new("var_W", UnitKind.Area, "");
    /// <summary>Pole-sector contour variance, floor-corrected.</summary>
    public static readonly Measure VarAlong = new("var_along", UnitKind.Area, "floor-corrected");
    /// <summary>Flank-sector contour variance, floor-corrected.</summary>
    public static readonly Measure VarAcross = new("var_across", UnitKind.Area, "floor-corrected");
    /// <summary>Correlation time of the elongation.</summary>
    public static readonly Measure TauQ = new("tau_q", UnitKind.Time, "bias-corrected");
    /// <summary>Correlation time of the orientation.</summary>
    public static readonly Measure TauTheta = new("tau_theta", UnitKind.Time, "");
    /// <summary>Mean headward speed of +1/2 defects.</summary>
    public static readonly Measure DefectHeadwardSpeed = new("defect_headward_speed", UnitKind.Speed, "> 0 headward");
    /// <summary>Mean headward cell flow at +1/2 defect cores.</summary>
    public static readonly Measure FlowHeadwardSpeed = new("flow_headward_speed", UnitKind.Speed, "");

    /// <summary>Every measure of the table.</summary>
    public static IReadOnlyList<Measure> All { get; } = [Anisotropy, AnisotropyContour, VarL, VarW, VarAlong, VarAcross, TauQ, TauTheta, DefectHeadwardSpeed, FlowHeadwardSpeed];

    /// <summary>The measure named <paramref name="name"/>; an <see cref="ArgumentException"/> for a name not in the table.</summary>
    public static Measure Get(string name)
    {
        foreach (var m in All) if (m.Name == name) return m;
        throw new ArgumentException($"'{name}' is not a measure of the output contract");
    }
}
