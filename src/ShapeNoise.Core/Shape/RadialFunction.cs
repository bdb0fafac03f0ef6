namespace ShapeNoise.Shape;

/// <summary>Radial function r(phi): distance from a centre to the outline along the ray at angle phi.</summary>
internal static class RadialFunction
{
    /// <summary>
    /// Samples rho_k = r(theta0 + 2 pi k / M), k = 0..M-1, by casting the M rays from <paramref name="centre"/> against every
    /// polygon edge (no interpolation). Each edge is visited once and intersected only with the rays inside the angular
    /// sector it subtends, so the cost is O(V + M). Where a ray meets the outline more than once the farthest crossing is
    /// kept and the outline is reported as not star-shaped (docs/measures.md#outline-definitions).
    /// </summary>
    /// <returns>True when every ray meets the outline exactly once (star-shaped about the centre).</returns>
    /// <remarks>Radial-function shape description as used for cell outlines, e.g. Tweedy L. et al. (2013), "Distinct cell
    /// shapes determine accurate chemotaxis", Scientific Reports 3:2606; and the body-frame convention of the ShapeNoise spec.</remarks>
    public static bool Sample(ReadOnlySpan<Point2> polygon, Point2 centre, double theta0, Span<double> rho)
    {
        int m = rho.Length;
        Span<int> hits = m <= 512 ? stackalloc int[m] : new int[m];
        hits.Clear();
        rho.Clear();
        double step = 2 * Math.PI / m;
        int n = polygon.Length;
        if (n < 3) return false;
        double cx = centre.X, cy = centre.Y;
        double prevU = AngleUnits(polygon[0].X - cx, polygon[0].Y - cy, theta0, step, m);
        for (int i = 0; i < n; i++)
        {
            var p = polygon[i]; var q = polygon[i + 1 == n ? 0 : i + 1];
            double uP = prevU;
            double uQ = AngleUnits(q.X - cx, q.Y - cy, theta0, step, m);
            prevU = uQ;
            double du = uQ - uP;
            if (du > 0.5 * m) du -= m; else if (du <= -0.5 * m) du += m;
            // Rays k in [min, max) of the edge's angular span. Ceilings are taken of each vertex's own (normalised) angle,
            // so the two edges meeting at a vertex agree on which of them owns a ray through it.
            int kP = (int)Math.Ceiling(uP), kQ = (int)Math.Ceiling(uQ);
            int start = du >= 0 ? kP : kQ, count = du >= 0 ? kQ - kP : kP - kQ;
            if (count < 0) count += m;
            if (count == 0) continue;
            double px = p.X - cx, py = p.Y - cy, ex = q.X - p.X, ey = q.Y - p.Y;
            double pe = px * ey - py * ex; // cross(p - c, e)
            for (int j = 0; j < count; j++)
            {
                int kk = (start + j) % m;
                double phi = theta0 + kk * step;
                double dx = Math.Cos(phi), dy = Math.Sin(phi);
                double de = dx * ey - dy * ex; // cross(d, e)
                if (de == 0) continue;
                double t = pe / de;
                if (t <= 0) continue;
                hits[kk]++;
                if (t > rho[kk]) rho[kk] = t;
            }
        }
        bool star = true;
        for (int k = 0; k < m; k++) if (hits[k] != 1) { star = false; break; }
        return star;
    }

    private static double AngleUnits(double dx, double dy, double theta0, double step, int m)
    {
        double u = (Math.Atan2(dy, dx) - theta0) / step;
        u %= m;
        if (u < 0) u += m;
        if (u >= m) u -= m;
        return u;
    }

    /// <summary>Analytic radial function of an ellipse about its centre: r(phi) = a b / sqrt(b^2 cos^2 phi + a^2 sin^2 phi), phi from the a-axis.</summary>
    public static double Ellipse(double a, double b, double phi)
    {
        double c = Math.Cos(phi), s = Math.Sin(phi);
        return a * b / Math.Sqrt(b * b * c * c + a * a * s * s);
    }
}
