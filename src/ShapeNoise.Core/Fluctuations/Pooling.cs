using ShapeNoise.Statistics;

namespace ShapeNoise.Fluctuations;

/// <summary>Pooling of the tracks' fluctuation measures over one movie (docs/measures.md#movie-pooling).</summary>
public static class Pooling
{
    /// <summary>Frame-weighted pooling over the used tracks with percentile bootstrap intervals over tracks
    /// (docs/measures.md#movie-pooling; resampled by <paramref name="plan"/>, default the bootstrap over the used tracks): a pooled mean is sum_i N_i v_i / sum_i N_i (N_i = frames of track i); the
    /// anisotropies are ratios of such means; contour variances are floor-corrected by <see cref="NoiseFloor"/>. Under the
    /// temporal noise model (<see cref="PoolingOptions.NoiseModel"/>, the default) the headline anisotropies and variances
    /// are instead the signal variances of <see cref="TemporalNoise"/> on the same plan (docs/measures.md#temporal-noise-model);
    /// the raw values stay beside them.</summary>
    public static PooledFluctuations Of(IReadOnlyList<TrackRecord> allTracks, int m, PoolingOptions options, NoiseFloorReference? r, ResamplingPlan? plan = null)
    {
        var t = new List<TrackRecord>();
        foreach (var x in allTracks) if (x.Used && x.Contour is not null) t.Add(x);
        int n = t.Count;
        var N = new double[n]; var vL = new double[n]; var vW = new double[n];
        var aR = new double[n]; var cR = new double[n]; var aF = new double[n]; var cF = new double[n];
        for (int i = 0; i < n; i++)
        {
            var c = t[i].Contour!;
            N[i] = t[i].Frames;
            vL[i] = t[i].VarLPx2 - (r?.VarLPx2 ?? 0);
            vW[i] = t[i].VarWPx2 - (r?.VarWPx2 ?? 0);
            aR[i] = c.VarAlongRaw; cR[i] = c.VarAcrossRaw;
            aF[i] = NoiseFloor.AlongOf(c, r); cF[i] = NoiseFloor.AcrossOf(c, r);
        }
        double Mean(double[] v, int[] k) { double s = 0, w = 0; for (int i = 0; i < n; i++) { s += k[i] * N[i] * v[i]; w += k[i] * N[i]; } return w > 0 ? s / w : double.NaN; }
        double Diff(double[] a, double[] b, int[] k) => Mean(a, k) - Mean(b, k);
        plan ??= ResamplingPlan.OverTracks(n, options.BootstrapResamples, options.Seed);
        if (plan.Items != n) throw new ArgumentException($"{nameof(plan)} covers {plan.Items} tracks, {n} are used");
        var anis = Bootstrap.Percentile(plan, k => Mean(vL, k) / Mean(vW, k));
        var anisC = Bootstrap.Percentile(plan, k => Diff(aR, aF, k) / Diff(cR, cF, k));
        var anisCRaw = Bootstrap.Percentile(plan, k => Mean(aR, k) / Mean(cR, k));
        var varL = Bootstrap.Percentile(plan, k => Mean(vL, k));
        var varW = Bootstrap.Percentile(plan, k => Mean(vW, k));
        var along = Bootstrap.Percentile(plan, k => Diff(aR, aF, k));
        var across = Bootstrap.Percentile(plan, k => Diff(cR, cF, k));
        var ones = new int[n]; Array.Fill(ones, 1);
        var rawL = new double[n]; var rawW = new double[n];
        for (int i = 0; i < n; i++) { rawL[i] = t[i].VarLPx2; rawW[i] = t[i].VarWPx2; }
        var anisRaw = Bootstrap.Percentile(plan, k => Mean(rawL, k) / Mean(rawW, k));

        var (spec, floorMode, centres, profRaw, profCorr, profFloor) = SpectrumAndProfile(t, m, r);
        var model = options.NoiseModel;
        if (model == NoiseModel.FixedCells && r is null) throw new ArgumentException($"{nameof(NoiseModel)} fixed-cells needs a fixed-cell reference (--floor-from)");
        var temporal = model == NoiseModel.Temporal ? TemporalNoise.Of(t, plan, options.MaxLagFrames) : null;
        var na = Estimate.NotApplicableBecause($"noise model {Name(model)}: the floor is floor_along / floor_across", n, plan.UnitName);
        var pooled = new PooledFluctuations(anis, anisC, anisCRaw, varL, varW, along, across,
            Mean(aR, ones), Mean(cR, ones), Mean(aF, ones), Mean(cF, ones), floorMode, spec, centres, profRaw, profCorr, profFloor)
        {
            NoiseModel = model, AnisotropyRaw = anisRaw, VarLRaw = Mean(rawL, ones), VarWRaw = Mean(rawW, ones),
            NoiseVarL = na, NoiseVarW = na, NoiseVarAlong = na, NoiseVarAcross = na, Temporal = temporal,
        };
        if (temporal is null) return pooled;
        // Temporal model (docs/measures.md#temporal-noise-model): the headline values are the fitted signal variances.
        return pooled with
        {
            Anisotropy = temporal.Anisotropy, AnisotropyContour = temporal.AnisotropyContour,
            VarL = temporal.L.SignalVariancePx2, VarW = temporal.W.SignalVariancePx2,
            VarAlong = temporal.Along.SignalVariancePx2, VarAcross = temporal.Across.SignalVariancePx2,
            NoiseVarL = temporal.L.NoiseVariancePx2, NoiseVarW = temporal.W.NoiseVariancePx2,
            NoiseVarAlong = temporal.Along.NoiseVariancePx2, NoiseVarAcross = temporal.Across.NoiseVariancePx2,
        };
    }

    /// <summary>The noise model as written to the outputs and typed on the command line: temporal, modes, fixed-cells.</summary>
    public static string Name(NoiseModel model) => model switch
    {
        NoiseModel.Temporal => "temporal",
        NoiseModel.Modes => "modes",
        _ => "fixed-cells",
    };

    /// <summary>Parses temporal, modes or fixed-cells (case-insensitive).</summary>
    /// <exception cref="ArgumentException">Any other text; the message names the property.</exception>
    public static NoiseModel ParseNoiseModel(string s) => s.ToLowerInvariant() switch
    {
        "temporal" => NoiseModel.Temporal,
        "modes" => NoiseModel.Modes,
        "fixed-cells" => NoiseModel.FixedCells,
        _ => throw new ArgumentException($"{nameof(NoiseModel)} must be temporal, modes or fixed-cells (got '{s}')"),
    };

    /// <summary>Frame-weighted mode spectrum p_n, floor per mode, and the variance profile against the normal's angle to
    /// the long axis (9 bins over [0, 90] degrees), raw, floor and corrected.</summary>
    private static (double[] Spec, double FloorMode, double[] Centres, double[] ProfRaw, double[] ProfCorr, double[] ProfFloor)
        SpectrumAndProfile(List<TrackRecord> t, int m, NoiseFloorReference? r)
    {
        int nm = m / 2 + 1;
        var spec = new double[nm];
        double floorMode = 0, wsum = 0;
        const int bins = 9;
        var profRaw = new double[bins]; var profFloor = new double[bins]; var profW = new double[bins]; var centres = new double[bins];
        for (int b = 0; b < bins; b++) centres[b] = (b + 0.5) * 90.0 / bins;
        foreach (var x in t)
        {
            var c = x.Contour!;
            for (int j = 0; j < nm; j++) spec[j] += x.Frames * c.ModePower[j];
            floorMode += x.Frames * (r?.FloorPerModePx2 ?? c.FloorPerMode);
            wsum += x.Frames;
            double floorScale = r is null ? 1 : (c.FloorPerMode > 0 ? r.FloorPerModePx2 / c.FloorPerMode : 0);
            for (int k = 0; k < m; k++)
            {
                int b = Math.Min(bins - 1, (int)(c.NormalAngleDeg[k] / (90.0 / bins)));
                double w = x.Frames * c.ArcWeight[k];
                profRaw[b] += w * c.SampleVariance[k]; profFloor[b] += w * c.SampleFloor[k] * floorScale; profW[b] += w;
            }
        }
        for (int j = 0; j < nm; j++) spec[j] = wsum > 0 ? spec[j] / wsum : double.NaN;
        floorMode = wsum > 0 ? floorMode / wsum : double.NaN;
        var profCorr = new double[bins];
        for (int b = 0; b < bins; b++)
        {
            profRaw[b] = profW[b] > 0 ? profRaw[b] / profW[b] : double.NaN;
            profFloor[b] = profW[b] > 0 ? profFloor[b] / profW[b] : double.NaN;
            profCorr[b] = profRaw[b] - profFloor[b];
        }
        return (spec, floorMode, centres, profRaw, profCorr, profFloor);
    }

    /// <summary>Used tracks whose floor-corrected var_along or var_across is &lt;= 0 (docs/measures.md#noise-floor).</summary>
    public static int TracksBelowFloor(IReadOnlyList<TrackRecord> tracks, NoiseFloorReference? floorReference)
    {
        int below = 0;
        foreach (var t in tracks)
            if (t.Used && t.Contour is { } c && (c.VarAlongRaw - NoiseFloor.AlongOf(c, floorReference) <= 0 || c.VarAcrossRaw - NoiseFloor.AcrossOf(c, floorReference) <= 0)) below++;
        return below;
    }
}
