using ScottPlot;
using ShapeNoise.Pipeline;
using Figure = ShapeNoise.Pipeline.Figure;

namespace ShapeNoise.Reporting;

/// <summary>Figures of an analysis (ScottPlot 5). Each draws finished results only.</summary>
public static class Figures
{
    private const int W = 720, H = 480;

    /// <summary>Every figure of an analysis, drawn in memory, in the order the report shows them (file name, caption, PNG bytes).</summary>
    public static List<Figure> All(AnalysisResult r)
    {
        // Independent plots are drawn in parallel (one Plot per task) and kept in the report's order.
        var makers = new List<Func<IEnumerable<Figure>>>
        {
            () => [Single(AnalysisFolder.AnisotropyFigure, "Each point is a track: its length variance against its width variance. Points above the dashed line fluctuate more in length; the solid line's slope is the pooled ratio (anisotropy).", () => Anisotropy(r), W, H)],
            () => [Single(AnalysisFolder.ProfileFigure, "Contour variance against the angle of the outline's normal from the long axis: 0° is the pole, 90° the flank. Raw, noise floor and corrected; the dotted line separates the two sectors.", () => Profile(r), W, H)],
            () => [Single(AnalysisFolder.SpectrumFigure, "Mode power of the body-frame Fourier modes (log scale). A flat tail at high modes is measurement noise; the dashed line is the floor subtracted.", () => Spectrum(r), W, H)],
            () => AutocorrelationSheet(r),
            () => [Single(AnalysisFolder.HeadwardFigure, "Per +1/2 defect track, the speed along its head direction: right of zero the defect moves toward its head (extensile-like), left toward its tail (contractile-like).", () => Headward(r), W, H)],
            () => [Single(AnalysisFolder.DefectFlowFigure, "Mean cell flow (arrows) and director (grey bars) around +1/2 defects, rotated so every head points to the right.", () => DefectFlow(r), 640, 640)],
            () => [Single(AnalysisFolder.DriftFigure, r.Defects.DriftRemoved
                ? "The tissue's velocity per frame (median cell velocity, x and y): stage drift, removed from every cell velocity and from the defects' motion before the defect statistics."
                : "The tissue's velocity per frame (median cell velocity, x and y): stage drift, kept in the defect statistics (--keep-drift).", () => Drift(r), W, H)],
            () => [DefectStatisticsReport.SurvivalFigure(r)],
            () => DefectStatisticsReport.SweepFigure(r) is { } sweep ? [sweep] : [],
            () => MotionReport.Figures(r),
        };
        var parts = new List<Figure>[makers.Count];
        Parallel.For(0, makers.Count, i => parts[i] = makers[i]().ToList());
        var figures = new List<Figure>();
        foreach (var p in parts) figures.AddRange(p);
        return figures;
    }

    /// <summary>One plot rendered to PNG and disposed (Plot is IDisposable in ScottPlot 5; the bytes are a copy).</summary>
    private static Figure Single(string fileName, string caption, Func<Plot> draw, int width, int height)
    {
        using var plot = draw();
        return new Figure(fileName, caption, Png(plot, width, height));
    }

    /// <summary>The autocorrelation panels as one sheet, or nothing when there are no series.</summary>
    private static IEnumerable<Figure> AutocorrelationSheet(AnalysisResult r)
    {
        if (r.Dynamics.Series.Count == 0) return [];
        var panels = Autocorrelation(r);
        byte[] sheet;
        try { sheet = Grid(panels, 3, 480, 360); }
        finally { foreach (var panel in panels) panel.Dispose(); }
        return [new Figure(AnalysisFolder.AutocorrelationFigure, "Pooled autocorrelation of each quantity with its 95% band (points, shading) and the fitted model (line), whose correlation time is in the panel title. Dips below zero at long lags are the expected bias of subtracting each track's mean, which the model includes.",
            sheet)];
    }

    /// <summary>Saves figures into <paramref name="dir"/> under their file names.</summary>
    public static void Save(IEnumerable<Figure> figures, string dir)
    {
        foreach (var f in figures) File.WriteAllBytes(Path.Combine(dir, f.FileName), f.Png);
    }

    /// <summary>A plot rendered to PNG bytes.</summary>
    public static byte[] Png(Plot plot, int width, int height) => plot.GetImageBytes(width, height, ImageFormat.Png);

    /// <summary>Distribution of the mean headward speed per +1/2 defect track: defect displacement and cell flow at the core.</summary>
    public static Plot Headward(AnalysisResult r)
    {
        var plt = new Plot();
        var u = UnitScale.Of(r.Units);
        double sv = u.SpeedFactor;
        string unit = u.SpeedLabel;
        var plus = r.Defects.Tracks.Where(t => t.Charge == 0.5).ToList();
        var kin = plus.Where(t => double.IsFinite(t.HeadwardSpeed)).Select(t => t.HeadwardSpeed * sv).ToArray();
        var flow = plus.Where(t => double.IsFinite(t.FlowHeadwardSpeed)).Select(t => t.FlowHeadwardSpeed * sv).ToArray();
        var all = kin.Concat(flow).ToArray();
        if (all.Length > 0)
        {
            double lo = Math.Min(0, all.Min()), hi = Math.Max(0, all.Max());
            if (hi - lo < 1e-12) { lo -= 1; hi += 1; }
            int bins = Math.Clamp((int)Math.Ceiling(Math.Sqrt(all.Length)) + 2, 5, 30);
            double w = (hi - lo) / bins;
            void Hist(double[] v, string label, double shift)
            {
                if (v.Length == 0) return;
                var counts = new double[bins];
                foreach (var x in v) counts[Math.Min(bins - 1, (int)((x - lo) / w))]++;
                var pos = Enumerable.Range(0, bins).Select(b => lo + (b + 0.25 + shift) * w).ToArray();
                var bars = plt.Add.Bars(pos, counts);
                bars.LegendText = label;
                foreach (var bar in bars.Bars) bar.Size = 0.45 * w;
            }
            Hist(kin, $"defect displacement (mean {r.Defects.HeadwardSpeed.Value * sv:G3})", 0);
            Hist(flow, $"cell flow at the core (mean {r.Defects.FlowHeadwardSpeed.Value * sv:G3})", 0.5);
        }
        var zero = plt.Add.VerticalLine(0); zero.LinePattern = LinePattern.Dashed; zero.LegendText = "0: tailward <- | -> headward";
        plt.Title($"Headward speed per +1/2 defect track (n = {kin.Length})");
        plt.XLabel($"speed along e_head ({unit}; > 0 headward, extensile-like)");
        plt.YLabel("defect tracks");
        plt.ShowLegend(Alignment.UpperLeft);
        return plt;
    }

    /// <summary>The tissue's velocity u(t) per frame (x and y components) with its mean |u| (docs/defects.md#drift).</summary>
    public static Plot Drift(AnalysisResult r)
    {
        var plt = new Plot();
        var u = UnitScale.Of(r.Units);
        var d = r.Defects.Drift.Where(f => double.IsFinite(f.Ux) && double.IsFinite(f.Uy)).ToArray();
        if (d.Length > 0)
        {
            double[] t = d.Select(f => u.Time(f.Frame)).ToArray();
            var sx = plt.Add.Scatter(t, d.Select(f => u.Speed(f.Ux)).ToArray()); sx.LegendText = "u_x"; sx.MarkerSize = 4;
            var sy = plt.Add.Scatter(t, d.Select(f => u.Speed(f.Uy)).ToArray()); sy.LegendText = "u_y"; sy.MarkerSize = 4;
            plt.ShowLegend(Alignment.UpperRight);
        }
        var zero = plt.Add.HorizontalLine(0); zero.LinePattern = LinePattern.Dashed; zero.Color = Colors.Gray;
        plt.Title($"Tissue drift (median cell velocity): mean |u| {u.Speed(r.Defects.DriftSpeedPx):G3} {u.SpeedLabel}, {(r.Defects.DriftRemoved ? "removed" : "kept (--keep-drift)")}");
        plt.XLabel($"time ({u.TimeName})");
        plt.YLabel($"u ({u.SpeedLabel})");
        return plt;
    }

    /// <summary>Mean cell velocity (arrows) and director (bars) around +1/2 defects, in the defect's frame with e_head along +x.</summary>
    public static Plot DefectFlow(AnalysisResult r)
    {
        var plt = new Plot();
        var f = r.Defects.Flow;
        int side = 2 * f.Half + 1;
        double maxV = 0;
        for (int k = 0; k < f.Samples.Length; k++)
            if (f.Samples[k] > 0) maxV = Math.Max(maxV, Math.Sqrt(f.Vpar[k] * f.Vpar[k] + f.Vperp[k] * f.Vperp[k]));
        double arrowScale = maxV > 0 ? 0.9 * f.StepCoarse / maxV : 0;
        for (int b = -f.Half; b <= f.Half && f.Samples.Length > 0; b++)
            for (int a = -f.Half; a <= f.Half; a++)
            {
                int k = (b + f.Half) * side + a + f.Half;
                if (f.Samples[k] == 0) continue;
                double x = a * f.StepCoarse, y = b * f.StepCoarse;
                double th = 0.5 * Math.Atan2(f.Qxy[k], f.Qxx[k]), len = 0.35 * f.StepCoarse;
                var dl = plt.Add.Line(x - len * Math.Cos(th), y - len * Math.Sin(th), x + len * Math.Cos(th), y + len * Math.Sin(th));
                dl.Color = Colors.Gray; dl.LineWidth = 2;
                if (arrowScale > 0)
                {
                    var ar = plt.Add.Arrow(new Coordinates(x, y), new Coordinates(x + arrowScale * f.Vpar[k], y + arrowScale * f.Vperp[k]));
                    ar.ArrowFillColor = Colors.OrangeRed; ar.ArrowLineColor = Colors.OrangeRed;
                    ar.ArrowheadLength = 7; ar.ArrowheadWidth = 7; ar.ArrowWidth = 1.5f;
                }
            }
        var core = plt.Add.Marker(0, 0); core.Color = Colors.Black; core.Size = 12;
        var head = plt.Add.Arrow(new Coordinates(0, 0), new Coordinates(1, 0)); head.ArrowFillColor = Colors.Black; head.ArrowLineColor = Colors.Black;
        plt.Axes.SquareUnits();
        plt.Axes.InvertY();
        plt.Title($"Mean cell flow around +1/2 defects (head to +x)\nlongest arrow {UnitScale.Of(r.Units).Speed(maxV):G3} {UnitScale.Of(r.Units).SpeedLabel}; grey: director");
        plt.XLabel("along e_head (coarse widths)");
        plt.YLabel("across (coarse widths)");
        return plt;
    }

    private static readonly Dictionary<string, string> SeriesTitle = new()
    {
        ["q"] = "elongation q", ["theta"] = "orientation (cos 2 delta theta)", ["length"] = "length L",
        ["width"] = "width W", ["along"] = "pole sector (along)", ["across"] = "flank sector (across)",
    };

    /// <summary>One panel per series: pooled correlation with its 95% band, the fitted model, and the fitted time.</summary>
    public static List<Plot> Autocorrelation(AnalysisResult r)
    {
        var plots = new List<Plot>();
        var d = r.Dynamics; double dt = UnitScale.Of(r.Units).TimeFactor; string tu = UnitScale.Of(r.Units).TimeName;
        string[] order = ["q", "theta", "length", "width", "along", "across"];
        foreach (var name in order)
        {
            var s = d.Series.FirstOrDefault(x => x.Name == name);
            if (s is null) continue;
            plots.Add(AutocorrelationPanel(s, name, d, dt, tu));
        }
        return plots;
    }

    /// <summary>One autocorrelation panel: series <paramref name="s"/> with its band, model and fitted time (lags in <paramref name="tu"/>, <paramref name="dt"/> per frame).</summary>
    private static Plot AutocorrelationPanel(ShapeNoise.Dynamics.SeriesCorrelation s, string name, ShapeNoise.Dynamics.DynamicsResult d, double dt, string tu)
    {
        var plt = new Plot();
        var xs = Enumerable.Range(0, s.Correlation.Length).Select(k => k * dt).ToArray();
        var okBand = Enumerable.Range(0, xs.Length).Where(k => double.IsFinite(s.Low[k]) && double.IsFinite(s.High[k])).ToArray();
        if (okBand.Length > 1)
        {
            var band = plt.Add.FillY(okBand.Select(k => xs[k]).ToArray(), okBand.Select(k => s.Low[k]).ToArray(), okBand.Select(k => s.High[k]).ToArray());
            band.FillStyle.Color = Colors.SteelBlue.WithAlpha(0.25); band.LegendText = "95% band";
        }
        var data = plt.Add.ScatterPoints(xs, s.Correlation); data.LegendText = "pooled data"; data.Color = Colors.SteelBlue; data.MarkerSize = 5;
        var model = plt.Add.ScatterLine(xs, s.Model); model.LegendText = "fitted model"; model.Color = Colors.OrangeRed; model.LineWidth = 2;
        double tau = name switch
        {
            "q" => d.TauQFrames.Value,
            "theta" => d.TauThetaFrames.Value,
            _ => d.Coordinates.FirstOrDefault(c => c.Name == name)?.TauFrames.Value ?? double.NaN,
        };
        plt.Title($"{SeriesTitle[name]}: tau = {tau * dt:G3} {tu}");
        plt.XLabel($"lag ({tu})");
        plt.YLabel("correlation");
        plt.ShowLegend(Alignment.UpperRight);
        return plt;
    }

    /// <summary>Renders plots side by side into one PNG (SkiaSharp canvas, ScottPlot renders each panel).</summary>
    public static byte[] Grid(IReadOnlyList<Plot> plots, int columns, int panelWidth, int panelHeight)
    {
        int rows = (plots.Count + columns - 1) / columns;
        var info = new SkiaSharp.SKImageInfo(columns * panelWidth, rows * panelHeight);
        using var surface = SkiaSharp.SKSurface.Create(info);
        surface.Canvas.Clear(SkiaSharp.SKColors.White);
        for (int i = 0; i < plots.Count; i++)
        {
            // Each panel is rendered on its own (a plot clears the canvas it renders to), then placed on the sheet.
            using var panel = SkiaSharp.SKBitmap.Decode(plots[i].GetImageBytes(panelWidth, panelHeight, ImageFormat.Png));
            surface.Canvas.DrawBitmap(panel, (i % columns) * panelWidth, (i / columns) * panelHeight);
        }
        using var img = surface.Snapshot();
        using var png = img.Encode(SkiaSharp.SKEncodedImageFormat.Png, 100);
        return png.ToArray();
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
        plt.YLabel($"mode power p_n ({UnitScale.Of(r.Units).AreaLabel})");
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
        plt.XLabel($"var W ({UnitScale.Of(r.Units).AreaLabel})");
        plt.YLabel($"var L ({UnitScale.Of(r.Units).AreaLabel})");
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
        plt.YLabel($"mean_t n² ({UnitScale.Of(r.Units).AreaLabel})");
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
