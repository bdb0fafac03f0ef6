namespace ShapeNoise.Tracking;

/// <summary>
/// One-frame outliers of a track (docs/measures.md#one-frame-errors): with the track's frame-to-frame changes
/// d_j = x_{j+1} - x_j and their robust scale s = max(1.4826 median_j |d_j - median d|, s_min), the outline at t is an
/// outlier when it jumps out and back: |d_{t-1}| &gt; k s, |d_t| &gt; k s, the two changes have opposite signs, and the
/// next outline reverts, |x_{t+1} - x_{t-1}| &lt;= k s (k = 4). A step that persists is not an outlier. Tracks of fewer
/// than <see cref="MinFrames"/> outlines are left alone (too few changes for a scale).
/// </summary>
/// <remarks>The median absolute deviation as a robust scale and the outlier rule built on it: Hampel F.R. (1974), "The
/// influence curve and its role in robust estimation", J. Am. Stat. Assoc. 69:383-393; Rousseeuw P.J. and Croux C.
/// (1993), "Alternatives to the median absolute deviation", J. Am. Stat. Assoc. 88:1273-1283. 1.4826 = 1/Phi^-1(3/4)
/// makes the MAD consistent for the standard deviation of a normal distribution (common practice).</remarks>
public static class OutlierRule
{
    /// <summary>Threshold k in units of the robust scale.</summary>
    public const double Threshold = 4;
    /// <summary>Consistency factor of the MAD for a normal distribution, 1/Phi^-1(3/4).</summary>
    public const double MadToSigma = 1.4826;
    /// <summary>Fewest outlines for which the rule is applied.</summary>
    public const int MinFrames = 5;
    /// <summary>Smallest scale of a length or centroid series (px): a quarter pixel, below the pixel quantisation of an outline.</summary>
    public const double MinScalePx = 0.25;

    /// <summary>Flags the one-frame outliers of one series <paramref name="x"/> (true = outlier) by the rule above, with
    /// scale floor <paramref name="minScale"/> (same unit as x).</summary>
    public static bool[] Flag(ReadOnlySpan<double> x, double minScale)
    {
        int n = x.Length;
        var flag = new bool[n];
        if (n < MinFrames) return flag;
        var d = new double[n - 1];
        for (int j = 0; j < n - 1; j++) d[j] = x[j + 1] - x[j];
        double limit = Threshold * Math.Max(RobustScale(d), minScale);
        for (int t = 1; t < n - 1; t++)
        {
            double din = d[t - 1], dout = d[t];
            if (Math.Abs(din) > limit && Math.Abs(dout) > limit && Math.Sign(din) != Math.Sign(dout) && Math.Abs(x[t + 1] - x[t - 1]) <= limit)
                flag[t] = true;
        }
        return flag;
    }

    /// <summary>1.4826 x the median absolute deviation from the median of <paramref name="d"/> (0 for an empty series).</summary>
    public static double RobustScale(ReadOnlySpan<double> d)
    {
        if (d.Length == 0) return 0;
        var v = d.ToArray();
        double med = Median(v);
        for (int i = 0; i < v.Length; i++) v[i] = Math.Abs(v[i] - med);
        return MadToSigma * Median(v);
    }

    private static double Median(double[] v)
    {
        Array.Sort(v);
        int m = v.Length / 2;
        return v.Length % 2 == 1 ? v[m] : 0.5 * (v[m - 1] + v[m]);
    }

    /// <summary>The outliers of a track: an outline is flagged when its area, L, W, centroid x or centroid y is an outlier
    /// of its series. Scale floors: <see cref="MinScalePx"/> for L, W and the centroid; for the area a quarter pixel of
    /// boundary shift, 0.25 px x 2 sqrt(pi A_med).</summary>
    public static bool[] Flag(FinishedTrack t)
    {
        var flag = new bool[t.Frames];
        if (t.Frames < MinFrames) return flag;
        var area = (double[])t.AreaPx2.Clone();
        Array.Sort(area);
        double areaFloor = MinScalePx * 2 * Math.Sqrt(Math.PI * Math.Max(area[area.Length / 2], 0));
        foreach (var (series, floor) in new[] { (t.AreaPx2, areaFloor), (t.LengthPx, MinScalePx), (t.WidthPx, MinScalePx), (t.CentroidX, MinScalePx), (t.CentroidY, MinScalePx) })
        {
            var f = Flag(series, floor);
            for (int i = 0; i < flag.Length; i++) flag[i] |= f[i];
        }
        return flag;
    }
}
