using ShapeNoise.TimeSeries;
namespace ShapeNoise.Dynamics;

/// <summary>Which model of C_theta(k) was chosen (docs/dynamics.md#orientation-tau_theta-by-model-selection).</summary>
public enum ThetaModel
{
    /// <summary>C = A exp(-k/tau): the orientation decorrelates fully.</summary>
    NoPlateau,
    /// <summary>C = p + A exp(-k/tau): part of the alignment never decorrelates within the tracks.</summary>
    Plateau,
}

/// <summary>Fit of C_theta(k) over lags k &gt;= 1 with the chosen model.</summary>
/// <param name="TauFrames">Decay time of the decorrelating part (frames).</param>
/// <param name="Plateau">p: the part of the alignment that never decorrelates within the tracks (0 for <see cref="ThetaModel.NoPlateau"/>).</param>
/// <param name="Amplitude">A (A + p &lt; 1 when fast measurement noise removes some correlation already at lag 1).</param>
/// <param name="Model">The model chosen by AIC.</param>
/// <param name="AicNoPlateau">AIC of the no-plateau fit (2 parameters).</param>
/// <param name="AicPlateau">AIC of the plateau fit (3 parameters).</param>
internal readonly record struct PlateauFit(double TauFrames, double Plateau, double Amplitude, ThetaModel Model = ThetaModel.Plateau,
    double AicNoPlateau = double.NaN, double AicPlateau = double.NaN);

/// <summary>Orientation autocorrelation C_theta(k) = mean cos 2(theta(t+k) - theta(t)) pooled over tracks, and its fit.</summary>
/// <remarks>The nematic (cos 2 delta-theta) orientation correlation of elongated cells; a plateau allows for locally
/// aligned regions that never decorrelate (e.g. Duclos G. et al. (2017), "Topological defects in confined populations of
/// spindle-shaped cells", Nature Physics 13:58-62). For pure rotational diffusion (a Wiener process on the circle with
/// coefficient D) E cos 2 dtheta = exp(-2 Var dtheta) = exp(-4 D k) exactly, with no per-track-mean bias (Berg H.C. (1993),
/// Random Walks in Biology, Princeton University Press, ch. 1 and 6). Two models are fitted by weighted least squares
/// (weights = pair counts): C = A exp(-k/tau) and C = p + A exp(-k/tau) (p in [0, 1], A &gt;= 0; the linear parameters in
/// closed form for each tau, tau by a grid over log tau refined by golden section), and the one with the smaller Akaike
/// information criterion AIC = n ln(SSE_w / W) + 2 m is kept (Akaike H. (1974), "A new look at the statistical model
/// identification", IEEE Trans. Autom. Control 19:716-723), with n the effective sample size (docs/dynamics.md).</remarks>
internal static class OrientationCorrelation
{
    /// <summary>Shortest tau (frames) of the search range.</summary>
    public const double MinTauFrames = 0.05;

    /// <summary>Smallest decaying amplitude A of an admissible plateau fit: below it almost nothing decorrelates and tau is
    /// not identified (docs/dynamics.md#orientation-tau_theta-by-model-selection).</summary>
    public const double MinAmplitude = 0.05;

    /// <summary>Per-track sums of cos 2(theta(t+k) - theta(t)) over present pairs, lags 0..K.</summary>
    public static LagSums Of(TrackSeries theta, int maxLag)
    {
        var sum = new double[maxLag + 1]; var pairs = new int[maxLag + 1];
        int n = theta.Values.Length;
        if (n == 0) return new LagSums(sum, pairs);
        int f0 = theta.Frames[0], span = theta.Frames[^1] - f0 + 1;
        var at = new int[span];
        Array.Fill(at, -1);
        for (int i = 0; i < n; i++) at[theta.Frames[i] - f0] = i;
        for (int i = 0; i < n; i++)
            for (int k = 0; k <= maxLag && theta.Frames[i] - f0 + k < span; k++)
            {
                int j = at[theta.Frames[i] - f0 + k];
                if (j < 0) continue;
                sum[k] += Math.Cos(2 * (theta.Values[j] - theta.Values[i]));
                pairs[k]++;
            }
        return new LagSums(sum, pairs);
    }

    /// <summary>Pooled C_theta(k) with track multiplicities.</summary>
    public static double[] Pool(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, out long[] pairs)
        => PooledAutocovariance.Pool(tracks, weights, out pairs);

    /// <summary>Fits both models to C(k), k = 1..<paramref name="fitLags"/>, weighted by pair counts, tau in
    /// [<see cref="MinTauFrames"/>, <paramref name="maxTauFrames"/>], and keeps the one with the smaller AIC computed with
    /// <paramref name="effectiveN"/> independent observations (0 = the number of fitted lags).</summary>
    public static PlateauFit Fit(ReadOnlySpan<double> c, ReadOnlySpan<long> pairs, int fitLags, double maxTauFrames, double effectiveN = 0)
    {
        int K = Math.Min(fitLags, c.Length - 1);
        if (K < 2) return new PlateauFit(double.NaN, double.NaN, double.NaN);
        var y = c[1..(K + 1)].ToArray(); var w = new double[K];
        int used = 0;
        for (int k = 0; k < K; k++) { w[k] = double.IsFinite(y[k]) ? pairs[k + 1] : 0; if (w[k] > 0) used++; }
        double W = w.Sum();
        if (used < 2 || !(W > 0)) return new PlateauFit(double.NaN, double.NaN, double.NaN);
        double hi = Math.Log(Math.Max(1, maxTauFrames)), lo = Math.Log(MinTauFrames);
        double tau0 = Math.Exp(Statistics.Minimize.GridThenGolden(lt => Sse(y, w, Math.Exp(lt), false, out _, out _), lo, hi));
        double sse0 = Sse(y, w, tau0, false, out _, out var a0);
        double tau1 = Math.Exp(Statistics.Minimize.GridThenGolden(lt => Sse(y, w, Math.Exp(lt), true, out _, out _), lo, hi));
        double sse1 = Sse(y, w, tau1, true, out var p1, out var a1);
        double n = effectiveN > 0 ? effectiveN : used;
        double Aic(double sse, int m) => n * Math.Log(Math.Max(sse, 1e-300) / W) + 2 * m;
        double aic0 = Aic(sse0, 2), aic1 = Aic(sse1, 3);
        return aic1 < aic0 && p1 > 0
            ? new PlateauFit(tau1, p1, a1, ThetaModel.Plateau, aic0, aic1)
            : new PlateauFit(tau0, 0, a0, ThetaModel.NoPlateau, aic0, aic1);
    }

    /// <summary>Shrinkage of the track covariance of the pooled curve toward its diagonal (docs/dynamics.md#orientation-tau_theta-by-model-selection).</summary>
    public const double Shrinkage = 0.2;

    /// <summary>
    /// Fits both models to the pooled C_theta of <paramref name="tracks"/> (bootstrap multiplicities <paramref name="weights"/>,
    /// empty = all 1) by weighted least squares, then chooses by AIC = chi^2 + 2 m, chi^2 = r' S^-1 r the generalized residual
    /// sum with S the covariance of the pooled curve estimated from the independent tracks (delta method for the ratio
    /// estimator, S_kl = sum_i w_i d_ik d_il, d_ik = (Sum_ik - C_k Pairs_ik) / Pairs_k), shrunk by <see cref="Shrinkage"/>
    /// toward its diagonal so it stays invertible with few tracks. The pooled curve's errors at different lags are strongly
    /// correlated (each track contributes a smooth curve), so a criterion from the weighted residuals alone counts them as
    /// independent and picks a spurious plateau; the generalized chi^2 is the Gaussian -2 ln L of the curve up to a constant.
    /// A plateau fit at p = 0 or 1, or with A &lt; <see cref="MinAmplitude"/> (nothing decorrelates), is not admissible: the no-plateau fit is kept.
    /// </summary>
    /// <summary>The lower triangle (b &lt;= a) of sum_i w_i d_i[a] d_i[b], d_i[a] = (Sum_i[k] - c[k] Pairs_i[k]) / pairs[k] with
    /// k = idx[a] + 1: each element is the sum over the tracks in their order of (w_i d_i[a]) d_i[b], a multiply then an add
    /// (vector-wide over b, not fused), so the sums are those of the element-by-element loop. The tracks of nonzero weight are
    /// taken in blocks of <see cref="CovarianceBlock"/> rows, and each block is swept once per element group with the
    /// running sums held in registers.</summary>
    private static double[,] LowerCovariance(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, double[] c, long[] pairs, int[] idx)
    {
        int m = idx.Length;
        var flat = new double[m * m];
        var d = new double[CovarianceBlock * m]; var s = new double[CovarianceBlock * m];
        int rows = 0;
        for (int i = 0; i < tracks.Count; i++)
        {
            int wi = weights.Length == 0 ? 1 : weights[i];
            if (wi == 0) continue;
            var t = tracks[i];
            var di = d.AsSpan(rows * m, m); var si = s.AsSpan(rows * m, m);
            for (int a = 0; a < m; a++) { int k = idx[a] + 1; di[a] = (t.Sum[k] - c[k] * t.Pairs[k]) / pairs[k]; }
            for (int a = 0; a < m; a++) si[a] = wi * di[a];
            if (++rows == CovarianceBlock) { AddBlock(flat, d, s, rows, m); rows = 0; }
        }
        if (rows > 0) AddBlock(flat, d, s, rows, m);
        var cov = new double[m, m];
        for (int a = 0; a < m; a++) for (int b = 0; b <= a; b++) cov[a, b] = flat[a * m + b];
        return cov;
    }

    /// <summary>Rows of tracks per block of <see cref="LowerCovariance"/> (a block of d and w d stays in the first-level cache).</summary>
    private const int CovarianceBlock = 32;

    /// <summary>flat[a m + b] += s_r[a] d_r[b] for b &lt;= a, over the rows r of the block in order.</summary>
    private static void AddBlock(double[] flat, double[] d, double[] s, int rows, int m)
    {
        int w = System.Numerics.Vector.IsHardwareAccelerated ? System.Numerics.Vector<double>.Count : int.MaxValue;
        for (int a = 0; a < m; a++)
        {
            int b = 0;
            for (; b + w <= a + 1; b += w)
            {
                var acc = new System.Numerics.Vector<double>(flat.AsSpan(a * m + b));
                for (int r = 0; r < rows; r++)
                    acc += new System.Numerics.Vector<double>(s[r * m + a]) * new System.Numerics.Vector<double>(d.AsSpan(r * m + b));
                acc.CopyTo(flat.AsSpan(a * m + b));
            }
            for (; b <= a; b++)
            {
                double acc = flat[a * m + b];
                for (int r = 0; r < rows; r++) acc += s[r * m + a] * d[r * m + b];
                flat[a * m + b] = acc;
            }
        }
    }

    public static PlateauFit FitTracks(IReadOnlyList<LagSums> tracks, ReadOnlySpan<int> weights, int fitLags, double maxTauFrames, Statistics.UnitSplit.Parts? split = null)
    {
        var c = PooledAutocovariance.Pool(tracks, weights, out var pairs, int.MaxValue, split);
        int K = Math.Min(fitLags, c.Length - 1);
        if (K < 2) return new PlateauFit(double.NaN, double.NaN, double.NaN);
        var y = c[1..(K + 1)].ToArray(); var w = new double[K];
        int used = 0;
        for (int k = 0; k < K; k++) { w[k] = double.IsFinite(y[k]) ? pairs[k + 1] : 0; if (w[k] > 0) used++; }
        if (used < 2) return new PlateauFit(double.NaN, double.NaN, double.NaN);
        var idx = Enumerable.Range(0, K).Where(k => w[k] > 0).ToArray();
        int m = idx.Length;
        var cov = LowerCovariance(tracks, weights, c, pairs, idx);
        for (int a = 0; a < m; a++) for (int b = 0; b < a; b++) cov[a, b] = cov[b, a] = (1 - Shrinkage) * cov[a, b];
        var mat = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfArray(cov);
        double tiny = 1e-12 * Math.Max(1e-300, Enumerable.Range(0, m).Max(a => cov[a, a]));
        for (int a = 0; a < m; a++) mat[a, a] = Math.Max(mat[a, a], tiny);
        MathNet.Numerics.LinearAlgebra.Factorization.Cholesky<double> chol;
        try { chol = mat.Cholesky(); }
        catch (ArgumentException) { return Fit(c, pairs, fitLags, maxTauFrames); }
        double hi = Math.Log(Math.Max(1, maxTauFrames)), lo = Math.Log(MinTauFrames);
        var inv = chol.Solve(MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseIdentity(m));
        var yv = MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense(m, a => y[idx[a]]);
        var one = MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense(m, 1.0);
        var invY = inv * yv; var invOne = inv * one;
        double yy = yv.DotProduct(invY), y1 = one.DotProduct(invY), o1 = one.DotProduct(invOne);
        // Each chi^2 evaluation (about 170 per fit, one fit per bootstrap resample) multiplies by the inverse on plain arrays:
        // row-by-row sums in natural order, which is how MathNet's managed provider forms the matrix-vector and dot products,
        // so the values are the same doubles without a MathNet vector allocated per evaluation (bench/README.md).
        var invRows = new double[m * m];
        for (int a = 0; a < m; a++) for (int b = 0; b < m; b++) invRows[a * m + b] = inv[a, b];
        var invYs = invY.ToArray(); var invOnes = invOne.ToArray();
        var e = new double[m]; var invE = new double[m];
        // Profile chi^2 over the linear parameters (generalized least squares, closed form) at each tau, same constraints as the WLS fit.
        double Chi2(double tau, bool plateau)
        {
            for (int a = 0; a < m; a++) e[a] = Math.Exp(-(idx[a] + 1) / tau);
            for (int a = 0; a < m; a++)
            {
                double sum = 0;
                var row = invRows.AsSpan(a * m, m);
                for (int b = 0; b < m; b++) sum += row[b] * e[b];
                invE[a] = sum;
            }
            double ee = 0, ye = 0, e1 = 0;
            for (int a = 0; a < m; a++) ee += e[a] * invE[a];
            for (int a = 0; a < m; a++) ye += e[a] * invYs[a];
            for (int a = 0; a < m; a++) e1 += e[a] * invOnes[a];
            double Q(double p, double amp) => yy - 2 * p * y1 - 2 * amp * ye + p * p * o1 + 2 * p * amp * e1 + amp * amp * ee;
            double aOnly = ee > 0 ? Math.Max(0, ye / ee) : 0;
            if (!plateau) return Q(0, aOnly);
            double det = o1 * ee - e1 * e1;
            double pp = det != 0 ? (y1 * ee - ye * e1) / det : 0, aa = det != 0 ? (ye * o1 - y1 * e1) / det : 0;
            if (pp >= 0 && pp <= 1 && aa >= 0) return Q(pp, aa);
            double best = Q(0, aOnly);
            double p1c = Math.Clamp(o1 > 0 ? y1 / o1 : 0, 0, 1); best = Math.Min(best, Q(p1c, 0));
            double aUp = ee > 0 ? Math.Max(0, (ye - e1) / ee) : 0; best = Math.Min(best, Q(1, aUp));
            return best;
        }
        double chi0 = Chi2(Math.Exp(Statistics.Minimize.GridThenGolden(lt => Chi2(Math.Exp(lt), false), lo, hi)), false);
        double chi1 = Chi2(Math.Exp(Statistics.Minimize.GridThenGolden(lt => Chi2(Math.Exp(lt), true), lo, hi)), true);
        double tau0 = Math.Exp(Statistics.Minimize.GridThenGolden(lt => Sse(y, w, Math.Exp(lt), false, out _, out _), lo, hi));
        Sse(y, w, tau0, false, out _, out var a0);
        double tau1 = Math.Exp(Statistics.Minimize.GridThenGolden(lt => Sse(y, w, Math.Exp(lt), true, out _, out _), lo, hi));
        Sse(y, w, tau1, true, out var p1, out var a1);
        double aic0 = chi0 + 4, aic1 = Math.Min(chi1, chi0) + 6;
        bool admissible = p1 > 0 && p1 < 1 && a1 >= MinAmplitude;
        return admissible && aic1 < aic0
            ? new PlateauFit(tau1, p1, a1, ThetaModel.Plateau, aic0, aic1)
            : new PlateauFit(tau0, 0, a0, ThetaModel.NoPlateau, aic0, aic1);
    }

    /// <summary>Weighted SSE of the model at this tau with the linear parameters (p, A) in closed form; p fixed at 0 unless
    /// <paramref name="plateau"/>.</summary>
    private static double Sse(double[] y, double[] w, double tau, bool plateau, out double p, out double a)
    {
        int K = y.Length;
        double s1 = 0, se = 0, see = 0, sy = 0, sye = 0;
        for (int k = 0; k < K; k++)
        {
            if (w[k] <= 0) continue;
            double e = Math.Exp(-(k + 1) / tau);
            s1 += w[k]; se += w[k] * e; see += w[k] * e * e; sy += w[k] * y[k]; sye += w[k] * y[k] * e;
        }
        if (!plateau) { p = 0; a = see > 0 ? Math.Max(0, sye / see) : 0; }
        else
        {
            double det = s1 * see - se * se;
            p = det != 0 ? (sy * see - sye * se) / det : 0;
            a = det != 0 ? (sye * s1 - sy * se) / det : 0;
            if (p < 0) { p = 0; a = see > 0 ? sye / see : 0; }
            else if (p > 1) { p = 1; a = see > 0 ? (sye - se) / see : 0; }
            if (a < 0) { a = 0; p = Math.Clamp(s1 > 0 ? sy / s1 : 0, 0, 1); }
        }
        double sse = 0;
        for (int k = 0; k < K; k++)
        {
            if (w[k] <= 0) continue;
            double r = y[k] - p - a * Math.Exp(-(k + 1) / tau);
            sse += w[k] * r * r;
        }
        return sse;
    }
}
