using ScottPlot;
using ShapeNoise.Pipeline;

namespace ShapeNoise.Reporting;

/// <summary>Figures of an analysis (ScottPlot 5). Each draws finished results only.</summary>
public static class Figures
{
    private const int W = 720, H = 480;

    public static void WriteAll(AnalysisResult r, string dir)
    {
        Spectrum(r).SavePng(Path.Combine(dir, "spectrum.png"), W, H);
        Anisotropy(r).SavePng(Path.Combine(dir, "anisotropy.png"), W, H);
        Profile(r).SavePng(Path.Combine(dir, "profile.png"), W, H);
    }

    /// <summary>Pooled mode power against mode number on a log axis: raw, floor-corrected and the floor.</summary>
    public static Plot Spectrum(AnalysisResult r)
    {
        var rows = Tables.Spectrum(r);
        var plt = new Plot();
        var xr = new List<double>(); var yr = new List<double>(); var xc = new List<double>(); var yc = new List<double>();
        foreach (var row in rows)
        {
            if (row.PowerRaw > 0) { xr.Add(row.Mode); yr.Add(Math.Log10(row.PowerRaw)); }
            if (row.PowerCorrected > 0) { xc.Add(row.Mode); yc.Add(Math.Log10(row.PowerCorrected)); }
        }
        var raw = plt.Add.Scatter(xr.ToArray(), yr.ToArray()); raw.LegendText = "raw"; raw.MarkerSize = 5;
        var cor = plt.Add.Scatter(xc.ToArray(), yc.ToArray()); cor.LegendText = "floor-corrected"; cor.MarkerSize = 5;
        if (rows.Count > 0 && rows[0].Floor > 0)
        {
            var f = plt.Add.HorizontalLine(Math.Log10(rows[0].Floor)); f.LegendText = "noise floor per mode"; f.LinePattern = LinePattern.Dashed;
        }
        LogY(plt);
        plt.Title("Fluctuation spectrum (pooled over tracks)");
        plt.XLabel("Fourier mode n");
        plt.YLabel($"mode power p_n ({r.Units.L2.Replace("2", "²")})");
        plt.ShowLegend();
        return plt;
    }

    /// <summary>Per-track var_L against var_W with the pooled ratio (anisotropy) and the isotropic line.</summary>
    public static Plot Anisotropy(AnalysisResult r)
    {
        var rows = Tables.Tracks(r).Where(t => t.InStatistics && t.VarL is not null && t.VarW is not null).ToList();
        var plt = new Plot();
        var xs = rows.Select(t => t.VarW!.Value).ToArray(); var ys = rows.Select(t => t.VarL!.Value).ToArray();
        var sc = plt.Add.ScatterPoints(xs, ys); sc.LegendText = $"tracks (n = {rows.Count})"; sc.MarkerSize = 6;
        double max = xs.Length > 0 ? Math.Max(xs.Max(), ys.Max() / Math.Max(1e-12, r.Pooled.Anisotropy.Value)) : 1;
        var a = r.Pooled.Anisotropy;
        if (double.IsFinite(a.Value))
        {
            var line = plt.Add.Line(0, 0, max, a.Value * max);
            line.LegendText = $"pooled ratio {a.Value:F2} (95% CI {a.Low:F2}-{a.High:F2})"; line.LineWidth = 2;
        }
        var iso = plt.Add.Line(0, 0, max, max); iso.LegendText = "equal (isotropic)"; iso.LinePattern = LinePattern.Dashed;
        plt.Title("Length vs width fluctuation per track");
        plt.XLabel($"var W ({r.Units.L2.Replace("2", "²")})");
        plt.YLabel($"var L ({r.Units.L2.Replace("2", "²")})");
        plt.ShowLegend(Alignment.UpperLeft);
        return plt;
    }

    /// <summary>Contour variance against the outward normal's angle from the long axis (0 = pole, 90 = flank).</summary>
    public static Plot Profile(AnalysisResult r)
    {
        var rows = Tables.Profile(r);
        var plt = new Plot();
        var x = rows.Select(p => p.AngleDeg).ToArray();
        var raw = plt.Add.Scatter(x, rows.Select(p => p.VarianceRaw).ToArray()); raw.LegendText = "raw";
        var cor = plt.Add.Scatter(x, rows.Select(p => p.VarianceCorrected).ToArray()); cor.LegendText = "floor-corrected";
        var fl = plt.Add.Scatter(x, rows.Select(p => p.Floor).ToArray()); fl.LegendText = "noise floor"; fl.LinePattern = LinePattern.Dashed;
        var split = plt.Add.VerticalLine(45); split.LinePattern = LinePattern.Dotted; split.LegendText = "pole | flank";
        plt.Axes.SetLimitsX(0, 90);
        plt.Title("Contour variance from pole (0°) to flank (90°)");
        plt.XLabel("angle of the outward normal from the long axis (degrees)");
        plt.YLabel($"mean_t n² ({r.Units.L2.Replace("2", "²")})");
        plt.ShowLegend(Alignment.UpperRight);
        return plt;
    }

    private static void LogY(Plot plt)
    {
        var ticks = new ScottPlot.TickGenerators.NumericAutomatic
        {
            MinorTickGenerator = new ScottPlot.TickGenerators.LogMinorTickGenerator(),
            IntegerTicksOnly = true,
            LabelFormatter = y => $"1e{y:0}",
        };
        plt.Axes.Left.TickGenerator = ticks;
    }
}
