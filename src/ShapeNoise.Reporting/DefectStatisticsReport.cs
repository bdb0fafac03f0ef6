using System.Text.Json.Nodes;
using CsvHelper.Configuration;
using ScottPlot;
using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using Figure = ShapeNoise.Pipeline.Figure;

namespace ShapeNoise.Reporting;

/// <summary>defect-tracks.csv: one row per defect track: span, lifetime, censoring and creation / annihilation partners.</summary>
public sealed record DefectTrackRow(int DefectTrackId, double Charge, int FirstFrame, int LastFrame, int LifetimeFrames, double Lifetime,
    bool Censored, string CensoringReason, int CreatedWith, int AnnihilatedWith);

/// <summary>defect-survival.csv: the Kaplan-Meier curve of the defect lifetimes, one row per distinct time.</summary>
public sealed record SurvivalRow(double TimeFrames, double Time, int AtRisk, int Events, int Censored, double Survival, double StandardError, double Low, double High);

/// <summary>defect-msd.csv: mean-squared displacement of +1/2 defects relative to the tissue per lag.</summary>
public sealed record MsdRow(int LagFrames, double Lag, double Msd, int Pairs, int Tracks);

/// <summary>coarse-sweep.csv: the defect picture at one coarse width of --coarse-sweep.</summary>
public sealed record CoarseSweepRow(string Width, double CoarseWidth, double PlusPerFrame, double MinusPerFrame, double? PlusDensity,
    double? HeadwardSpeed, double? HeadwardLow, double? HeadwardHigh, int N, string Status);

/// <summary>The outputs of the defect statistics (docs/motion.md#defect-statistics): summary keys, tables and the survival figure.</summary>
public static class DefectStatisticsReport
{
    /// <summary>The compared defect-statistics estimates with their measures (px, frames).</summary>
    public static List<(Measure Measure, Estimate Estimate)> Estimates(DefectStatisticsResult d) =>
    [
        (Measures.PlusHalfDensity, d.PlusDensityPerPx2), (Measures.MinusHalfDensity, d.MinusDensityPerPx2), (Measures.DefectLifetime, d.LifetimeFrames),
        (Measures.DefectCreationRate, d.CreationRatePerPx2Frame), (Measures.DefectAnnihilationRate, d.AnnihilationRatePerPx2Frame),
    ];

    /// <summary>Adds the defect-statistics keys of summary.json in the run's units.</summary>
    public static void AddTo(JsonObject summary, AnalysisResult r)
    {
        if (r.DefectStatistics is not { } d) return;
        var us = UnitScale.Of(r.Units);
        foreach (var (measure, e) in Estimates(d)) summary[measure.Name] = Summary.Interval(us.Of(measure.Kind, e));
        summary["defect_net_charge"] = Summary.Interval(d.NetChargePerFrame);          // (N+ - N-) / 2 per frame
        summary["plus_half_msd_exponent"] = Summary.Interval(d.PlusMsdExponent);
        summary["defect_creations"] = d.Creations;
        summary["defect_annihilations"] = d.Annihilations;
        summary["defect_search_area"] = us.Area(d.SearchAreaPx2);
        if (r.CoarseSweep.Count > 0) summary["coarse_sweep"] = SweepJson(r);   // docs/motion.md#coarse-width-sweep
    }

    /// <summary>Writes defect-tracks.csv, defect-survival.csv and defect-msd.csv into <paramref name="dir"/>.</summary>
    public static void WriteTables(AnalysisResult r, string dir)
    {
        var u = UnitScale.Of(r.Units); var d = r.DefectStatistics;
        double dt = u.TimeFactor;
        var tracks = d is null ? [] : d.Tracks.Select(t => new DefectTrackRow(t.TrackId, t.Charge, t.FirstFrame, t.LastFrame, t.LifetimeFrames,
            t.LifetimeFrames * dt, t.Censored, t.CensoringReason, t.CreatedWithTrack, t.AnnihilatedWithTrack)).ToList();
        var survival = d is null ? [] : d.Survival.Steps.Select(s => new SurvivalRow(s.Time, s.Time * dt, s.AtRisk, s.Events, s.Censored,
            s.Survival, s.StandardError, s.Low, s.High)).ToList();
        var msd = d is null ? [] : d.PlusMsd.Select(m => new MsdRow(m.LagFrames, m.LagFrames * dt, u.Area(m.MsdPx2), m.Pairs, m.Tracks)).ToList();
        Tables.Write(Path.Combine(dir, AnalysisFolder.DefectTracks), tracks, new TrackMap(u));
        Tables.Write(Path.Combine(dir, AnalysisFolder.DefectSurvival), survival, new SurvivalMap(u));
        Tables.Write(Path.Combine(dir, AnalysisFolder.DefectMsd), msd, new MsdMap(u));
        if (r.CoarseSweep.Count > 0) Tables.Write(Path.Combine(dir, AnalysisFolder.CoarseSweep), SweepRows(r), new SweepMap(u));
    }

    /// <summary>coarse-sweep.csv rows in the run's units (the speed's value and interval only when ok).</summary>
    public static List<CoarseSweepRow> SweepRows(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        return r.CoarseSweep.Select(p =>
        {
            var h = u.Speed(p.HeadwardSpeed);
            return new CoarseSweepRow(p.Width.ToString(), u.Length(p.CoarsePx), p.PlusPerFrame, p.MinusPerFrame,
                double.IsFinite(p.PlusDensityPerPx2) ? p.PlusDensityPerPx2 * u.DensityFactor : null,
                h.IsOk ? h.Value : null, h.IsOk ? h.Low : null, h.IsOk ? h.High : null, h.N, Summary.StatusName(h.Status));
        }).ToList();
    }

    private sealed class SweepMap : ClassMap<CoarseSweepRow>
    {
        public SweepMap(UnitScale u)
        {
            Map(x => x.Width).Name("coarse_width_option"); Map(x => x.CoarseWidth).Name($"coarse_width_{u.LengthName}");
            Map(x => x.PlusPerFrame).Name("plus_half_per_frame"); Map(x => x.MinusPerFrame).Name("minus_half_per_frame");
            Map(x => x.PlusDensity).Name($"plus_half_density_per_1000_{u.AreaSuffix}");
            Map(x => x.HeadwardSpeed).Name($"defect_headward_speed_{u.SpeedSuffix}"); Map(x => x.HeadwardLow).Name("ci95_low");
            Map(x => x.HeadwardHigh).Name("ci95_high"); Map(x => x.N).Name("n"); Map(x => x.Status).Name("status");
        }
    }

    /// <summary>The coarse-width sweep figure: +1/2 density and headward speed (with 95% intervals where ok) against the width.</summary>
    public static Figure? SweepFigure(AnalysisResult r)
    {
        if (r.CoarseSweep.Count == 0) return null;
        var u = UnitScale.Of(r.Units); var rows = SweepRows(r);
        using var density = new Plot(); using var speed = new Plot();
        var withDensity = rows.Where(x => x.PlusDensity is not null).ToArray();
        if (withDensity.Length > 0) { var s = density.Add.Scatter(withDensity.Select(x => x.CoarseWidth).ToArray(), withDensity.Select(x => x.PlusDensity!.Value).ToArray()); s.MarkerSize = 8; }
        density.Title("+1/2 defects against the coarse width"); density.XLabel($"coarse width ({u.LengthName})"); density.YLabel($"+1/2 per 1000 {u.AreaLabel}");
        foreach (var x in rows.Where(x => x.HeadwardSpeed is not null))
        {
            var bar = speed.Add.Line(x.CoarseWidth, x.HeadwardLow!.Value, x.CoarseWidth, x.HeadwardHigh!.Value); bar.LineWidth = 2; bar.Color = Colors.Black;
            var m = speed.Add.Marker(x.CoarseWidth, x.HeadwardSpeed!.Value); m.Size = 8; m.Color = Colors.Black;
        }
        var zero = speed.Add.HorizontalLine(0); zero.LinePattern = LinePattern.Dashed; zero.Color = Colors.Gray;
        speed.Title("+1/2 headward speed (> 0 headward)"); speed.XLabel($"coarse width ({u.LengthName})"); speed.YLabel($"speed ({u.SpeedLabel})");
        return new(AnalysisFolder.CoarseSweepFigure, $"The defect picture against the coarse-graining width (--coarse-sweep; the analysis used {r.Options.CoarseWidth}): +1/2 density and headward speed with its 95% interval (widths whose speed is not ok show no marker). A conclusion that changes sign across widths depends on the smoothing.",
            Figures.Grid([density, speed], 2, 480, 360));
    }

    /// <summary>summary.json's coarse_sweep array (only with --coarse-sweep).</summary>
    public static JsonArray SweepJson(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units); var a = new JsonArray();
        foreach (var p in r.CoarseSweep)
            a.Add((JsonNode)new JsonObject
            {
                ["coarse_width_option"] = p.Width.ToString(), ["coarse_width"] = u.Length(p.CoarsePx),
                ["plus_half_per_frame"] = p.PlusPerFrame, ["minus_half_per_frame"] = p.MinusPerFrame,
                ["plus_half_density"] = double.IsFinite(p.PlusDensityPerPx2) ? p.PlusDensityPerPx2 * u.DensityFactor : null,
                ["defect_headward_speed"] = Summary.Interval(u.Speed(p.HeadwardSpeed)),
            });
        return a;
    }

    private sealed class TrackMap : ClassMap<DefectTrackRow>
    {
        public TrackMap(UnitScale u)
        {
            Map(x => x.DefectTrackId).Name("defect_track_id"); Map(x => x.Charge).Name("charge"); Map(x => x.FirstFrame).Name("first_frame");
            Map(x => x.LastFrame).Name("last_frame"); Map(x => x.LifetimeFrames).Name("lifetime_frames");
            if (u.FrameIntervalKnown) Map(x => x.Lifetime).Name($"lifetime_{u.TimeSuffix}"); else Map(x => x.Lifetime).Ignore();
            Map(x => x.Censored).Name("censored"); Map(x => x.CensoringReason).Name("censoring_reason");
            Map(x => x.CreatedWith).Name("created_with_track"); Map(x => x.AnnihilatedWith).Name("annihilated_with_track");
        }
    }

    private sealed class SurvivalMap : ClassMap<SurvivalRow>
    {
        public SurvivalMap(UnitScale u)
        {
            Map(x => x.TimeFrames).Name("lifetime_frames");
            if (u.FrameIntervalKnown) Map(x => x.Time).Name($"lifetime_{u.TimeSuffix}"); else Map(x => x.Time).Ignore();
            Map(x => x.AtRisk).Name("at_risk"); Map(x => x.Events).Name("events"); Map(x => x.Censored).Name("censored");
            Map(x => x.Survival).Name("survival"); Map(x => x.StandardError).Name("greenwood_se"); Map(x => x.Low).Name("ci95_low"); Map(x => x.High).Name("ci95_high");
        }
    }

    private sealed class MsdMap : ClassMap<MsdRow>
    {
        public MsdMap(UnitScale u)
        {
            Map(x => x.LagFrames).Name("lag_frames");
            if (u.FrameIntervalKnown) Map(x => x.Lag).Name($"lag_{u.TimeSuffix}"); else Map(x => x.Lag).Ignore();
            Map(x => x.Msd).Name($"msd_{u.AreaSuffix}"); Map(x => x.Pairs).Name("pairs"); Map(x => x.Tracks).Name("tracks");
        }
    }

    /// <summary>The lifetime survival figure (Kaplan-Meier with its pointwise 95% band; censored times marked).</summary>
    public static Figure SurvivalFigure(AnalysisResult r)
    {
        using var plt = new Plot();
        var u = UnitScale.Of(r.Units);
        var steps = r.DefectStatistics?.Survival.Steps ?? [];
        if (steps.Count > 0)
        {
            var xs = new List<double> { 0 }; var ys = new List<double> { 1 }; var lo = new List<double> { 1 }; var hi = new List<double> { 1 };
            foreach (var s in steps) { xs.Add(u.Time(s.Time)); ys.Add(s.Survival); lo.Add(s.Low); hi.Add(s.High); }
            var line = plt.Add.ScatterLine(xs.ToArray(), ys.ToArray()); line.ConnectStyle = ConnectStyle.StepHorizontal; line.LegendText = "S(t), Kaplan-Meier";
            var l = plt.Add.ScatterLine(xs.ToArray(), lo.ToArray()); l.ConnectStyle = ConnectStyle.StepHorizontal; l.LinePattern = LinePattern.Dotted; l.LegendText = "95% band (Greenwood)";
            var h = plt.Add.ScatterLine(xs.ToArray(), hi.ToArray()); h.ConnectStyle = ConnectStyle.StepHorizontal; h.LinePattern = LinePattern.Dotted; h.Color = l.Color;
            var censored = steps.Where(s => s.Censored > 0).ToArray();
            if (censored.Length > 0)
            {
                var c = plt.Add.ScatterPoints(censored.Select(s => u.Time(s.Time)).ToArray(), censored.Select(s => s.Survival).ToArray());
                c.MarkerShape = MarkerShape.Cross; c.MarkerSize = 8; c.LegendText = "censored (movie end or field edge)";
            }
            plt.ShowLegend(Alignment.UpperRight);
        }
        var half = plt.Add.HorizontalLine(0.5); half.LinePattern = LinePattern.Dashed; half.Color = Colors.Gray;
        var life = u.Time(r.DefectStatistics?.LifetimeFrames ?? Estimate.NaN);
        plt.Title($"Defect lifetimes: median {EstimateText.Value(life, u.TimeName)}");
        plt.XLabel($"lifetime ({u.TimeName})"); plt.YLabel("fraction of defect tracks still alive");
        plt.Axes.SetLimitsY(0, 1.05);
        return new(AnalysisFolder.DefectSurvivalFigure, "Survival of defect tracks (both charges): the fraction still alive after a given time, with tracks that touch the movie's ends or the field's edge counted as censored (Kaplan-Meier); the dashed line at 1/2 gives the median lifetime.",
            Figures.Png(plt, 720, 480));
    }

    /// <summary>The headline sentence on defect statistics, as each status allows.</summary>
    public static string Sentence(AnalysisResult r)
    {
        if (r.DefectStatistics is not { } d) return "";
        var u = UnitScale.Of(r.Units);
        string Say(Measure m, Estimate e0)
        {
            var e = u.Of(m.Kind, e0); string unit = u.Label(m.Kind);
            return e.IsOk ? $"{EstimateText.Value(e, unit)} ({EstimateText.Interval(e)})" : EstimateText.Phrase(e, unit);
        }
        return $"Defects: {Say(Measures.PlusHalfDensity, d.PlusDensityPerPx2)} +1/2 and {Say(Measures.MinusHalfDensity, d.MinusDensityPerPx2)} −1/2; "
            + $"median lifetime {Say(Measures.DefectLifetime, d.LifetimeFrames)}; {d.Creations} creations and {d.Annihilations} annihilations of ±1/2 pairs.";
    }
}
