namespace ShapeNoise.Dynamics;

/// <summary>Fit of C_theta(k) = p + A exp(-k / tau) over lags k &gt;= 1.</summary>
/// <param name="TauFrames">Decay time of the decorrelating part (frames).</param>
/// <param name="Plateau">p: the part of the alignment that never decorrelates within the tracks.</param>
/// <param name="Amplitude">A (A + p &lt; 1 when fast measurement noise removes some correlation already at lag 1).</param>
internal readonly record struct PlateauFit(double TauFrames, double Plateau, double Amplitude);

/// <summary>Orientation autocorrelation C_theta(k) = mean cos 2(theta(t+k) - theta(t)) pooled over tracks, and its fit.</summary>
/// <remarks>The nematic (cos 2 delta-theta) orientation correlation of elongated cells; a plateau allows for locally
/// aligned regions that never decorrelate (e.g. Duclos G. et al. (2017), "Topological defects in confined populations of
/// spindle-shaped cells", Nature Physics 13:58-62). Fitted by weighted least squares: p and A in closed form for each tau
/// (p constrained to [0, 1], A &gt;= 0), tau by a grid over log tau refined by golden section.</remarks>
internal static class OrientationCorrelation
{
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

    /// <summary>Fits p + A exp(-k/tau) to C(k), k = 1..<paramref name="fitLags"/>, weighted by pair counts.</summary>
    public static PlateauFit Fit(ReadOnlySpan<double> c, ReadOnlySpan<long> pairs, int fitLags, double maxTauFrames)
    {
        int K = Math.Min(fitLags, c.Length - 1);
        if (K < 2) return new PlateauFit(double.NaN, double.NaN, double.NaN);
        var y = c[1..(K + 1)].ToArray(); var w = new double[K];
        for (int k = 0; k < K; k++) w[k] = double.IsFinite(y[k]) ? pairs[k + 1] : 0;
        double Sse(double tau, out double p, out double a)
        {
            // Weighted linear least squares for (p, A) with basis 1 and e_k = exp(-k/tau).
            double s1 = 0, se = 0, see = 0, sy = 0, sye = 0;
            for (int k = 0; k < K; k++)
            {
                if (w[k] <= 0) continue;
                double e = Math.Exp(-(k + 1) / tau);
                s1 += w[k]; se += w[k] * e; see += w[k] * e * e; sy += w[k] * y[k]; sye += w[k] * y[k] * e;
            }
            double det = s1 * see - se * se;
            p = det != 0 ? (sy * see - sye * se) / det : 0;
            a = det != 0 ? (sye * s1 - sy * se) / det : 0;
            if (p < 0) { p = 0; a = see > 0 ? sye / see : 0; }
            else if (p > 1) { p = 1; a = see > 0 ? (sye - se) / see : 0; }
            if (a < 0) { a = 0; p = Math.Clamp(s1 > 0 ? sy / s1 : 0, 0, 1); }
            double sse = 0;
            for (int k = 0; k < K; k++)
            {
                if (w[k] <= 0) continue;
                double r = y[k] - p - a * Math.Exp(-(k + 1) / tau);
                sse += w[k] * r * r;
            }
            return sse;
        }
        double tau = Math.Exp(Statistics.Minimize.GridThenGolden(lt => Sse(Math.Exp(lt), out _, out _), Math.Log(0.05), Math.Log(Math.Max(1, maxTauFrames))));
        Sse(tau, out var pp, out var aa);
        return new PlateauFit(tau, pp, aa);
    }
}
