namespace ShapeNoise.Nematic;

/// <summary>The tissue's velocity in one frame (px/frame; NaN when no cell of the frame has a velocity).</summary>
/// <param name="Frame">Frame index.</param>
/// <param name="Ux">u_x, median of the cells' x velocities.</param>
/// <param name="Uy">u_y, median of the cells' y velocities.</param>
/// <param name="Cells">Cells of the frame with a finite velocity (the median's sample).</param>
public readonly record struct TissueDriftFrame(int Frame, double Ux, double Uy, int Cells);

/// <summary>
/// Stage drift as the tissue's own velocity (docs/defects.md#drift): per frame t,
/// u(t) = (median_c v_x,c(t), median_c v_y,c(t)), the component-wise median of the velocities of the frame's cells (the
/// velocities the defect stage coarse-grains, tracked centroids or the flow field at the cells); and the tissue's
/// displacement D(t), the trapezoid-rule integral of u along the frames. A cell's velocity relative to the tissue is
/// v - u(t); a defect core's position relative to the tissue is x_core(t) - D(t).
/// </summary>
/// <remarks>The median ignores up to half of the cells moving on their own (a breakdown point of 50 %), so local flows
/// about defects and a minority of fast cells do not bend the estimate: Hampel F.R. (1974), "The influence curve and its
/// role in robust estimation", J. Am. Stat. Assoc. 69:383-393 (breakdown point of the median).</remarks>
public static class TissueDrift
{
    /// <summary>Median m of the finite values of <paramref name="values"/>: the middle value of the sorted sample for an
    /// odd count n, the mean of the two middle values for an even n; NaN when no value is finite.</summary>
    public static double Median(ReadOnlySpan<double> values)
    {
        var v = new List<double>(values.Length);
        foreach (double x in values) if (double.IsFinite(x)) v.Add(x);
        if (v.Count == 0) return double.NaN;
        v.Sort();
        int n = v.Count;
        return n % 2 == 1 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
    }

    /// <summary>u = (median_c v_x,c, median_c v_y,c) over the cells whose velocity is finite in both components, and their
    /// number; (NaN, NaN, 0) when there is none.</summary>
    public static (double Ux, double Uy, int Cells) Of(ReadOnlySpan<CellSample> cells)
    {
        var vx = new List<double>(cells.Length); var vy = new List<double>(cells.Length);
        foreach (var c in cells)
            if (double.IsFinite(c.Vx) && double.IsFinite(c.Vy)) { vx.Add(c.Vx); vy.Add(c.Vy); }
        if (vx.Count == 0) return (double.NaN, double.NaN, 0);
        return (Median(vx.ToArray()), Median(vy.ToArray()), vx.Count);
    }

    /// <summary>
    /// The tissue's displacement since the first frame, D(t_0) = 0 and D(t_k) = D(t_(k-1)) + (t_k - t_(k-1)) (u(t_(k-1)) + u(t_k)) / 2
    /// (trapezoid rule of the integral of u over frames; a NaN u is replaced by the other end's, and by 0 when both are NaN).
    /// </summary>
    /// <param name="drift">Per frame in frame order (frame numbers increasing; gaps allowed).</param>
    public static (double X, double Y)[] Displacement(IReadOnlyList<TissueDriftFrame> drift)
    {
        var d = new (double X, double Y)[drift.Count];
        for (int k = 1; k < drift.Count; k++)
        {
            var a = drift[k - 1]; var b = drift[k];
            double dt = b.Frame - a.Frame;
            d[k] = (d[k - 1].X + dt * Mid(a.Ux, b.Ux), d[k - 1].Y + dt * Mid(a.Uy, b.Uy));
        }
        return d;
    }

    private static double Mid(double a, double b)
        => double.IsFinite(a) && double.IsFinite(b) ? 0.5 * (a + b) : double.IsFinite(a) ? a : double.IsFinite(b) ? b : 0;

    /// <summary>Mean drift speed, mean over frames with a finite u of |u| = sqrt(u_x^2 + u_y^2) (px/frame); NaN without such a frame.</summary>
    public static double MeanSpeed(IReadOnlyList<TissueDriftFrame> drift)
    {
        double s = 0; int n = 0;
        foreach (var f in drift)
            if (double.IsFinite(f.Ux) && double.IsFinite(f.Uy)) { s += Math.Sqrt(f.Ux * f.Ux + f.Uy * f.Uy); n++; }
        return n > 0 ? s / n : double.NaN;
    }
}

/// <summary>Robust slope of a line through points (t_i, y_i).</summary>
public static class RobustSlope
{
    /// <summary>
    /// Theil-Sen slope b = median over pairs i &lt; j with t_i != t_j of (y_j - y_i) / (t_j - t_i), finite points only;
    /// NaN with fewer than two distinct t. One gross outlier among n points changes n - 1 of the n (n - 1) / 2 pairwise
    /// slopes, so for n >= 5 (clean pairs (n - 1)(n - 2) / 2 outnumber the n - 1 others) the median stays within the range
    /// of the clean pairs' slopes (asymptotic breakdown point 1 - 1/sqrt 2, about 29 %).
    /// </summary>
    /// <remarks>Theil H. (1950), "A rank-invariant method of linear and polynomial regression analysis", Proc. Kon. Ned.
    /// Akad. Wetensch. 53:386-392; Sen P.K. (1968), "Estimates of the regression coefficient based on Kendall's tau",
    /// J. Am. Stat. Assoc. 63:1379-1389.</remarks>
    public static double TheilSen(ReadOnlySpan<double> t, ReadOnlySpan<double> y)
    {
        if (t.Length != y.Length) throw new ArgumentException($"{nameof(t)} and {nameof(y)} differ in length ({t.Length} vs {y.Length})");
        var slopes = new List<double>(t.Length * (t.Length - 1) / 2);
        for (int i = 0; i < t.Length; i++)
        {
            if (!double.IsFinite(t[i]) || !double.IsFinite(y[i])) continue;
            for (int j = i + 1; j < t.Length; j++)
            {
                if (!double.IsFinite(t[j]) || !double.IsFinite(y[j]) || t[j] == t[i]) continue;
                slopes.Add((y[j] - y[i]) / (t[j] - t[i]));
            }
        }
        return TissueDrift.Median(slopes.ToArray());
    }
}
