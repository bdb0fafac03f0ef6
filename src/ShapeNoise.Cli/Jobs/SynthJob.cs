using ShapeNoise.Imaging.Segmentation;
using ShapeNoise.Imaging.Writing;
using System.Text.Json.Nodes;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;

namespace ShapeNoise.Cli.Jobs;

/// <summary>Writes a synthetic scenario as an OME-TIFF label movie with its truth.json and run.json.</summary>
public static class SynthJob
{
    /// <summary>Fluctuating ellipses: labels.tif (uint16, Deflate, OME-XML with pixel size and frame interval) and truth.json.</summary>
    public static EllipseMovie Ellipses(EllipseMovieOptions o, OutputTarget outDir, IEnumerable<string>? commandLine = null, RawRenderOptions? raw = null, JsonObject? fromSimParams = null)
    {
        OutputFolder.Check(outDir);
        var movie = EllipseMovie.Generate(o);
        OutputFolder.Write(outDir, dir =>
        {
            string tif = Path.Combine(dir, "labels.tif");
            var xml = TiffWriter.OmeXml(movie.Width, movie.Height, o.Frames, "uint16", o.PixelSizeUm, o.FrameIntervalMin);
            TiffWriter.Write(tif, movie.Width, movie.Height, Enumerable.Range(0, o.Frames).Select(movie.RenderFrame), TiffWriter.PixelType.UInt16, xml);
            if (raw is not null) WriteRaw(tif, Path.Combine(dir, "raw.tif"), raw);
            var truth = TruthJson(movie);
            if (fromSimParams is not null) truth["from_sim_params"] = fromSimParams;
            File.WriteAllText(Path.Combine(dir, "truth.json"), truth.ToJsonString(Summary.Indented));
            var opts = OptionsJson.Node(o);
            var prov = Provenance.Describe("synth ellipses", [], opts, commandLine);
            File.WriteAllText(Path.Combine(dir, "run.json"), prov.ToJsonString(Summary.Indented));
        });
        return movie;
    }

    /// <summary>Ellipse options that simulate what a sim-params file describes (docs/sim-params.md#round-trip). In px and frames of
    /// the file: L = 2a and W = 2b to first order, so sigma_a = sqrt(s2_L) / 2, sigma_b = sqrt(s2_W) / 2, tau_a = tau_L, tau_b = tau_W;
    /// the mean semi-axes keep the ratio of <paramref name="o"/> and are scaled so sqrt(a0 b0) = R0. The exported noise e2 is
    /// the experiment's total measurement noise, and a rendered movie makes its own (pixelation, variance proportional to the
    /// pixel area), so the movie is rendered k-fold finer (pixel size s / k, every length in px times k, so lengths in um stay)
    /// with k = <paramref name="supersample"/> (default <see cref="DefaultSupersample"/>), and only the remainder is added:
    /// the same movie is rendered without added noise and analysed (<see cref="RenderNoiseOf"/>); white noise on the semi-axes
    /// eta_a^2 = max(0, e2_L - e2_render,L) / 4, eta_b^2 = max(0, e2_W - e2_render,W) / 4; and white radial noise in the pole
    /// and flank sectors with variances v_pole = r_along / g_along, v_flank = r_across / g_across, where r = max(0, e2 - e2_base)
    /// is what along / across still lack after the render and the semi-axis noise, and g the measured gain (e2 per unit of
    /// radial variance) from one more render with trial radial variance. Returns the options and, per coordinate (L, W, along,
    /// across), the target and the render's own noise, in px^2 of the file.</summary>
    public static (EllipseMovieOptions Options, IReadOnlyList<RenderNoise> Noise) FromSimParams(EllipseMovieOptions o, SimulationInput p, int supersample = DefaultSupersample)
    {
        if (supersample < 1) throw new ArgumentOutOfRangeException(nameof(supersample), "the supersampling must be >= 1");
        double k = supersample, k2 = k * k;
        double a0 = o.SemiMajorPx, b0 = o.SemiMinorPx;
        if (double.IsFinite(p.R0Px)) { double g = p.R0Px / Math.Sqrt(a0 * b0); a0 *= g; b0 *= g; }
        double pixel = double.IsFinite(p.PixelSizeUm) ? p.PixelSizeUm : o.PixelSizeUm;
        var sim = (o with
        {
            SemiMajorPx = a0 * k, SemiMinorPx = b0 * k,
            SigmaAlongPx = k * Math.Sqrt(p.SignalVarianceLPx2) / 2, SigmaAcrossPx = k * Math.Sqrt(p.SignalVarianceWPx2) / 2,
            TauFrames = p.TauLFrames, TauAlongFrames = p.TauLFrames, TauAcrossFrames = p.TauWFrames,
            DriftPx = o.DriftPx * k, Width = o.Width * supersample, Height = o.Height * supersample,
            PixelSizeUm = pixel / k,
            FrameIntervalMin = double.IsFinite(p.FrameIntervalMin) ? p.FrameIntervalMin : o.FrameIntervalMin,
            NoiseAlongPx = 0, NoiseAcrossPx = 0, RadialNoisePolePx = 0, RadialNoiseFlankPx = 0,
        }).Validated();
        var own = RenderNoiseOf(sim);
        RenderNoise[] noise =
        [
            new("L", p.NoiseVarianceLPx2, own[0] / k2), new("W", p.NoiseVarianceWPx2, own[1] / k2),
            new("along", p.NoiseVarianceAlongPx2, own[2] / k2), new("across", p.NoiseVarianceAcrossPx2, own[3] / k2),
        ];
        var noisy = sim with
        {
            NoiseAlongPx = k * Math.Sqrt(noise[0].RemainderPx2 / 4),
            NoiseAcrossPx = k * Math.Sqrt(noise[1].RemainderPx2 / 4),
        };
        var baseNoise = noisy.NoiseAlongPx > 0 || noisy.NoiseAcrossPx > 0 ? RenderNoiseOf(noisy) : own;
        static double Lack(double target, double have) => double.IsFinite(target) ? Math.Max(0, target - have) : 0;
        double lackAlong = Lack(k2 * p.NoiseVarianceAlongPx2, baseNoise[2]), lackAcross = Lack(k2 * p.NoiseVarianceAcrossPx2, baseNoise[3]);
        if (lackAlong > 0 || lackAcross > 0)
        {
            // Trial radial variance: twice the larger lack (the gain is about 1/2), the same draw, so the difference is the noise's.
            double trial = 2 * Math.Max(lackAlong, lackAcross);
            var t = RenderNoiseOf(noisy with { RadialNoisePolePx = Math.Sqrt(trial), RadialNoiseFlankPx = Math.Sqrt(trial) });
            static double Var(double lack, double gain) => lack > 0 && gain > 0 ? lack / gain : 0;
            double vPole = Var(lackAlong, (t[2] - baseNoise[2]) / trial), vFlank = Var(lackAcross, (t[3] - baseNoise[3]) / trial);
            noisy = noisy with { RadialNoisePolePx = Math.Sqrt(vPole), RadialNoiseFlankPx = Math.Sqrt(vFlank) };
        }
        return (noisy.Validated(), noise);
    }

    /// <summary>Default render supersampling k of <see cref="FromSimParams"/> (docs/sim-params.md#round-trip).</summary>
    public const int DefaultSupersample = 2;

    /// <summary>The white-noise variance e2 (px^2) that the temporal noise model finds in L, W, along and across of the movie
    /// <paramref name="o"/> describes, rendered as it is (default analysis options; only the point fits are used, so 10
    /// resamples); 0 where the fit gives no finite value.</summary>
    public static double[] RenderNoiseOf(EllipseMovieOptions o)
    {
        using var movie = new RenderedMovie(EllipseMovie.Generate(o));
        var r = ShapeNoise.Pipeline.MovieAnalyzer.Run(movie, new ShapeNoise.Pipeline.AnalysisOptions { BootstrapResamples = 10, Seed = 1 });
        static double V(ShapeNoise.Fluctuations.TemporalCoordinate? c) => c?.NoiseVariancePx2.Value is double v && double.IsFinite(v) ? v : 0;
        var t = r.Pooled.Temporal;
        return [V(t?.L), V(t?.W), V(t?.Along), V(t?.Across)];
    }

    /// <summary>One coordinate of the render-noise calibration (px^2): the exported target e2, the noise the renderer makes on its
    /// own, and the remainder max(0, target - own) to add (0 when the target is not finite).</summary>
    public readonly record struct RenderNoise(string Coordinate, double TargetPx2, double RenderPx2)
    {
        /// <summary>max(0, target - own); 0 when the target is unknown.</summary>
        public double RemainderPx2 => double.IsFinite(TargetPx2) ? Math.Max(0, TargetPx2 - RenderPx2) : 0;
        /// <summary>True when the render alone makes more noise than the target asks for.</summary>
        public bool Exceeds => double.IsFinite(TargetPx2) && RenderPx2 > TargetPx2;
    }

    /// <summary>The warning for one coordinate whose render noise alone exceeds the target (lengths in the sim-params' unit), or null.</summary>
    public static string? ExceedWarning(RenderNoise n, double pixelSizeUm)
    {
        if (!n.Exceeds) return null;
        double s = double.IsFinite(pixelSizeUm) ? pixelSizeUm * pixelSizeUm : 1; string u = double.IsFinite(pixelSizeUm) ? "um2" : "px2";
        return string.Create(System.Globalization.CultureInfo.InvariantCulture,
            $"the render's own noise of {n.Coordinate} ({n.RenderPx2 * s:G3} {u}) already exceeds the sim-params noise ({n.TargetPx2 * s:G3} {u}); none added, the simulation has more measurement noise there than asked for");
    }

    /// <summary>truth.json's "from_sim_params" block: the render supersampling k and the radial noise of <paramref name="o"/>, per
    /// coordinate the target e2, the render's own e2 and the remainder added (px^2 of the sim-params file and um^2), and the warnings.</summary>
    public static JsonObject RenderNoiseJson(IReadOnlyList<RenderNoise> noise, double pixelSizeUm, int supersample = 1, EllipseMovieOptions? o = null)
    {
        double s2 = pixelSizeUm * pixelSizeUm;
        var coords = new JsonObject();
        foreach (var n in noise)
            coords[n.Coordinate] = new JsonObject
            {
                ["target_noise_variance_px2"] = Num(n.TargetPx2), ["render_noise_variance_px2"] = Num(n.RenderPx2), ["added_noise_variance_px2"] = Num(n.RemainderPx2),
                ["target_noise_variance_um2"] = Num(n.TargetPx2 * s2), ["render_noise_variance_um2"] = Num(n.RenderPx2 * s2), ["added_noise_variance_um2"] = Num(n.RemainderPx2 * s2),
                ["render_exceeds_target"] = n.Exceeds,
            };
        var warnings = new JsonArray();
        foreach (var n in noise) if (ExceedWarning(n, pixelSizeUm) is { } w) warnings.Add((JsonNode)w);
        double fine = pixelSizeUm / supersample;
        return new JsonObject
        {
            ["description"] = "measurement noise: the render's own (pixelation at the supersampled pixel size, measured on the same movie without added noise) plus, for the remainder, white noise on the semi-axes (L: a, W: b) and white radial noise on the outline's pole (along) and flank (across) sectors, its variances set with the measured gain; px2 in the sim-params file's pixels",
            ["supersample"] = supersample,
            ["render_pixel_size_um"] = Num(fine),
            ["radial_noise_sd_pole_um"] = Num((o?.RadialNoisePolePx ?? 0) * fine), ["radial_noise_sd_flank_um"] = Num((o?.RadialNoiseFlankPx ?? 0) * fine),
            ["noise"] = coords,
            ["warnings"] = warnings,
        };
    }

    /// <summary>Monolayer options that simulate the shape noise a sim-params file describes (docs/sim-params.md#monolayer-round-trip),
    /// in px and frames: the mean cell area is pi R0^2; with the aspect ratio alpha of <paramref name="o"/> (not in the file)
    /// the mean length and width of a cell of that area are L0 = 2 R0 sqrt(alpha) and W0 = 2 R0 / sqrt(alpha), and to first order
    /// L and W scale with the metric lengths A and B, so sigma_along = sqrt(s2_L) / L0, sigma_across = sqrt(s2_W) / W0;
    /// tau of A = tau_L, tau of B = tau_W; the scales as for the ellipses. The measurement noise e2 has no monolayer
    /// parameter and is not mapped. With <paramref name="calibrate"/> the first-order options are corrected once: the same
    /// movie is generated and analysed (default analysis options, 50 resamples), and sigma_along^2, sigma_across^2, tau_A and
    /// tau_B are each multiplied by target / measured of s2_L, s2_W, tau_L and tau_W (the tessellation's own response: a
    /// cell's L and W also follow its neighbours' noise and the packing's slow drift).</summary>
    public static MonolayerMovieOptions MonolayerFromSimParams(MonolayerMovieOptions o, SimulationInput p, bool calibrate = true)
    {
        var first = MonolayerFirstOrder(o, p);
        if (!calibrate) return first;
        var movie = MonolayerMovie.Generate(first);
        using var lm = new MonolayerFrames(movie);
        var r = ShapeNoise.Pipeline.MovieAnalyzer.Run(lm, new ShapeNoise.Pipeline.AnalysisOptions { BootstrapResamples = 50, Seed = 1 });
        if (r.Pooled.Temporal is not { } tf) return first;
        static double Ratio(double target, double measured) => double.IsFinite(measured) && measured > 0 && double.IsFinite(target) ? target / measured : 1;
        double gA = Ratio(p.SignalVarianceLPx2, tf.L.SignalVariancePx2.Value), gB = Ratio(p.SignalVarianceWPx2, tf.W.SignalVariancePx2.Value);
        double hA = Ratio(p.TauLFrames, tf.L.TauFrames.Value), hB = Ratio(p.TauWFrames, tf.W.TauFrames.Value);
        return (first with
        {
            SigmaAlong = first.SigmaAlong * Math.Sqrt(gA), SigmaAcross = first.SigmaAcross * Math.Sqrt(gB),
            TauFrames = first.TauFrames * hA, TauAcrossFrames = first.TauAcrossFrames * hB,
        }).Validated();
    }

    private static MonolayerMovieOptions MonolayerFirstOrder(MonolayerMovieOptions o, SimulationInput p)
    {
        double r0 = double.IsFinite(p.R0Px) ? p.R0Px : Math.Sqrt(o.CellAreaPx2 / Math.PI), sa = Math.Sqrt(o.Aspect);
        return (o with
        {
            CellAreaPx2 = Math.PI * r0 * r0,
            SigmaAlong = Math.Sqrt(p.SignalVarianceLPx2) / (2 * r0 * sa), SigmaAcross = Math.Sqrt(p.SignalVarianceWPx2) / (2 * r0 / sa),
            TauFrames = p.TauLFrames, TauAcrossFrames = p.TauWFrames,
            PixelSizeUm = double.IsFinite(p.PixelSizeUm) ? p.PixelSizeUm : o.PixelSizeUm,
            FrameIntervalMin = double.IsFinite(p.FrameIntervalMin) ? p.FrameIntervalMin : o.FrameIntervalMin,
        }).Validated();
    }

    /// <summary>An ellipse movie's frames as a label movie in memory (px, frames: no calibration), rendered one frame at a time.</summary>
    private sealed class RenderedMovie(EllipseMovie m) : ShapeNoise.Reading.ILabelMovie
    {
        public ShapeNoise.Reading.MovieInfo Info { get; } = new("rendered", m.Width, m.Height, m.Options.Frames, null, null, "in-memory");
        public IReadOnlyList<string> Files { get; } = [];
        public IEnumerable<ShapeNoise.Reading.LabelFrame> Frames() { for (int t = 0; t < m.Options.Frames; t++) yield return new(t, m.Width, m.Height, m.RenderFrame(t)); }
        public void Dispose() { }
    }

    /// <summary>A monolayer movie's frames as a label movie in memory (px, frames: no calibration).</summary>
    private sealed class MonolayerFrames(MonolayerMovie m) : ShapeNoise.Reading.ILabelMovie
    {
        public ShapeNoise.Reading.MovieInfo Info { get; } = new("monolayer", m.Width, m.Height, m.Options.Frames, null, null, "in-memory");
        public IReadOnlyList<string> Files { get; } = [];
        public IEnumerable<ShapeNoise.Reading.LabelFrame> Frames() { int t = 0; foreach (var f in m.Frames()) yield return new(t++, m.Width, m.Height, f); }
        public void Dispose() { }
    }

    /// <summary>Renders raw.tif (the junction-marker movie, uint16, same OME-XML) from a written labels.tif, page by page.</summary>
    public static void WriteRaw(string labelsTif, string rawTif, RawRenderOptions o)
    {
        o.Validated();
        using var t = new ShapeNoise.Imaging.Reading.TiffPages(labelsTif);
        var p0 = t.Pages[0];
        var rng = new Random(o.Seed);
        int n = t.Pages.Count;
        TiffWriter.Write(rawTif, p0.Width, p0.Height, Enumerable.Range(0, n).Select(i => JunctionRenderer.Render(t.ReadLabels(i), p0.Width, p0.Height, i, n, o, rng)),
            TiffWriter.PixelType.UInt16, p0.Description);
    }

    /// <summary>Confluent monolayer with a moving defect pair: labels.tif (uint16, Deflate, OME-XML) and truth.json.</summary>
    public static MonolayerMovie Monolayer(MonolayerMovieOptions o, OutputTarget outDir, IEnumerable<string>? commandLine = null, RawRenderOptions? raw = null)
    {
        OutputFolder.Check(outDir);
        var movie = MonolayerMovie.Generate(o);
        OutputFolder.Write(outDir, dir =>
        {
            var xml = TiffWriter.OmeXml(movie.Width, movie.Height, o.Frames, "uint16", o.PixelSizeUm, o.FrameIntervalMin);
            TiffWriter.Write(Path.Combine(dir, "labels.tif"), movie.Width, movie.Height, movie.Frames(), TiffWriter.PixelType.UInt16, xml);
            if (raw is not null) WriteRaw(Path.Combine(dir, "labels.tif"), Path.Combine(dir, "raw.tif"), raw);
            var t = movie.Truth; double s = o.PixelSizeUm, sv = s / o.FrameIntervalMin;
            var frames = new JsonArray();
            for (int f = 0; f < o.Frames; f++)
                frames.Add((JsonNode)new JsonObject
                {
                    ["frame"] = f,
                    ["plus_x_um"] = t.PlusX[f] * s, ["plus_y_um"] = t.PlusY[f] * s, ["minus_x_um"] = t.MinusX[f] * s, ["minus_y_um"] = t.MinusY[f] * s,
                    ["plus_x_px"] = t.PlusX[f], ["plus_y_px"] = t.PlusY[f], ["minus_x_px"] = t.MinusX[f], ["minus_y_px"] = t.MinusY[f],
                    ["head_x"] = t.HeadX, ["head_y"] = t.HeadY,
                });
            var truth = new JsonObject
            {
                ["scenario"] = "monolayer",
                ["description"] = "Confluent anisotropic centroidal Voronoi tissue aligned with a prescribed director field holding a +1/2/-1/2 pair; values are the prescribed truth.",
                ["pixel_size_um"] = s, ["frame_interval_min"] = o.FrameIntervalMin,
                ["width_px"] = movie.Width, ["height_px"] = movie.Height, ["frames"] = o.Frames, ["cells"] = t.Cells,
                ["motion"] = o.Motion.ToString().ToLowerInvariant(),
                ["defect_headward_speed_um_per_min"] = t.DefectHeadwardSpeedPx * sv, ["defect_headward_speed_px_per_frame"] = t.DefectHeadwardSpeedPx,
                ["flow_vx_um_per_min"] = t.FlowVx * sv, ["flow_vy_um_per_min"] = t.FlowVy * sv,
                ["flow_headward_speed_um_per_min"] = t.FlowHeadwardSpeedPx * sv, ["flow_headward_speed_px_per_frame"] = t.FlowHeadwardSpeedPx,
                ["shape_noise_sigma_along"] = o.SigmaAlong, ["shape_noise_sigma_across"] = o.SigmaAcross, ["shape_noise_tau_min"] = o.TauFrames * o.FrameIntervalMin,
                ["director"] = "theta = phi_plus/2 - phi_minus/2 + pi/2 (phi: polar angle about each core)",
                ["defects"] = frames,
                ["pairs"] = o.Pairs,
                ["plus_defects"] = PlusDefects(t, o),
            };
            if (o.Flow != TissueFlow.Uniform) truth["flow"] = FlowJson(movie);
            File.WriteAllText(Path.Combine(dir, "truth.json"), truth.ToJsonString(Summary.Indented));
            var opts = OptionsJson.Node(o);
            File.WriteAllText(Path.Combine(dir, "run.json"), Provenance.Describe("synth monolayer", [], opts, commandLine).ToJsonString(Summary.Indented));
        });
        return movie;
    }

    private static JsonValue? Num(double v) => double.IsFinite(v) ? JsonValue.Create(v) : null;

    /// <summary>truth.json's "flow" block for a flock or a swirl (docs/motion.md#synthetic-flows): the realised polar order,
    /// mean and rms speed of the cells' imposed velocities, and the field's velocity correlation on the truth grid with its
    /// first zero, 1/e length and J0's analytic first zero 2.405 / k; lengths in px and um, speeds in px/frame and um/min.</summary>
    private static JsonObject FlowJson(MonolayerMovie movie)
    {
        var o = movie.Options; var f = movie.FlowStatistics();
        double s = o.PixelSizeUm, sv = s / o.FrameIntervalMin;
        var c = f.Correlation;
        var rPx = new JsonArray(); var rUm = new JsonArray(); var cv = new JsonArray(); var pairs = new JsonArray();
        for (int b = 0; b < c.R.Length; b++) { rPx.Add((JsonNode)c.R[b]); rUm.Add((JsonNode)(c.R[b] * s)); cv.Add((JsonNode?)Num(c.C[b])); pairs.Add((JsonNode)c.Pairs[b]); }
        return new JsonObject
        {
            ["kind"] = o.Flow.ToString().ToLowerInvariant(),
            ["description"] = o.Flow == TissueFlow.Flock
                ? "uniform velocity plus an incompressible random field of plane waves (psi = A sum_j cos(k e_j . x + phi_j(t))), periodic canvas; values realised from the imposed velocities"
                : "incompressible random field of plane waves of one wavenumber (psi = A sum_j cos(k e_j . x + phi_j(t)), v = (dpsi/dy, -dpsi/dx)), periodic canvas; values realised from the imposed velocities",
            ["flock_vx_px_per_frame"] = movie.Truth.FlowVx, ["flock_vy_px_per_frame"] = movie.Truth.FlowVy,
            ["flock_vx_um_per_min"] = movie.Truth.FlowVx * sv, ["flock_vy_um_per_min"] = movie.Truth.FlowVy * sv,
            ["waves"] = MonolayerMovieOptions.FlowWaves,
            ["wavelength_px"] = f.WavelengthPx, ["wavelength_um"] = f.WavelengthPx * s,
            ["field_tau_frames"] = f.TauFrames, ["field_tau_min"] = f.TauFrames * o.FrameIntervalMin,
            ["polar_order"] = Num(f.PolarOrder),
            ["mean_speed_px_per_frame"] = Num(f.MeanSpeedPx), ["mean_speed_um_per_min"] = Num(f.MeanSpeedPx * sv),
            ["rms_speed_px_per_frame"] = Num(f.RmsSpeedPx), ["rms_speed_um_per_min"] = Num(f.RmsSpeedPx * sv),
            ["field_rms_speed_px_per_frame"] = Num(f.FieldRmsSpeedPx), ["field_rms_speed_um_per_min"] = Num(f.FieldRmsSpeedPx * sv),
            ["correlation_first_zero_px"] = Num(f.FirstZeroPx), ["correlation_first_zero_um"] = Num(f.FirstZeroPx * s),
            ["correlation_one_over_e_px"] = Num(f.OneOverEPx), ["correlation_one_over_e_um"] = Num(f.OneOverEPx * s),
            ["analytic_first_zero_px"] = Num(f.AnalyticFirstZeroPx), ["analytic_first_zero_um"] = Num(f.AnalyticFirstZeroPx * s),
            ["grid_spacing_px"] = f.GridSpacingPx,
            ["realised_polar_order"] = Num(f.RealisedPolarOrder),
            ["realised_rms_speed_px_per_frame"] = Num(f.RealisedRmsSpeedPx), ["realised_rms_speed_um_per_min"] = Num(f.RealisedRmsSpeedPx * sv),
            ["realised_follow_slope"] = Num(f.FollowSlope),
            ["velocity_correlation"] = new JsonObject { ["r_px"] = rPx, ["r_um"] = rUm, ["c"] = cv, ["pairs"] = pairs },
        };
    }

    /// <summary>Every prescribed +1/2 defect: region level z, its var_L/var_W factor, signed headward speed, path and heads.</summary>
    private static JsonArray PlusDefects(MonolayerTruth t, MonolayerMovieOptions o)
    {
        double s = o.PixelSizeUm, sv = s / o.FrameIntervalMin;
        var list = new JsonArray();
        for (int k = 0; k < t.Plus.Count; k++)
        {
            var p = t.Plus[k];
            var path = new JsonArray();
            for (int f = 0; f < p.X.Length; f++)
                path.Add((JsonNode)new JsonObject { ["frame"] = f, ["x_px"] = p.X[f], ["y_px"] = p.Y[f], ["head_x"] = p.HeadX[f], ["head_y"] = p.HeadY[f] });
            list.Add((JsonNode)new JsonObject
            {
                ["index"] = k, ["region_level"] = p.Level, ["anisotropy_factor"] = p.AnisotropyFactor,
                ["headward_speed_px_per_frame"] = p.HeadwardSpeedPx, ["headward_speed_um_per_min"] = p.HeadwardSpeedPx * sv,
                ["minus_x_px"] = k < t.Minus.Count ? t.Minus[k].X : double.NaN, ["minus_y_px"] = k < t.Minus.Count ? t.Minus[k].Y : double.NaN,
                ["path"] = path,
            });
        }
        return list;
    }

    /// <summary>truth.json: the realised truth by the spec's definitions (px and um), plus every cell's trajectory and label ids.</summary>
    public static JsonObject TruthJson(EllipseMovie m)
    {
        var t = m.Truth; var o = m.Options;
        double s = o.PixelSizeUm, s2 = s * s;
        JsonArray Arr(double[] v, double f = 1) => new(v.Select(x => (JsonNode?)JsonValue.Create(Math.Round(x * f, 6))).ToArray());
        var cells = new JsonArray();
        for (int i = 0; i < o.Cells; i++)
            cells.Add((JsonNode)new JsonObject
            {
                ["cell"] = i,
                ["x_px"] = Arr(t.CentreX[i]), ["y_px"] = Arr(t.CentreY[i]),
                ["a_px"] = Arr(t.A[i]), ["b_px"] = Arr(t.B[i]), ["theta_rad"] = Arr(t.Theta[i]),
                ["label"] = new JsonArray(Enumerable.Range(0, o.Frames).Select(f => (JsonNode?)JsonValue.Create(t.LabelOfCell[f][i])).ToArray()),
            });
        return new JsonObject
        {
            ["scenario"] = "ellipses",
            ["description"] = "Isolated ellipses whose semi-axes follow independent Ornstein-Uhlenbeck processes; values are the realised truth by the ShapeNoise spec's definitions, evaluated on the continuous shapes.",
            ["pixel_size_um"] = s,
            ["frame_interval_min"] = o.FrameIntervalMin,
            ["width_px"] = m.Width, ["height_px"] = m.Height, ["frames"] = o.Frames, ["cells"] = o.Cells,
            ["anisotropy"] = t.Anisotropy,
            ["anisotropy_contour"] = t.AnisotropyContour,
            ["var_L_um2"] = t.VarLPx2 * s2, ["var_W_um2"] = t.VarWPx2 * s2,
            ["var_along_um2"] = t.VarAlongPx2 * s2, ["var_across_um2"] = t.VarAcrossPx2 * s2,
            ["var_L_px2"] = t.VarLPx2, ["var_W_px2"] = t.VarWPx2, ["var_along_px2"] = t.VarAlongPx2, ["var_across_px2"] = t.VarAcrossPx2,
            ["tau_min"] = t.TauFrames * o.FrameIntervalMin, ["tau_frames"] = t.TauFrames,
            ["tau_q_realised_min"] = t.TauQRealisedFrames * o.FrameIntervalMin, ["tau_q_realised_frames"] = t.TauQRealisedFrames,
            ["tau_length_realised_min"] = t.TauLengthRealisedFrames * o.FrameIntervalMin,
            ["anisotropy_signal_realised"] = t.AnisotropySignalRealised,
            ["tau_theta_min"] = t.TauThetaFrames * o.FrameIntervalMin, ["tau_theta_realised_min"] = t.TauThetaRealisedFrames * o.FrameIntervalMin,
            ["sigma_along_px"] = t.SigmaAlongPx, ["sigma_across_px"] = t.SigmaAcrossPx,
            ["mean_cell_radius_um"] = t.MeanCellRadiusPx * s, ["mean_cell_radius_px"] = t.MeanCellRadiusPx,
            ["trajectories"] = cells,
        };
    }
}
