using ShapeNoise.Tracking;
using ShapeNoise.Fluctuations;
using System.Globalization;
using CsvHelper;
using CsvHelper.Configuration;
using ShapeNoise.Pipeline;

namespace ShapeNoise.Reporting;

/// <summary>cells.csv: one row per analysed outline; the centroid in the run's length unit (X, Y) and in px (XPx, YPx,
/// the image's row/column frame, for overlays and tracks layers; docs/python.md#napari-tracks).</summary>
public sealed record CellRow(int Frame, double Time, int Label, int TrackId, bool InStatistics, double X, double Y, double Area,
    double Perimeter, double Length, double Width, double AspectRatio, double Elongation, double ThetaRad, double MeanRadius,
    double Mode2Amplitude, bool StarShaped, int Vertices, double XPx, double YPx);

/// <summary>tracks.csv: one row per track.</summary>
public sealed record TrackRow(int TrackId, int FirstFrame, int LastFrame, int Frames, double Duration, string End, bool InStatistics,
    double MeanArea, double MeanLength, double MeanWidth, double? VarL, double? VarW, double? VarAlongRaw, double? VarAcrossRaw,
    double? FloorAlong, double? FloorAcross, double? VarAlong, double? VarAcross, bool? BelowFloor);

/// <summary>spectrum.csv: pooled mode power per Fourier mode.</summary>
public sealed record SpectrumRow(int Mode, double PowerRaw, double Floor, double PowerCorrected);

/// <summary>profile.csv: pooled contour variance against the normal's angle from the long axis.</summary>
public sealed record ProfileRow(double AngleLowDeg, double AngleHighDeg, double AngleDeg, double VarianceRaw, double Floor, double VarianceCorrected);

/// <summary>One estimate of summary.json: its path, value and interval (empty unless ok), units, status, bound and reason.</summary>
public sealed record EstimateRow(string Estimate, double? Value, double? Low, double? High, int N, string? Unit, string Status, double? BoundValue, string? Reason);

/// <summary>Column names of estimates.csv.</summary>
public sealed class EstimateMap : ClassMap<EstimateRow>
{
    /// <summary>estimate, value, ci95_low, ci95_high, n, unit, status, bound_value, reason.</summary>
    public EstimateMap()
    {
        Map(r => r.Estimate).Name("estimate"); Map(r => r.Value).Name("value"); Map(r => r.Low).Name("ci95_low"); Map(r => r.High).Name("ci95_high");
        Map(r => r.N).Name("n"); Map(r => r.Unit).Name("unit"); Map(r => r.Status).Name("status"); Map(r => r.BoundValue).Name("bound_value"); Map(r => r.Reason).Name("reason");
    }
}

/// <summary>autocorrelation.csv: one row per series and lag (tidy, long format).</summary>
public sealed record CorrelationRow(string Series, int LagFrames, double Lag, double Correlation, long Pairs, double Low, double High, double Model);

internal sealed class CorrelationMap : ClassMap<CorrelationRow>
{
    public CorrelationMap(AnalysisColumns c)
    {
        Map(r => r.Series).Name("series"); Map(r => r.LagFrames).Name("lag_frames");
        if (c.Lag is null) Map(r => r.Lag).Ignore(); else Map(r => r.Lag).Name(c.Lag);
        Map(r => r.Correlation).Name("correlation"); Map(r => r.Pairs).Name("pairs");
        Map(r => r.Low).Name("ci95_low"); Map(r => r.High).Name("ci95_high"); Map(r => r.Model).Name("model");
    }
}

/// <summary>defects.csv: one row per defect per frame.</summary>
public sealed record DefectRow(int Frame, double Time, int DefectTrackId, double Charge, double X, double Y, double XPx, double YPx,
    double? HeadX, double? HeadY, double? Vx, double? Vy, double? HeadwardSpeed, double? FlowVx, double? FlowVy, double? FlowHeadwardSpeed, double Order);

internal sealed class DefectMap : ClassMap<DefectRow>
{
    public DefectMap(AnalysisColumns c)
    {
        Map(r => r.Frame).Name("frame"); Map(r => r.Time).Name(c.Time); Map(r => r.DefectTrackId).Name("defect_track_id");
        Map(r => r.Charge).Name("charge");
        if (c.DefectUm is { } um) { Map(r => r.X).Name(um.X); Map(r => r.Y).Name(um.Y); }
        else { Map(r => r.X).Ignore(); Map(r => r.Y).Ignore(); }
        Map(r => r.XPx).Name("x_px"); Map(r => r.YPx).Name("y_px");
        Map(r => r.HeadX).Name("head_x"); Map(r => r.HeadY).Name("head_y");
        Map(r => r.Vx).Name(c.Vx); Map(r => r.Vy).Name(c.Vy); Map(r => r.HeadwardSpeed).Name(c.HeadwardSpeed);
        Map(r => r.FlowVx).Name(c.FlowVx); Map(r => r.FlowVy).Name(c.FlowVy); Map(r => r.FlowHeadwardSpeed).Name(c.FlowHeadwardSpeed);
        Map(r => r.Order).Name("order");
    }
}

/// <summary>drift.csv: the tissue's velocity u(t) in one frame, in the run's speed unit and in px/frame (null where undefined).</summary>
public sealed record DriftRow(int Frame, double Time, double? Ux, double? Uy, double? UxPx, double? UyPx, int Cells);

internal sealed class DriftMap : ClassMap<DriftRow>
{
    public DriftMap(AnalysisColumns c)
    {
        Map(r => r.Frame).Name("frame"); Map(r => r.Time).Name(c.Time);
        if (c.DriftRun is { } run) { Map(r => r.Ux).Name(run.X); Map(r => r.Uy).Name(run.Y); }
        else { Map(r => r.Ux).Ignore(); Map(r => r.Uy).Ignore(); }
        Map(r => r.UxPx).Name("u_x_px_per_frame"); Map(r => r.UyPx).Name("u_y_px_per_frame");
        Map(r => r.Cells).Name("cells");
    }
}

/// <summary>defect-flow.csv: mean cell velocity and director around +1/2 defects in the defect's frame (head along +x).</summary>
public sealed record FlowRow(double XCoarse, double YCoarse, double X, double Y, double? VHead, double? VSide, double? Qxx, double? Qxy, int Samples);

internal sealed class FlowMap : ClassMap<FlowRow>
{
    public FlowMap(AnalysisColumns c)
    {
        Map(r => r.XCoarse).Name("x_coarse_widths"); Map(r => r.YCoarse).Name("y_coarse_widths");
        Map(r => r.X).Name(c.X); Map(r => r.Y).Name(c.Y);
        Map(r => r.VHead).Name(c.VHead); Map(r => r.VSide).Name(c.VSide);
        Map(r => r.Qxx).Name("qxx"); Map(r => r.Qxy).Name("qxy"); Map(r => r.Samples).Name("samples");
    }
}

internal sealed class CellMap : ClassMap<CellRow>
{
    public CellMap(AnalysisColumns c)
    {
        Map(r => r.Frame).Name("frame"); Map(r => r.Time).Name(c.Time); Map(r => r.Label).Name("label")
            .Convert(a => ((uint)a.Value.Label).ToString(CultureInfo.InvariantCulture));   // ids above 2^31 - 1 are stored bit for bit in int (TiffPages)
        Map(r => r.TrackId).Name("track_id"); Map(r => r.InStatistics).Name("in_statistics");
        Map(r => r.X).Name(c.X); Map(r => r.Y).Name(c.Y); Map(r => r.Area).Name(c.Area);
        Map(r => r.Perimeter).Name(c.Perimeter); Map(r => r.Length).Name(c.Length); Map(r => r.Width).Name(c.Width);
        Map(r => r.AspectRatio).Name("aspect_ratio"); Map(r => r.Elongation).Name("elongation_q"); Map(r => r.ThetaRad).Name("theta_rad");
        Map(r => r.MeanRadius).Name(c.MeanRadius); Map(r => r.Mode2Amplitude).Name(c.Mode2Amplitude);
        Map(r => r.StarShaped).Name("star_shaped"); Map(r => r.Vertices).Name("vertices");
        // x_px, y_px close the row when the run is in um (a run in px already has them as its x_px, y_px above).
        if (c.CellPx is { } px) { Map(r => r.XPx).Name(px.X); Map(r => r.YPx).Name(px.Y); }
        else { Map(r => r.XPx).Ignore(); Map(r => r.YPx).Ignore(); }
    }
}

internal sealed class TrackMap : ClassMap<TrackRow>
{
    public TrackMap(AnalysisColumns c)
    {
        Map(r => r.TrackId).Name("track_id"); Map(r => r.FirstFrame).Name("first_frame"); Map(r => r.LastFrame).Name("last_frame");
        Map(r => r.Frames).Name("frames"); Map(r => r.Duration).Name(c.Duration); Map(r => r.End).Name("end");
        Map(r => r.InStatistics).Name("in_statistics"); Map(r => r.MeanArea).Name(c.MeanArea);
        Map(r => r.MeanLength).Name(c.MeanLength); Map(r => r.MeanWidth).Name(c.MeanWidth);
        Map(r => r.VarL).Name(c.VarL); Map(r => r.VarW).Name(c.VarW);
        Map(r => r.VarAlongRaw).Name(c.VarAlongRaw); Map(r => r.VarAcrossRaw).Name(c.VarAcrossRaw);
        Map(r => r.FloorAlong).Name(c.FloorAlong); Map(r => r.FloorAcross).Name(c.FloorAcross);
        Map(r => r.VarAlong).Name(c.VarAlong); Map(r => r.VarAcross).Name(c.VarAcross);
        Map(r => r.BelowFloor).Name("below_floor");
    }
}

internal sealed class SpectrumMap : ClassMap<SpectrumRow>
{
    public SpectrumMap(AnalysisColumns c)
    {
        Map(r => r.Mode).Name("mode"); Map(r => r.PowerRaw).Name(c.PowerRaw);
        Map(r => r.Floor).Name(c.Floor); Map(r => r.PowerCorrected).Name(c.PowerCorrected);
    }
}

internal sealed class ProfileMap : ClassMap<ProfileRow>
{
    public ProfileMap(AnalysisColumns c)
    {
        Map(r => r.AngleLowDeg).Name("normal_angle_low_deg"); Map(r => r.AngleHighDeg).Name("normal_angle_high_deg");
        Map(r => r.AngleDeg).Name("normal_angle_deg"); Map(r => r.VarianceRaw).Name(c.VarianceRaw);
        Map(r => r.Floor).Name(c.Floor); Map(r => r.VarianceCorrected).Name(c.VarianceCorrected);
    }
}

/// <summary>Builds the tidy tables of an analysis in the run's units (factors from <see cref="UnitScale"/>; column names from <see cref="AnalysisColumns"/>).</summary>
public static class Tables
{
    /// <summary>cells.csv rows, produced lazily (a large movie has hundreds of thousands).</summary>
    public static IEnumerable<CellRow> Cells(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        double s = u.LengthFactor, s2 = u.AreaFactor, dt = u.TimeFactor;
        var used = new HashSet<int>();
        foreach (var t in r.Tracks) if (t.Used) used.Add(t.Id);
        foreach (var c in r.Cells)
        {
            var sh = c.Shape;
            double th = Math.IEEERemainder(c.ThetaContinuousRad, Math.PI);
            if (th <= -Math.PI / 2) th += Math.PI;
            yield return new CellRow(c.Frame, c.Frame * dt, c.Label, c.TrackId, used.Contains(c.TrackId), sh.CentroidX * s, sh.CentroidY * s,
                sh.AreaPx2 * s2, sh.PerimeterPx * s, sh.LengthPx * s, sh.WidthPx * s, sh.AspectRatio, sh.Elongation, th,
                c.MeanRadiusPx * s, c.Mode2AmplitudePx * s, c.StarShaped, c.Vertices, sh.CentroidX, sh.CentroidY);
        }
    }

    /// <summary>tracks.csv rows, one per track in track order: duration (time unit), mean area, length and width (area and length units), var_L, var_W minus the floor reference's, and contour variances with their noise floors, corrected = raw - floor (area unit); null where undefined.</summary>
    public static List<TrackRow> Tracks(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        double s = u.LengthFactor, s2 = u.AreaFactor, dt = u.TimeFactor;
        var fr = r.FloorReference;
        var rows = new List<TrackRow>(r.Tracks.Count);
        foreach (var t in r.Tracks)
        {
            var c = t.Contour;
            double? fa = c is null ? null : NoiseFloor.AlongOf(c, fr) * s2, fc = c is null ? null : NoiseFloor.AcrossOf(c, fr) * s2;
            double? ar = c?.VarAlongRaw * s2, cr = c?.VarAcrossRaw * s2;
            double? vL = double.IsFinite(t.VarLPx2) ? (t.VarLPx2 - (fr?.VarLPx2 ?? 0)) * s2 : null;
            double? vW = double.IsFinite(t.VarWPx2) ? (t.VarWPx2 - (fr?.VarWPx2 ?? 0)) * s2 : null;
            rows.Add(new TrackRow(t.Id, t.FirstFrame, t.LastFrame, t.Frames, (t.LastFrame - t.FirstFrame) * dt, EndName(t.End), t.Used,
                t.AreaPx2.Average() * s2, t.LengthPx.Average() * s, t.WidthPx.Average() * s, vL, vW, ar, cr, fa, fc,
                ar - fa, cr - fc, c is null ? null : (ar - fa <= 0 || cr - fc <= 0)));
        }
        return rows;
    }

    /// <summary>The tracks.csv name of a track end: movie_end, lost, border, too_small, division or merge.</summary>
    public static string EndName(TrackEnd e) => e switch
    {
        TrackEnd.MovieEnd => "movie_end", TrackEnd.Lost => "lost", TrackEnd.Border => "border", TrackEnd.Small => "too_small",
        TrackEnd.Division => "division", TrackEnd.Merge => "merge", _ => e.ToString().ToLowerInvariant(),
    };

    /// <summary>spectrum.csv rows for modes n = 2..M/2: pooled mode power p_n, the noise floor per mode and p_n - floor (area unit).</summary>
    public static List<SpectrumRow> Spectrum(AnalysisResult r)
    {
        double s2 = UnitScale.Of(r.Units).AreaFactor;
        var p = r.Pooled;
        var rows = new List<SpectrumRow>();
        for (int n = 2; n < p.ModePowerRaw.Length; n++)
            rows.Add(new SpectrumRow(n, p.ModePowerRaw[n] * s2, p.FloorPerMode * s2, (p.ModePowerRaw[n] - p.FloorPerMode) * s2));
        return rows;
    }

    /// <summary>profile.csv rows, one per bin of the normal's angle from the long axis over 0..90 deg: raw contour variance, floor and raw - floor (area unit).</summary>
    public static List<ProfileRow> Profile(AnalysisResult r)
    {
        double s2 = UnitScale.Of(r.Units).AreaFactor;
        var p = r.Pooled;
        int bins = p.ProfileBinCentreDeg.Length;
        double width = 90.0 / bins;
        var rows = new List<ProfileRow>();
        for (int b = 0; b < bins; b++)
            rows.Add(new ProfileRow(b * width, (b + 1) * width, p.ProfileBinCentreDeg[b], p.ProfileRaw[b] * s2, p.ProfileFloor[b] * s2, p.ProfileCorrected[b] * s2));
        return rows;
    }

    /// <summary>autocorrelation.csv rows, one per series and lag k = 0..K: lag in frames and in the time unit (k dt), pooled correlation, pair count, 95% band and fitted model.</summary>
    public static List<CorrelationRow> Correlations(AnalysisResult r)
    {
        double dt = UnitScale.Of(r.Units).TimeFactor;
        var rows = new List<CorrelationRow>();
        foreach (var s in r.Dynamics.Series)
            for (int k = 0; k < s.Correlation.Length; k++)
                rows.Add(new CorrelationRow(s.Name, k, k * dt, s.Correlation[k], s.Pairs[k], s.Low[k], s.High[k], s.Model[k]));
        return rows;
    }

    static double? N(double v) => double.IsFinite(v) ? v : null;

    /// <summary>defects.csv rows, one per defect observation: position (length unit and px), charge, head direction, defect velocity, flow velocity and headward speeds (speed unit), order S; null where undefined.</summary>
    public static List<DefectRow> Defects(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        double s = u.LengthFactor, dt = u.TimeFactor, sv = u.SpeedFactor;
        return r.Defects.Observations.Select(o => new DefectRow(o.Frame, o.Frame * dt, o.TrackId, o.Defect.Charge, o.Defect.X * s, o.Defect.Y * s,
            o.Defect.X, o.Defect.Y, N(o.Defect.HeadX), N(o.Defect.HeadY), N(o.Vx * sv), N(o.Vy * sv), N(o.HeadwardSpeed * sv),
            N(o.FlowVx * sv), N(o.FlowVy * sv), N(o.FlowHeadwardSpeed * sv), o.Defect.Order)).ToList();
    }

    /// <summary>drift.csv rows, one per frame of the defect stage: the tissue's velocity u(t) (median cell velocity,
    /// docs/defects.md#drift) in the speed unit and in px/frame, and the cells it is the median of.</summary>
    public static List<DriftRow> Drift(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        double dt = u.TimeFactor, sv = u.SpeedFactor;
        return r.Defects.Drift.Select(d => new DriftRow(d.Frame, d.Frame * dt, N(d.Ux * sv), N(d.Uy * sv), N(d.Ux), N(d.Uy), d.Cells)).ToList();
    }

    /// <summary>defect-flow.csv rows: the mean flow (v_par along e_head, v_perp across; speed unit) and mean Qxx, Qxy on the grid about +1/2 defects, position in coarse widths and in the length unit; empty when no defect was sampled.</summary>
    public static List<FlowRow> DefectFlow(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        var f = r.Defects.Flow; double s = u.LengthFactor, sv = u.SpeedFactor, c = r.Defects.CoarsePx;
        var rows = new List<FlowRow>();
        int side = 2 * f.Half + 1;
        if (f.Samples.Length == 0) return rows;
        for (int b = -f.Half; b <= f.Half; b++)
            for (int a = -f.Half; a <= f.Half; a++)
            {
                int k = (b + f.Half) * side + a + f.Half;
                rows.Add(new FlowRow(a * f.StepCoarse, b * f.StepCoarse, a * f.StepCoarse * c * s, b * f.StepCoarse * c * s,
                    N(f.Vpar[k] * sv), N(f.Vperp[k] * sv), N(f.Qxx[k]), N(f.Qxy[k]), f.Samples[k]));
            }
        return rows;
    }

    /// <summary>estimates.csv rows: every estimate object of <paramref name="summary"/> (an object with "n" and "status"),
    /// named by its path ("dynamics.tau_q"), in document order; value and interval empty unless the status is ok.</summary>
    public static List<EstimateRow> Estimates(System.Text.Json.Nodes.JsonObject summary)
    {
        var rows = new List<EstimateRow>();
        void Walk(System.Text.Json.Nodes.JsonNode? n, string path)
        {
            if (n is System.Text.Json.Nodes.JsonObject o)
            {
                if (o.ContainsKey("status") && o.ContainsKey("n"))
                {
                    double? D(System.Text.Json.Nodes.JsonNode? x) => x?.GetValue<double>();
                    var ci = o["ci95"] as System.Text.Json.Nodes.JsonArray;
                    rows.Add(new EstimateRow(path, D(o["value"]), D(ci?[0]), D(ci?[1]), o["n"]!.GetValue<int>(), o["unit"]?.GetValue<string>(),
                        o["status"]!.GetValue<string>(), D(o["bound_value"]), o["reason"]?.GetValue<string>()));
                    return;
                }
                foreach (var kv in o) Walk(kv.Value, path.Length == 0 ? kv.Key : $"{path}.{kv.Key}");
            }
            else if (n is System.Text.Json.Nodes.JsonArray a)
                for (int i = 0; i < a.Count; i++) Walk(a[i], $"{path}[{i}]");
        }
        Walk(summary, "");
        return rows;
    }

    /// <summary>Writes rows as UTF-8 comma-separated values with a header, through a CsvHelper class map.</summary>
    public static void Write<T>(string path, IEnumerable<T> rows, ClassMap<T> map)
    {
        using var w = new StreamWriter(path, false, new System.Text.UTF8Encoding(false));
        using var csv = new CsvWriter(w, new CsvConfiguration(CultureInfo.InvariantCulture));
        csv.Context.RegisterClassMap(map);
        csv.WriteRecords(rows);
    }

    /// <summary>Writes cells, tracks, spectrum, profile, autocorrelation, defects, defect-flow and drift tables into <paramref name="dir"/> in the run's units.</summary>
    public static void WriteAll(AnalysisResult r, string dir)
    {
        var c = AnalysisFolder.Columns(UnitScale.Of(r.Units));
        CellsCsv.Write(Path.Combine(dir, AnalysisFolder.Cells), Cells(r), c);
        Write(Path.Combine(dir, AnalysisFolder.Tracks), Tracks(r), new TrackMap(c));
        Write(Path.Combine(dir, AnalysisFolder.Spectrum), Spectrum(r), new SpectrumMap(c));
        Write(Path.Combine(dir, AnalysisFolder.Profile), Profile(r), new ProfileMap(c));
        Write(Path.Combine(dir, AnalysisFolder.Autocorrelation), Correlations(r), new CorrelationMap(c));
        Write(Path.Combine(dir, AnalysisFolder.Defects), Defects(r), new DefectMap(c));
        Write(Path.Combine(dir, AnalysisFolder.DefectFlow), DefectFlow(r), new FlowMap(c));
        Write(Path.Combine(dir, AnalysisFolder.Drift), Drift(r), new DriftMap(c));
        MotionReport.WriteTables(r, dir);
        DefectStatisticsReport.WriteTables(r, dir);
    }
}
