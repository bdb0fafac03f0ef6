using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;
using System.Text.Json;
using System.Text.Json.Nodes;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;

namespace ShapeNoise.Reporting;

/// <summary>summary.json (docs/measures.md#output-contract) and floor.json (the fixed-cell floor export read by --floor-from).</summary>
public static class Summary
{
    /// <summary>The serializer options of every JSON file written (indented), one shared instance.</summary>
    public static readonly JsonSerializerOptions Indented = new() { WriteIndented = true };

    static JsonValue? Num(double v) => double.IsFinite(v) ? JsonValue.Create(v) : null;

    /// <summary>The estimate object of docs/statistics.md#estimate-status: {"value", "ci95", "n", "status"}; value and ci95
    /// are null unless the status is ok; an at_bound estimate adds "bound" and "bound_value"; a fit adds
    /// "fraction_at_bound"; a reason in words is added when there is one, and the kind of unit as "unit".</summary>
    public static JsonObject Interval(Estimate e)
    {
        bool ok = e.IsOk;
        var o = new JsonObject
        {
            ["value"] = ok ? Num(e.Value) : null,
            ["ci95"] = ok ? new JsonArray(Num(e.Low), Num(e.High)) : null,
            ["n"] = e.N,
            ["status"] = StatusName(e.Status),
        };
        if (e.UnitName is { } un) o["unit"] = un;
        if (e.Status == EstimateStatus.AtBound)
        {
            o["bound"] = e.Bound == BoundSide.Lower ? "lower" : "upper";
            o["bound_value"] = Num(e.BoundValue);
        }
        if (double.IsFinite(e.FractionAtBound)) o["fraction_at_bound"] = e.FractionAtBound;
        if (e.Reason is { } why) o["reason"] = why;
        return o;
    }

    /// <summary>The status as written in JSON and tables: ok, too_few, at_bound, not_applicable.</summary>
    public static string StatusName(EstimateStatus s) => s switch
    {
        EstimateStatus.Ok => "ok",
        EstimateStatus.TooFew => "too_few",
        EstimateStatus.AtBound => "at_bound",
        _ => "not_applicable",
    };

    /// <summary>summary.json of one analysis (docs/measures.md#output-contract).</summary>
    /// <remarks>Longer than 60 lines on purpose: one JSON literal that reads like the schema it writes.</remarks>
    public static JsonObject Build(AnalysisResult r)
    {
        var u = r.Units; var p = r.Pooled; var c = r.Counts; var us = UnitScale.Of(u);
        double s = us.LengthFactor, s2 = us.AreaFactor;
        var warnings = new JsonArray();
        foreach (var w in r.Warnings) warnings.Add((JsonNode)w);
        var summary = new JsonObject
        {
            ["tool_version"] = Provenance.ToolVersion,
            ["input"] = Path.GetFileName(r.Movie.Path.TrimEnd('/')),
            ["units"] = new JsonObject { ["length"] = us.LengthName, ["time"] = us.TimeName },
            ["pixel_size_um"] = u.PixelSizeUm is { } ps ? ps : null,
            ["pixel_size_source"] = u.PixelSizeSource,
            ["frame_interval_min"] = u.FrameIntervalMin is { } fi ? fi : null,
            ["frame_interval_source"] = u.FrameIntervalSource,
            ["frames"] = c.Frames,
            ["objects"] = c.Objects,
            ["outlines"] = c.Outlines,
            ["cells_tracked"] = c.Tracks,
            ["tracks_used"] = c.TracksUsed,
            ["tracks_below_floor"] = c.TracksBelowFloor,
            ["outlines_excluded"] = c.ExcludedBorder + c.ExcludedSmall,
            ["outlines_excluded_border"] = c.ExcludedBorder,
            ["outlines_excluded_small"] = c.ExcludedSmall,
            ["non_star_shaped"] = c.NonStarShaped,
            ["divisions"] = c.Divisions,
            ["merges"] = c.Merges,
            // One-frame segmentation errors (docs/measures.md#one-frame-errors).
            ["outliers"] = c.Outliers,
            ["bridged_merges"] = c.BridgedMerges,
            ["bridged_splits"] = c.BridgedSplits,
            ["fragments"] = c.Fragments,
            ["anisotropy"] = Interval(p.Anisotropy),
            ["anisotropy_contour"] = Interval(p.AnisotropyContour),
            ["anisotropy_contour_raw"] = Interval(p.AnisotropyContourRaw),
            ["anisotropy_raw"] = Interval(p.AnisotropyRaw),
            ["noise_model"] = Pooling.Name(p.NoiseModel),   // docs/measures.md#temporal-noise-model
            ["var_L"] = Interval(p.VarL.Scale(s2)),
            ["var_W"] = Interval(p.VarW.Scale(s2)),
            ["var_along"] = Interval(p.VarAlong.Scale(s2)),
            ["var_across"] = Interval(p.VarAcross.Scale(s2)),
            ["var_along_raw"] = Num(p.VarAlongRaw * s2),
            ["var_across_raw"] = Num(p.VarAcrossRaw * s2),
            ["var_L_raw"] = Num(p.VarLRaw * s2),
            ["var_W_raw"] = Num(p.VarWRaw * s2),
            ["noise_var_L"] = Interval(p.NoiseVarL.Scale(s2)),
            ["noise_var_W"] = Interval(p.NoiseVarW.Scale(s2)),
            ["noise_var_along"] = Interval(p.NoiseVarAlong.Scale(s2)),
            ["noise_var_across"] = Interval(p.NoiseVarAcross.Scale(s2)),
            ["floor_along"] = Num(p.FloorAlong * s2),
            ["floor_across"] = Num(p.FloorAcross * s2),
            ["floor_per_mode"] = Num(p.FloorPerMode * s2),
            ["floor_source"] = r.FloorReference is null ? "high modes" : "--floor-from",
            ["mean_cell_radius"] = Num(r.MeanCellRadiusPx * s),
            ["coverage"] = Num(r.Coverage),           // docs/defects.md#where-defects-apply: gaps <= 3 px closed
            ["coverage_raw"] = Num(r.CoverageRaw),    // labelled pixels only
            ["resampling_unit"] = r.ResamplingUnit,   // docs/statistics.md#within-movie-intervals
            ["block_size"] = Num(r.BlockSizePx * s),
            ["shape_correlation_length"] = Num(r.ShapeCorrelationLengthPx * s),
            ["tau_q"] = Interval(us.Time(r.Dynamics.TauQFrames)),
            ["tau_theta"] = Interval(us.Time(r.Dynamics.TauThetaFrames)),
            ["plus_half_defects"] = r.Defects.NotApplicableReason is null ? Num(r.Defects.PlusPerFrame) : null,
            ["minus_half_defects"] = r.Defects.NotApplicableReason is null ? Num(r.Defects.MinusPerFrame) : null,
            ["defects_status"] = r.Defects.NotApplicableReason is null ? "ok" : "not_applicable",
            ["defects_reason"] = r.Defects.NotApplicableReason ?? "",
            ["defect_headward_speed"] = Interval(us.Speed(r.Defects.HeadwardSpeed)),
            ["flow_headward_speed"] = Interval(us.Speed(r.Defects.FlowHeadwardSpeed)),
            ["fraction_headward"] = Num(r.Defects.FractionHeadward),
            ["plus_half_defect_tracks"] = r.Defects.PlusTracksUsed,
            ["defect_tracks"] = r.Defects.Tracks.Count,
            ["defect_births"] = r.Defects.Births,
            ["defect_deaths"] = r.Defects.Deaths,
            ["nematic_alignment"] = Num(r.Defects.MeanAlignment),
            // Stage drift: mean |u| over frames in the speed unit, and whether it was removed (docs/defects.md#drift).
            ["drift_speed"] = Num(us.Speed(r.Defects.DriftSpeedPx)),
            ["drift_removed"] = r.Defects.DriftRemoved,
            ["coarse_width"] = Num(r.Defects.CoarsePx * s),
            ["grid_spacing"] = Num(r.Defects.GridPx * s),
            ["hypothesis"] = new JsonObject
            {
                ["spearman_rho"] = r.Hypothesis.Status == EstimateStatus.Ok ? Num(r.Hypothesis.SpearmanRho) : null,
                ["spearman_rho_ci95"] = r.Hypothesis.Status == EstimateStatus.Ok && r.Hypothesis.Rho95.IsOk ? new JsonArray(Num(r.Hypothesis.Rho95.Low), Num(r.Hypothesis.Rho95.High)) : new JsonArray(null, null),
                ["p_value"] = r.Hypothesis.Status == EstimateStatus.Ok ? Num(r.Hypothesis.PValue) : null,
                ["random_position_p_value"] = r.Hypothesis.Status == EstimateStatus.Ok ? Num(r.Hypothesis.RandomPositionP) : null,
                ["random_position_rho_range95"] = r.Hypothesis.Status == EstimateStatus.Ok && double.IsFinite(r.Hypothesis.RandomPositionRho95.Low)
                    ? new JsonArray(Num(r.Hypothesis.RandomPositionRho95.Low), Num(r.Hypothesis.RandomPositionRho95.High)) : new JsonArray(null, null),
                ["n_defect_tracks"] = r.Hypothesis.DefectTracks,
                ["short_defect_tracks_left_out"] = r.Hypothesis.ShortTracksLeftOut,
                ["status"] = StatusName(r.Hypothesis.Status),
                ["test"] = $"Spearman correlation of log local anisotropy (var_L/var_W of cells within 2 coarse widths of the core) with headward speed over +1/2 defect tracks followed for at least {Nematic.ShapeNoiseHypothesis.MinSpeedSamples} frames with a speed; two-sided permutation p-value (9999 seeded permutations) and a random-position null ({Nematic.ShapeNoiseHypothesis.RandomPositionDraws} draws with each track's anisotropy taken about a random place of the tissue)",
            },
            ["dynamics"] = SimulationParameters.Dynamics(r),
            ["rays"] = r.Options.Rays,
            ["outline_method"] = r.Options.Outline.ToString().ToLowerInvariant(),
        };
        MotionReport.AddTo(summary, r);   // docs/motion.md
        DefectStatisticsReport.AddTo(summary, r);
        summary["warnings"] = warnings;
        return summary;
    }

    /// <summary>floor.json: this run's pooled raw fluctuations in px^2, to be used as the floor of another run (--floor-from).</summary>
    public static JsonObject Floor(AnalysisResult r) => new()
    {
        ["rays"] = r.Options.Rays,
        ["outline"] = r.Options.Outline.ToString().ToLowerInvariant(),
        ["var_along_px2"] = Num(r.Pooled.VarAlongRaw),
        ["var_across_px2"] = Num(r.Pooled.VarAcrossRaw),
        ["var_L_px2"] = Num(r.Pooled.VarLRaw),
        ["var_W_px2"] = Num(r.Pooled.VarWRaw),
        ["floor_per_mode_px2"] = Num(r.Pooled.FloorPerMode),
    };

    /// <summary>Reads floor.json from an analysis output folder.</summary>
    public static NoiseFloorReference ReadFloor(string folder)
    {
        string path = Path.Combine(folder, AnalysisFolder.Floor);
        if (!File.Exists(path)) throw new Reading.InputException(folder, "has no floor.json; --floor-from needs the output folder of a fixed-cell movie analysed by shapenoise");
        JsonNode? n;
        try { n = JsonNode.Parse(File.ReadAllText(path)); }
        catch (JsonException e) { throw new Reading.InputException(path, $"is not valid JSON ({e.Message})"); }
        double Get(string k) => n?[k]?.GetValue<double>() is { } v && double.IsFinite(v) ? v
            : throw new Reading.InputException(path, $"has no finite number '{k}'");
        return new NoiseFloorReference((int)Get("rays"), n?["outline"]?.GetValue<string>() ?? "", Get("var_along_px2"), Get("var_across_px2"),
            Get("var_L_px2"), Get("var_W_px2"), Get("floor_per_mode_px2"));
    }
}
