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
    /// <summary>A length: um or px.</summary>
    Length,
    /// <summary>A squared rate (enstrophy): 1/min² or 1/frame².</summary>
    PerTimeSquared,
    /// <summary>A number per area: per 1000 um² (or per 1000 px²).</summary>
    Density,
    /// <summary>A number per area and time: per 1000 um² per h (or per 1000 px² per frame).</summary>
    Rate,
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

    /// <summary>Polar order of the cell velocities (docs/motion.md#polar-order).</summary>
    public static readonly Measure PolarOrder = new("polar_order", UnitKind.Ratio, "|sum v| / sum |v|");
    /// <summary>Mean cell speed after drift removal.</summary>
    public static readonly Measure MeanSpeed = new("mean_speed", UnitKind.Speed, "drift removed");
    /// <summary>Rms of the cell velocity about the frame mean.</summary>
    public static readonly Measure RmsSpeed = new("rms_speed", UnitKind.Speed, "about the frame mean");
    /// <summary>First zero of the velocity correlation.</summary>
    public static readonly Measure VelocityCorrelationLength = new("velocity_correlation_length", UnitKind.Length, "first zero of C_vv");
    /// <summary>1/e length of the velocity correlation.</summary>
    public static readonly Measure VelocityCorrelationLength1e = new("velocity_correlation_length_1e", UnitKind.Length, "C_vv = 1/e");
    /// <summary>First zero of the vorticity correlation.</summary>
    public static readonly Measure VorticityCorrelationLength = new("vorticity_correlation_length", UnitKind.Length, "first zero of C_ww");
    /// <summary>Enstrophy of the coarse velocity field.</summary>
    public static readonly Measure Enstrophy = new("enstrophy", UnitKind.PerTimeSquared, "<w²>/2");
    /// <summary>1/e time of the cell velocity autocorrelation.</summary>
    public static readonly Measure VelocityAutocorrelationTime = new("velocity_autocorrelation_time", UnitKind.Time, "1/e");
    /// <summary>1/e length of the nematic correlation.</summary>
    public static readonly Measure NematicCorrelationLength = new("nematic_correlation_length", UnitKind.Length, "C_QQ = 1/e");

    /// <summary>+1/2 defects per area of tissue.</summary>
    public static readonly Measure PlusHalfDensity = new("plus_half_density", UnitKind.Density, "per frame");
    /// <summary>-1/2 defects per area of tissue.</summary>
    public static readonly Measure MinusHalfDensity = new("minus_half_density", UnitKind.Density, "per frame");
    /// <summary>Kaplan-Meier median lifetime of defect tracks.</summary>
    public static readonly Measure DefectLifetime = new("defect_lifetime", UnitKind.Time, "Kaplan-Meier median");
    /// <summary>Creations of +-1/2 pairs per area and time.</summary>
    public static readonly Measure DefectCreationRate = new("defect_creation_rate", UnitKind.Rate, "");
    /// <summary>Annihilations of +-1/2 pairs per area and time.</summary>
    public static readonly Measure DefectAnnihilationRate = new("defect_annihilation_rate", UnitKind.Rate, "");

    /// <summary>The defect statistics (docs/motion.md#defect-statistics), in report order.</summary>
    public static IReadOnlyList<Measure> DefectStatistics { get; } = [PlusHalfDensity, MinusHalfDensity, DefectLifetime, DefectCreationRate, DefectAnnihilationRate];

    /// <summary>The collective-motion measures (docs/motion.md), in report order.</summary>
    public static IReadOnlyList<Measure> Motion { get; } = [PolarOrder, MeanSpeed, RmsSpeed, VelocityCorrelationLength, VelocityCorrelationLength1e,
        VorticityCorrelationLength, Enstrophy, VelocityAutocorrelationTime, NematicCorrelationLength];

    /// <summary>Every measure of the table.</summary>
    public static IReadOnlyList<Measure> All { get; } = [Anisotropy, AnisotropyContour, VarL, VarW, VarAlong, VarAcross, TauQ, TauTheta, DefectHeadwardSpeed, FlowHeadwardSpeed,
        .. Motion, .. DefectStatistics];

    /// <summary>The measure named <paramref name="name"/>; an <see cref="ArgumentException"/> for a name not in the table.</summary>
    public static Measure Get(string name)
    {
        foreach (var m in All) if (m.Name == name) return m;
        throw new ArgumentException($"'{name}' is not a measure of the output contract");
    }
}
