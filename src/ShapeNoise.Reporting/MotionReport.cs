using System.Text.Json.Nodes;
using CsvHelper.Configuration;
using ScottPlot;
using ShapeNoise.Motion;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using Figure = ShapeNoise.Pipeline.Figure;

namespace ShapeNoise.Reporting;

/// <summary>velocity-correlation.csv: the radial correlations of the velocity fluctuation, the vorticity and Q (docs/motion.md).</summary>
public sealed record VelocityCorrelationRow(int Bin, double RPx, double R, double? Cvv, double? Cww, double? Cqq, long Pairs);

/// <summary>motion.csv: one row per frame (docs/motion.md): polar order (raw velocities), mean and rms speed (drift removed),
/// tissue velocity, enstrophy and mean nematic order of the coarse field.</summary>
public sealed record MotionFrameRow(int Frame, double Time, int Cells, double? PolarOrder, double? MeanSpeed, double? RmsSpeed,
    double? DriftVx, double? DriftVy, double? Enstrophy, double? MeanOrder);

/// <summary>velocity-autocorrelation.csv: the cells' temporal velocity autocorrelation per lag.</summary>
public sealed record VelocityLagRow(int LagFrames, double Lag, double? Correlation);

/// <summary>The outputs of the collective-motion stage: summary keys, tables and figures (docs/motion.md).</summary>
public static class MotionReport
{
    /// <summary>Every motion estimate of a run with its measure (px and frames; scale with <see cref="UnitScale.Of(UnitKind, Estimate)"/>).</summary>
    public static List<(Measure Measure, Estimate Estimate)> Estimates(MotionResult m) =>
    [
        (Measures.PolarOrder, m.PolarOrder), (Measures.MeanSpeed, m.MeanSpeed), (Measures.RmsSpeed, m.RmsSpeed),
        (Measures.VelocityCorrelationLength, m.VelocityCorrelationLength), (Measures.VelocityCorrelationLength1e, m.VelocityCorrelationLength1e),
        (Measures.VorticityCorrelationLength, m.VorticityCorrelationLength), (Measures.Enstrophy, m.Enstrophy),
        (Measures.VelocityAutocorrelationTime, m.VelocityAutocorrelationTime), (Measures.NematicCorrelationLength, m.NematicCorrelationLength),
    ];

    /// <summary>Adds the motion keys of summary.json (docs/motion.md): one estimate object per measure in the run's units,
    /// the mean nematic order, the correlation grid spacing and the time-block length.</summary>
    public static void AddTo(JsonObject summary, AnalysisResult r)
    {
        var us = UnitScale.Of(r.Units); var m = r.Motion;
        foreach (var (measure, e) in Estimates(m)) summary[measure.Name] = Summary.Interval(us.Of(measure.Kind, e));
        summary["mean_nematic_order"] = Summary.Interval(m.MeanOrder);
        summary["motion_grid_spacing"] = double.IsFinite(m.CorrelationSpacingPx) ? us.Length(m.CorrelationSpacingPx) : null;
        summary["motion_time_block_frames"] = m.BlockFrames;
        summary["motion_fields_reason"] = m.FieldNotApplicableReason ?? "";
    }

    /// <summary>velocity-correlation.csv rows: one per radial bin, r in px and in the length unit.</summary>
    public static List<VelocityCorrelationRow> Correlations(AnalysisResult r)
    {
        var m = r.Motion; double s = UnitScale.Of(r.Units).LengthFactor;
        var rows = new List<VelocityCorrelationRow>();
        for (int b = 0; b < m.Velocity.R.Length; b++)
            rows.Add(new VelocityCorrelationRow(b, m.Velocity.R[b], m.Velocity.R[b] * s, N(m.Velocity.C[b]), N(At(m.Vorticity.C, b)), N(At(m.Nematic.C, b)), m.Velocity.Pairs[b]));
        return rows;
    }

    /// <summary>motion.csv rows, one per frame, in the run's units.</summary>
    public static List<MotionFrameRow> Frames(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        return r.Motion.Frames.Select(f => new MotionFrameRow(f.Frame, u.Time(f.Frame), f.Cells, N(f.PolarOrder), N(u.Speed(f.MeanSpeedPx)),
            N(u.Speed(f.RmsSpeedPx)), N(u.Speed(f.DriftVx)), N(u.Speed(f.DriftVy)), N(f.Enstrophy * u.PerTimeSquaredFactor), N(f.MeanOrder))).ToList();
    }

    /// <summary>velocity-autocorrelation.csv rows, lag 0 .. --max-lag.</summary>
    public static List<VelocityLagRow> Lags(AnalysisResult r)
    {
        double dt = UnitScale.Of(r.Units).TimeFactor;
        var c = r.Motion.VelocityAutocorrelation;
        return Enumerable.Range(0, c.Length).Select(k => new VelocityLagRow(k, k * dt, N(c[k]))).ToList();
    }

    /// <summary>Writes the three motion tables into <paramref name="dir"/>.</summary>
    public static void WriteTables(AnalysisResult r, string dir)
    {
        var u = UnitScale.Of(r.Units);
        Tables.Write(Path.Combine(dir, AnalysisFolder.VelocityCorrelation), Correlations(r), new CorrelationMap(u));
        Tables.Write(Path.Combine(dir, AnalysisFolder.Motion), Frames(r), new FrameMap(u));
        Tables.Write(Path.Combine(dir, AnalysisFolder.VelocityAutocorrelation), Lags(r), new LagMap(u));
    }

    private static double At(double[] a, int i) => i < a.Length ? a[i] : double.NaN;
    private static double? N(double v) => double.IsFinite(v) ? v : null;

    private sealed class CorrelationMap : ClassMap<VelocityCorrelationRow>
    {
        public CorrelationMap(UnitScale u)
        {
            Map(x => x.Bin).Name("bin"); Map(x => x.RPx).Name("r_px");
            if (u.PixelSizeKnown) Map(x => x.R).Name($"r_{u.LengthName}"); else Map(x => x.R).Ignore();
            Map(x => x.Cvv).Name("c_vv"); Map(x => x.Cww).Name("c_ww"); Map(x => x.Cqq).Name("c_qq"); Map(x => x.Pairs).Name("pairs");
        }
    }

    private sealed class FrameMap : ClassMap<MotionFrameRow>
    {
        public FrameMap(UnitScale u)
        {
            Map(x => x.Frame).Name("frame"); Map(x => x.Time).Name($"time_{u.TimeSuffix}"); Map(x => x.Cells).Name("cells");
            Map(x => x.PolarOrder).Name("polar_order"); Map(x => x.MeanSpeed).Name($"mean_speed_{u.SpeedSuffix}");
            Map(x => x.RmsSpeed).Name($"rms_speed_{u.SpeedSuffix}"); Map(x => x.DriftVx).Name($"drift_vx_{u.SpeedSuffix}");
            Map(x => x.DriftVy).Name($"drift_vy_{u.SpeedSuffix}"); Map(x => x.Enstrophy).Name($"enstrophy_per_{u.TimeName}2");
            Map(x => x.MeanOrder).Name("mean_nematic_order");
        }
    }

    private sealed class LagMap : ClassMap<VelocityLagRow>
    {
        public LagMap(UnitScale u)
        {
            Map(x => x.LagFrames).Name("lag_frames");
            if (u.FrameIntervalKnown) Map(x => x.Lag).Name($"lag_{u.TimeSuffix}"); else Map(x => x.Lag).Ignore();
            Map(x => x.Correlation).Name("correlation");
        }
    }

    /// <summary>The motion figures: correlations with their lengths marked, polar order over time, and the vorticity map of
    /// the middle frame with its defects (when the fields apply).</summary>
    public static List<Figure> Figures(AnalysisResult r)
    {
        var list = new List<Figure>();
        using (var c = CorrelationPlot(r))
            list.Add(new(AnalysisFolder.VelocityCorrelationFigure, "Spatial correlation of the velocity fluctuation (C_vv), of the vorticity (C_ww) and of the cell nematic tensor (C_QQ) against distance, averaged over directions and frames; dashed lines mark the velocity correlation lengths (first zero: the vortex size; 1/e).", ReportingPng(c)));
        using (var p = PolarOrderPlot(r))
            list.Add(new(AnalysisFolder.PolarOrderFigure, "Polar order of the cell velocities per frame, before drift removal: 1 when every cell moves the same way (a flock), near 0 for swirls.", ReportingPng(p)));
        if (r.Motion.VorticitySnapshot is { } map)
            using (var v = VorticityPlot(r, map))
                list.Add(new(AnalysisFolder.VorticityFigure, $"Vorticity of the coarse-grained velocity field in frame {map.Frame} (red: counter-clockwise, blue: clockwise), with that frame's +1/2 (circles) and −1/2 (triangles) defects.", Reporting.Figures.Png(v, 640, 640)));
        return list;
    }

    private static byte[] ReportingPng(Plot p) => Reporting.Figures.Png(p, 720, 480);

    private static Plot CorrelationPlot(AnalysisResult r)
    {
        var plt = new Plot(); var m = r.Motion; var u = UnitScale.Of(r.Units);
        void Curve(RadialCorrelation c, string label)
        {
            var idx = Enumerable.Range(0, c.C.Length).Where(b => double.IsFinite(c.C[b])).ToArray();
            if (idx.Length == 0) return;
            var s = plt.Add.Scatter(idx.Select(b => u.Length(c.R[b])).ToArray(), idx.Select(b => c.C[b]).ToArray());
            s.LegendText = label; s.MarkerSize = 3;
        }
        Curve(m.Velocity, "C_vv (velocity)"); Curve(m.Vorticity, "C_ww (vorticity)"); Curve(m.Nematic, "C_QQ (nematic)");
        foreach (var (e, name) in new[] { (m.VelocityCorrelationLength, "first zero"), (m.VelocityCorrelationLength1e, "1/e") })
            if (e.IsOk) { var l = plt.Add.VerticalLine(u.Length(e.Value)); l.LinePattern = LinePattern.Dashed; l.LegendText = $"{name}: {HtmlReport.Round(u.Length(e.Value))} {u.LengthName}"; }
        var zero = plt.Add.HorizontalLine(0); zero.Color = Colors.Gray;
        plt.Title(m.FieldNotApplicableReason is null ? "Spatial correlations" : $"Spatial correlations not applicable: {m.FieldNotApplicableReason}");
        plt.XLabel($"distance r ({u.LengthName})"); plt.YLabel("correlation");
        plt.ShowLegend(Alignment.UpperRight);
        return plt;
    }

    private static Plot PolarOrderPlot(AnalysisResult r)
    {
        var plt = new Plot(); var u = UnitScale.Of(r.Units);
        var f = r.Motion.Frames.Where(x => double.IsFinite(x.PolarOrder)).ToArray();
        if (f.Length > 0) { var s = plt.Add.Scatter(f.Select(x => u.Time(x.Frame)).ToArray(), f.Select(x => x.PolarOrder).ToArray()); s.MarkerSize = 4; }
        plt.Axes.SetLimitsY(0, 1.05);
        plt.Title($"Polar order of motion: {EstimateText.Value(r.Motion.PolarOrder)} ({EstimateText.Interval(r.Motion.PolarOrder)})");
        plt.XLabel($"time ({u.TimeName})"); plt.YLabel("polar order phi");
        return plt;
    }

    private static Plot VorticityPlot(AnalysisResult r, VorticityMap map)
    {
        var plt = new Plot(); var u = UnitScale.Of(r.Units);
        var z = new double[map.Ny, map.Nx];
        double max = 0;
        foreach (var w in map.Omega) if (double.IsFinite(w)) max = Math.Max(max, Math.Abs(w));
        double perTime = 1 / u.TimeFactor;
        for (int j = 0; j < map.Ny; j++) for (int i = 0; i < map.Nx; i++) z[j, i] = map.Omega[j * map.Nx + i] * perTime;   // heatmap row 0 is drawn at the top, like the image's row 0
        max *= perTime;
        var hm = plt.Add.Heatmap(z);
        hm.Colormap = new ScottPlot.Colormaps.Balance();
        hm.Extent = new CoordinateRect(0, u.Length(map.Nx * map.SpacingPx), 0, u.Length(map.Ny * map.SpacingPx));
        if (max > 0) hm.ManualRange = new ScottPlot.Range(-max, max);
        foreach (var o in r.Defects.Observations.Where(o => o.Frame == map.Frame))
        {
            var mk = plt.Add.Marker(u.Length(o.Defect.X), u.Length(map.Ny * map.SpacingPx - o.Defect.Y));
            mk.Shape = o.Defect.Charge > 0 ? MarkerShape.OpenCircle : MarkerShape.OpenTriangleUp; mk.Size = 12; mk.Color = Colors.Black;
        }
        plt.Add.ColorBar(hm);
        plt.Title($"Vorticity, frame {map.Frame} (1/{u.TimeName})");
        plt.XLabel($"x ({u.LengthName})"); plt.YLabel($"y ({u.LengthName}, from the image bottom)");
        return plt;
    }

    /// <summary>The headline sentence on collective motion: polar order, rms speed and the velocity correlation length, each
    /// as its status allows (docs/statistics.md#estimate-status).</summary>
    public static string Sentence(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units); var m = r.Motion;
        string Say(Estimate e, string unit) => e.IsOk ? $"{EstimateText.Value(e, unit)} ({EstimateText.Interval(e)})" : EstimateText.Phrase(e, unit);
        return $"Cell motion: polar order {Say(m.PolarOrder, "")} (1: all cells move one way; near 0: swirls); rms speed about the frame mean "
            + $"{Say(u.Speed(m.RmsSpeed), u.SpeedLabel)}; velocity correlation length (first zero of C_vv) {Say(u.Of(UnitKind.Length, m.VelocityCorrelationLength), u.LengthName)}.";
    }

    /// <summary>The report's table of every motion and defect-statistics estimate: measure, value, 95% interval, n and status.</summary>
    public static string HtmlTable(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        var sb = new System.Text.StringBuilder("<table>\n<tr><th>measure</th><th>value</th><th>95% interval</th><th>n</th><th>status</th></tr>\n");
        var rows = Estimates(r.Motion);
        if (r.DefectStatistics is { } ds) rows.AddRange(DefectStatisticsReport.Estimates(ds));
        foreach (var (measure, e0) in rows)
        {
            var e = u.Of(measure.Kind, e0);
            string unit = measure.Kind == UnitKind.Ratio ? "" : u.Label(measure.Kind);
            sb.Append("<tr><td>").Append(System.Net.WebUtility.HtmlEncode(measure.Label(u))).Append("</td><td>")
              .Append(System.Net.WebUtility.HtmlEncode(e.IsOk ? EstimateText.Value(e, unit) : EstimateText.Phrase(e, unit))).Append("</td><td>")
              .Append(e.IsOk ? $"{HtmlReport.Round(e.Low)}–{HtmlReport.Round(e.High)}" : "—").Append("</td><td>")
              .Append(System.Net.WebUtility.HtmlEncode(EstimateText.Units(e))).Append("</td><td>").Append(Summary.StatusName(e.Status)).Append("</td></tr>\n");
        }
        return sb.Append("</table>\n").ToString();
    }
}
