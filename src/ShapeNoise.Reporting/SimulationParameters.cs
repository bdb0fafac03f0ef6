using ShapeNoise.TimeSeries;
using System.Globalization;
using System.Text.Json.Nodes;
using ShapeNoise.Dynamics;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using Tomlyn.Model;

namespace ShapeNoise.Reporting;

/// <summary>
/// Noise parameters for simulations (sim-params.json / .toml, schema documented in docs/sim-params.md): every
/// fluctuation coordinate as an Ornstein-Uhlenbeck process dx = -x/tau dt + sqrt(2 D) dW with var = D tau, in physical
/// units and made dimensionless with R0 = sqrt(mean area / pi) and the chosen time unit T.
/// </summary>
public static class SimulationParameters
{
    /// <summary>The schema_version written into sim-params (docs/sim-params.md, schema "shapenoise.sim-params").</summary>
    public const int SchemaVersion = 1;

    /// <summary>The time unit T in the run's time unit, and its name.</summary>
    public static (double Value, string Name) TimeUnit(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units);
        return r.Options.TimeUnit switch
        {
            "tau_q" => (u.Time(r.Dynamics.TauQFrames.Value), "tau_q"),
            "min" => (1.0, u.TimeName),
            var x => (double.Parse(x, CultureInfo.InvariantCulture), $"{x} {u.TimeName}"),
        };
    }

    static JsonValue? Num(double v) => double.IsFinite(v) ? JsonValue.Create(v) : null;
    static JsonObject I(Estimate e) => Summary.Interval(e);

    /// <summary>The parameter blocks shared by sim-params and summary.json ("dynamics"), so both report the same numbers.</summary>
    public static JsonObject Dynamics(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units); var d = r.Dynamics; var col = AnalysisFolder.Columns(u);
        double dt = u.TimeFactor, R0 = u.Length(r.MeanCellRadiusPx);
        string Tn = u.TimeSuffix;
        var (T, tName) = TimeUnit(r);
        var coords = new JsonObject();
        foreach (var c in d.Coordinates)
        {
            var tau = u.Time(c.TauFrames); var v = u.Area(c.VariancePx2); var dd = c.DPx2PerFrame.Scale(u.DiffusionFactor);
            coords[c.Name] = new JsonObject
            {
                ["meaning"] = c.Meaning,
                [col.Tau] = I(tau),
                [col.Variance] = I(v),
                [col.Diffusion] = I(dd),
                ["dimensionless"] = new JsonObject
                {
                    ["tau_over_T"] = I(tau.Scale(1 / T)),
                    ["variance_over_R0_squared"] = I(v.Scale(1 / (R0 * R0))),
                    ["D_times_T_over_R0_squared"] = I(dd.Scale(T / (R0 * R0))),
                },
                [col.NoiseVariance] = Num(u.Area(c.NoiseVariancePx2)),
            };
        }
        return new JsonObject
        {
            ["coordinates"] = coords,
            ["elongation_q"] = new JsonObject
            {
                [col.Tau] = I(u.Time(d.TauQFrames)),
                [$"tau_uncorrected_{Tn}"] = Num(d.TauQUncorrectedFrames * dt),
                [$"tau_integrated_{Tn}"] = I(d.TauQIntegratedFrames.Scale(dt)),
                ["sokal_window_frames"] = d.SokalWindow,
                ["variance"] = Num(d.VarianceQ),
                ["nearly_round_outlines"] = d.NearlyRoundOutlines,
                ["dimensionless"] = new JsonObject { ["tau_over_T"] = I(d.TauQFrames.Scale(dt / T)) },
            },
            ["orientation"] = new JsonObject
            {
                [$"tau_theta_{Tn}"] = I(d.TauThetaFrames.Scale(dt)),
                ["model"] = d.ThetaModel,
                ["plateau"] = I(d.ThetaPlateau),
                ["dimensionless"] = new JsonObject { ["tau_over_T"] = I(d.TauThetaFrames.Scale(dt / T)) },
            },
            ["scales"] = new JsonObject
            {
                [$"R0_{u.LengthName}"] = Num(R0),
                ["R0_definition"] = "sqrt(mean cell area / pi)",
                [$"T_{Tn}"] = Num(T),
                ["T_definition"] = tName,
                // The scale the run used (option or movie metadata), so a simulation can convert back to px and frames.
                ["pixel_size_um"] = r.Units.PixelSizeUm is { } ps ? Num(ps) : null,
                ["frame_interval_min"] = r.Units.FrameIntervalMin is { } fi ? Num(fi) : null,
            },
            ["tracks"] = d.Tracks,
            ["max_lag_frames"] = d.MaxLag,
            ["fit_lags_frames"] = d.FitLags,
        };
    }

    /// <summary>The headline fluctuation coordinates under the temporal noise model (docs/sim-params.md#keys,
    /// docs/measures.md#temporal-noise-model): per coordinate (L, W, along, across) the signal (tau, variance s2, D = s2 / tau)
    /// and, separately, the white measurement noise e2, with the raw sample variance; physical and dimensionless.</summary>
    public static JsonObject Fluctuations(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units); var col = AnalysisFolder.Columns(u);
        double R0 = u.Length(r.MeanCellRadiusPx);
        var (T, _) = TimeUnit(r);
        var o = new JsonObject
        {
            ["noise_model"] = ShapeNoise.Fluctuations.Pooling.Name(r.Pooled.NoiseModel),
            ["model"] = "x = s(t) + e(t): s an Ornstein-Uhlenbeck signal (variance, tau, D = variance / tau), e white measurement noise (noise_variance); fitted to the pooled mean-subtracted autocovariance with its exact finite-track expectation",
            ["fit_lags_frames"] = r.Pooled.Temporal?.FitLags,
        };
        if (r.Pooled.Temporal is not { } tn) return o;
        foreach (var c in tn.Coordinates)
        {
            var tau = u.Time(c.TauFrames); var v = u.Area(c.SignalVariancePx2); var dd = c.DPx2PerFrame.Scale(u.DiffusionFactor);
            var e2 = u.Area(c.NoiseVariancePx2);
            o[c.Name] = new JsonObject
            {
                [col.Tau] = I(tau),
                [col.Variance] = I(v),
                [col.Diffusion] = I(dd),
                [$"noise_variance_{u.AreaSuffix}"] = I(e2),
                [$"raw_variance_{u.AreaSuffix}"] = Num(u.Area(c.RawVariancePx2)),
                ["dimensionless"] = new JsonObject
                {
                    ["tau_over_T"] = I(tau.Scale(1 / T)),
                    ["variance_over_R0_squared"] = I(v.Scale(1 / (R0 * R0))),
                    ["D_times_T_over_R0_squared"] = I(dd.Scale(T / (R0 * R0))),
                    ["noise_variance_over_R0_squared"] = I(e2.Scale(1 / (R0 * R0))),
                },
            };
        }
        return o;
    }

    /// <summary>sim-params content: schema, model, units, the headline anisotropy, the dynamics blocks, provenance.</summary>
    public static JsonObject Build(AnalysisResult r, JsonObject provenance)
    {
        var u = UnitScale.Of(r.Units);
        var o = new JsonObject
        {
            ["schema"] = "shapenoise.sim-params",
            ["schema_version"] = SchemaVersion,
            ["model"] = "Each coordinate x is an Ornstein-Uhlenbeck process dx = -x/tau dt + sqrt(2 D) dW with stationary variance var = D tau; coordinates are independent.",
            ["units"] = new JsonObject { ["length"] = u.LengthName, ["time"] = u.TimeName },
            ["noise_anisotropy"] = I(r.Pooled.Anisotropy),
            ["noise_anisotropy_definition"] = "the headline anisotropy of summary.json: pooled var_L / var_W (temporal noise model: signal variances s2_L / s2_W)",
            ["noise_anisotropy_contour"] = I(r.Pooled.AnisotropyContour),
            ["frames"] = r.Counts.Frames,
        };
        foreach (var (k, v) in Dynamics(r)) o[k] = v?.DeepClone();
        o["fluctuations"] = Fluctuations(r);
        o["provenance"] = new JsonObject
        {
            ["tool_version"] = provenance["version"]?.DeepClone(),
            ["inputs"] = provenance["inputs"]?.DeepClone(),
            ["options"] = provenance["options"]?.DeepClone(),
        };
        return o;
    }

    /// <summary>Reads the parameters a simulation of fluctuating ellipses needs from a sim-params.json written by
    /// <see cref="Build"/> (docs/sim-params.md#round-trip), converted to px and frames: the file's lengths are divided by the
    /// pixel size p and its times by the frame interval dt (s2 / p^2, e2 / p^2, tau / dt). p and dt are taken from
    /// provenance.options (PixelSizeUm, FrameIntervalMin) when the analysis set them, else from scales.pixel_size_um /
    /// scales.frame_interval_min (the scale the run used, recorded since schema version 1 files of 2026-12-02); otherwise,
    /// for a file in um / min, from <paramref name="pixelSizeUm"/> / <paramref name="frameIntervalMin"/>; for a file in
    /// px / frame they are 1.</summary>
    /// <exception cref="ShapeNoise.Reading.InputException">The file is not a ShapeNoise sim-params, lacks the fluctuations
    /// block, or a needed estimate (L, W: tau, variance, noise_variance) is missing or not ok; the message names the key.</exception>
    public static SimulationInput Read(string path, double pixelSizeUm, double frameIntervalMin)
    {
        JsonNode? root;
        try { root = JsonNode.Parse(File.ReadAllText(path)); }
        catch (System.Text.Json.JsonException e) { throw new ShapeNoise.Reading.InputException(path, $"not JSON ({e.Message.Split('\n')[0]})"); }
        catch (IOException e) { throw new ShapeNoise.Reading.InputException(path, e.Message); }
        if (root is not JsonObject o || (o["schema"] as JsonValue)?.TryGetValue<string>(out var schema) != true || schema != "shapenoise.sim-params")
            throw new ShapeNoise.Reading.InputException(path, "not a ShapeNoise sim-params file (key \"schema\" is not \"shapenoise.sim-params\")");
        string Str(string key, string name) => (o["units"]?[key] as JsonValue)?.TryGetValue<string>(out var v) == true ? v
            : throw new ShapeNoise.Reading.InputException(path, $"key \"units.{key}\" is missing ({name})");
        bool um = Str("length", "um or px") == "um", min = Str("time", "min or frame") == "min";
        if (o["fluctuations"] is not JsonObject f) throw new ShapeNoise.Reading.InputException(path, "key \"fluctuations\" is missing");
        double? Opt(string key) => (o["provenance"]?["options"]?[key] as JsonValue)?.TryGetValue<double>(out var v) == true ? v : null;
        double? Scale(string key) => (o["scales"]?[key] as JsonValue)?.TryGetValue<double>(out var v) == true && v > 0 ? v : null;
        double p = um ? Opt("PixelSizeUm") ?? Scale("pixel_size_um") ?? pixelSizeUm : 1, dt = min ? Opt("FrameIntervalMin") ?? Scale("frame_interval_min") ?? frameIntervalMin : 1;
        string area = um ? "um2" : "px2", time = min ? "min" : "frames";
        double Get(string coord, string key)
        {
            string full = $"fluctuations.{coord}.{key}";
            var e = f[coord]?[key];
            if (e is not JsonObject eo) throw new ShapeNoise.Reading.InputException(path, $"key \"{full}\" is missing");
            string status = (eo["status"] as JsonValue)?.TryGetValue<string>(out var st) == true ? st : "missing";
            if (status != "ok") throw new ShapeNoise.Reading.InputException(path, $"key \"{full}\" has status \"{status}\", not ok");
            return (eo["value"] as JsonValue)?.TryGetValue<double>(out var v) == true && double.IsFinite(v) ? v
                : throw new ShapeNoise.Reading.InputException(path, $"key \"{full}\" has no finite value");
        }
        // along / across noise: optional (no knob of its own in the ellipses; used to judge the render's own noise), NaN when absent or not ok.
        double Optional(string coord, string key)
            => f[coord]?[key] is JsonObject eo && (eo["status"] as JsonValue)?.TryGetValue<string>(out var st) == true && st == "ok"
               && (eo["value"] as JsonValue)?.TryGetValue<double>(out var v) == true && double.IsFinite(v) ? v : double.NaN;
        double r0 = (o["scales"]?[$"R0_{(um ? "um" : "px")}"] as JsonValue)?.TryGetValue<double>(out var rv) == true && rv > 0 ? rv : double.NaN;
        int tracks = (o["tracks"] as JsonValue)?.TryGetValue<int>(out var tv) == true && tv > 0 ? tv : 0;
        return new SimulationInput(
            Get("L", $"tau_{time}") / dt, Get("W", $"tau_{time}") / dt,
            Get("L", $"variance_{area}") / (p * p), Get("W", $"variance_{area}") / (p * p),
            Get("L", $"noise_variance_{area}") / (p * p), Get("W", $"noise_variance_{area}") / (p * p),
            r0 / p, um ? p : double.NaN, min ? dt : double.NaN)
        {
            NoiseVarianceAlongPx2 = Optional("along", $"noise_variance_{area}") / (p * p),
            NoiseVarianceAcrossPx2 = Optional("across", $"noise_variance_{area}") / (p * p),
            Tracks = tracks,
        };
    }

    /// <summary>The same content as TOML (nulls become nan; TOML has no null).</summary>
    public static string ToToml(JsonObject o) => Tomlyn.TomlSerializer.Serialize(ToTable(o), SimParamsToml.Default.TomlTable);

    private static TomlTable ToTable(JsonObject o)
    {
        var t = new TomlTable();
        foreach (var (k, v) in o)
        {
            if (v is null) { t[k] = double.NaN; continue; }
            t[k] = ToToml(v);
        }
        return t;
    }

    private static object ToToml(JsonNode n) => n switch
    {
        JsonObject jo => ToTable(jo),
        JsonArray ja => ToArray(ja),
        JsonValue jv when jv.TryGetValue<string>(out var s) => s,
        JsonValue jv when jv.TryGetValue<bool>(out var b) => b,
        JsonValue jv when jv.TryGetValue<int>(out var i) => (long)i,
        JsonValue jv when jv.TryGetValue<long>(out var l) => l,
        JsonValue jv => jv.GetValue<double>(),
        _ => n.ToJsonString(),
    };

    private static object ToArray(JsonArray a)
    {
        if (a.Count > 0 && a.All(x => x is JsonObject))
        {
            var ta = new TomlTableArray();
            foreach (var x in a) ta.Add(ToTable((JsonObject)x!));
            return ta;
        }
        var arr = new TomlArray();
        foreach (var x in a) arr.Add(x is null ? double.NaN : ToToml(x));
        return arr;
    }
}

/// <summary>What a simulation of fluctuating ellipses takes from sim-params (<see cref="SimulationParameters.Read"/>), in px and frames.</summary>
/// <param name="TauLFrames">tau of L (frames).</param>
/// <param name="TauWFrames">tau of W (frames).</param>
/// <param name="SignalVarianceLPx2">s2_L (px^2).</param>
/// <param name="SignalVarianceWPx2">s2_W (px^2).</param>
/// <param name="NoiseVarianceLPx2">e2_L, white measurement noise of L (px^2).</param>
/// <param name="NoiseVarianceWPx2">e2_W (px^2).</param>
/// <param name="R0Px">R0 = sqrt(mean cell area / pi) (px), NaN when absent.</param>
/// <param name="PixelSizeUm">The pixel size used to convert (um/px), NaN when the file is in px.</param>
/// <param name="FrameIntervalMin">The frame interval used to convert (min), NaN when the file is in frames.</param>
public sealed record SimulationInput(double TauLFrames, double TauWFrames, double SignalVarianceLPx2, double SignalVarianceWPx2,
    double NoiseVarianceLPx2, double NoiseVarianceWPx2, double R0Px, double PixelSizeUm, double FrameIntervalMin)
{
    /// <summary>e2_along, the white noise of the pole-sector normal displacement (px^2); NaN when absent or not ok.</summary>
    public double NoiseVarianceAlongPx2 { get; init; } = double.NaN;
    /// <summary>e2_across, the same for the flank sector (px^2); NaN when absent or not ok.</summary>
    public double NoiseVarianceAcrossPx2 { get; init; } = double.NaN;
    /// <summary>Tracks behind the file's numbers (its "tracks" key); 0 when absent.</summary>
    public int Tracks { get; init; }
}

/// <summary>The TOML writer's metadata for the table model, generated at build time (Tomlyn source generation) rather than by
/// reflection, so the ahead-of-time compiled command (scripts/publish.sh) writes sim-params.toml as the JIT-compiled one does.</summary>
[Tomlyn.Serialization.TomlSerializable(typeof(TomlTable))]
internal sealed partial class SimParamsToml : Tomlyn.Serialization.TomlSerializerContext;
