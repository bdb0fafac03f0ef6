using ShapeNoise.TimeSeries;
namespace ShapeNoise.Dynamics;

/// <summary>Integrated autocorrelation time with Sokal's automatic window.</summary>
/// <remarks>
/// tau_int(W) = 1/2 + sum_{k=1..W} C(k); the window is the smallest W with W &gt;= c tau_int(W) (c = 5 by default).
/// Sokal A.D. (1997), "Monte Carlo methods in statistical mechanics: foundations and new algorithms", in Functional
/// Integration (Cargèse 1996), NATO ASI Series B 361, Plenum, pp. 131-192; Madras N. and Sokal A.D. (1988),
/// J. Stat. Phys. 50:109-186. For an AR(1) process with lag-1 correlation rho, tau_int = (1 + rho) / (2 (1 - rho)) frames.
/// </remarks>
internal static class IntegratedTime
{
    /// <summary>Returns tau_int in lag units and the window used; the window is flagged (Reached=false) when no lag
    /// up to the last available satisfies the rule.</summary>
    public static (double TauInt, int Window, bool Reached) Sokal(ReadOnlySpan<double> correlation, double c = 5)
    {
        double tau = 0.5;
        for (int w = 1; w < correlation.Length; w++)
        {
            if (!double.IsFinite(correlation[w])) return (tau, w - 1, false);
            tau += correlation[w];
            if (w >= c * tau) return (tau, w, true);
        }
        return (tau, correlation.Length - 1, false);
    }
}
