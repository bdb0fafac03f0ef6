namespace ShapeNoise.Nematic;

/// <summary>A topological defect in one frame: position (px), charge (a multiple of 1/2; +-1/2 in tissue), head direction (unit; +1/2 only, else NaN) and local order.</summary>
public readonly record struct Defect(double X, double Y, double Charge, double HeadX, double HeadY, double Order);

/// <summary>Topological defects of a coarse-grained director field, and the polarity of +1/2 defects.</summary>
/// <remarks>
/// Charge = winding of the director around each grid plaquette: the sum of the four angle steps, each wrapped to
/// (-pi/2, pi/2], divided by 2 pi (de Gennes P.G. and Prost J. (1993), The Physics of Liquid Crystals, 2nd ed., Oxford,
/// ch. 4). Neighbouring plaquettes of the same sign merge into one defect at their mean centre. Polarity of a +1/2
/// defect: the core is placed at sub-grid precision at the zero of Q (<see cref="CoreZero"/>), so a slowly moving core
/// moves smoothly rather than in steps of the grid spacing (docs/defects.md#drift). Polarity of a +1/2
/// defect: e_head = -div Q / |div Q| averaged over a disc about the core (Giomi L., Bowick M.J., Mishra P., Sknepnek R.
/// and Marchetti M.C. (2014), "Defect dynamics in active nematics", Phil. Trans. R. Soc. A 372:20130365; Vromans A.J.
/// and Giomi L. (2016), Soft Matter 12:6490). For theta = phi/2 about the origin, -div Q points along -x: toward the
/// rounded head of the comet.
/// </remarks>
public static class DefectFinder
{
    /// <summary>Wraps an angle step to (-pi/2, pi/2].</summary>
    public static double Wrap(double d)
    {
        d = Math.IEEERemainder(d, Math.PI);
        if (d <= -Math.PI / 2) d += Math.PI;
        return d;
    }

    /// <summary>
    /// Finds the defects of <paramref name="g"/>. Defects closer than <paramref name="borderPx"/> to the edge of the
    /// <paramref name="widthPx"/> x <paramref name="heightPx"/> image, or on plaquettes with a node of summed weight below
    /// <paramref name="minWeight"/> (no cells near), are dropped. +1/2 polarity is averaged over a disc of <paramref name="discRadiusPx"/>.
    /// </summary>
    public static List<Defect> Find(NematicGrid g, double widthPx, double heightPx, double borderPx, double discRadiusPx, double minWeight = 1e-3)
    {
        int nx = g.Nx, ny = g.Ny, px = nx - 1, py = ny - 1;
        var theta = new double[nx * ny];
        for (int k = 0; k < theta.Length; k++) theta[k] = g.Director(k);
        var charge = new sbyte[px * py];
        for (int j = 0; j < py; j++)
            for (int i = 0; i < px; i++)
            {
                int a = j * nx + i, b = a + 1, c = a + nx + 1, d = a + nx;
                if (g.Weight[a] < minWeight || g.Weight[b] < minWeight || g.Weight[c] < minWeight || g.Weight[d] < minWeight) continue;
                double s = Wrap(theta[b] - theta[a]) + Wrap(theta[c] - theta[b]) + Wrap(theta[d] - theta[c]) + Wrap(theta[a] - theta[d]);
                if (s > Math.PI / 2) charge[j * px + i] = 1; else if (s < -Math.PI / 2) charge[j * px + i] = -1;
            }
        var defects = new List<Defect>();
        var seen = new bool[charge.Length];
        var stack = new Stack<int>();
        for (int start = 0; start < charge.Length; start++)
        {
            if (charge[start] == 0 || seen[start]) continue;
            int sign = charge[start];
            double sx = 0, sy = 0; int count = 0, i0 = int.MaxValue, i1 = -1, j0 = int.MaxValue, j1 = -1;
            seen[start] = true; stack.Push(start);
            while (stack.Count > 0)
            {
                int p = stack.Pop();
                int i = p % px, j = p / px;
                sx += (i + 0.5) * g.SpacingPx; sy += (j + 0.5) * g.SpacingPx; count++;
                i0 = Math.Min(i0, i); i1 = Math.Max(i1, i); j0 = Math.Min(j0, j); j1 = Math.Max(j1, j);
                for (int dj = -1; dj <= 1; dj++)
                    for (int di = -1; di <= 1; di++)
                    {
                        int ii = i + di, jj = j + dj;
                        if (ii < 0 || jj < 0 || ii >= px || jj >= py) continue;
                        int q = jj * px + ii;
                        if (!seen[q] && charge[q] == sign) { seen[q] = true; stack.Push(q); }
                    }
            }
            double x = sx / count, y = sy / count;
            (x, y) = CoreZero(g, i0, j0, i1, j1, x, y);
            if (x < borderPx || y < borderPx || x > widthPx - borderPx || y > heightPx - borderPx) continue;
            // The cluster's charge: winding along a loop one node outside its bounding box (many small steps, so any
            // multiple of 1/2 comes out exact, +-1 included).
            double halfUnits = Math.Round(LoopWinding(theta, nx, ny, i0 - 1, j0 - 1, i1 + 2, j1 + 2) / Math.PI);
            if (halfUnits == 0 || double.IsNaN(halfUnits)) continue;
            double hx = double.NaN, hy = double.NaN;
            if (halfUnits == 1) (hx, hy) = HeadDirection(g, x, y, discRadiusPx);
            double order = 2 * Math.Sqrt(Sq(g.Sample(g.Qxx, x, y)) + Sq(g.Sample(g.Qxy, x, y)));
            defects.Add(new Defect(x, y, 0.5 * halfUnits, hx, hy, order));
        }
        return defects;
    }

    private static double Sq(double v) => v * v;

    /// <summary>
    /// Sub-grid core of the cluster of plaquettes [i0, i1] x [j0, j1]: Q = (Qxx, Qxy) vanishes at a +-1/2 core and is
    /// smooth about it after coarse-graining, so each component is fitted by least squares as q(x, y) = a + b (x - x_c) +
    /// c (y - y_c) over the corner nodes of the clusters' bounding box, and the core is the zero of the fitted pair,
    /// x = x_c - B^-1 (a_xx, a_xy) with B = [b_xx c_xx; b_xy c_xy], clamped into the bounding box (where the winding puts
    /// the core). The plaquette centre (x_c, y_c) is kept when B is ill conditioned or the zero lies more than one grid
    /// spacing outside the box.
    /// </summary>
    public static (double X, double Y) CoreZero(NematicGrid g, int i0, int j0, int i1, int j1, double xc, double yc)
    {
        int nx = g.Nx; double h = g.SpacingPx;
        // Normal equations of the 3-parameter fit, shared by both components.
        double n = 0, sX = 0, sY = 0, sXX = 0, sXY = 0, sYY = 0, qa = 0, qX = 0, qY = 0, ra = 0, rX = 0, rY = 0;
        for (int j = j0; j <= j1 + 1; j++)
            for (int i = i0; i <= i1 + 1; i++)
            {
                int k = j * nx + i;
                if (i >= nx || j >= g.Ny || !(g.Weight[k] > 1e-9)) return (xc, yc);
                double X = i * h - xc, Y = j * h - yc, q = g.Qxx[k], r = g.Qxy[k];
                n++; sX += X; sY += Y; sXX += X * X; sXY += X * Y; sYY += Y * Y;
                qa += q; qX += q * X; qY += q * Y; ra += r; rX += r * X; rY += r * Y;
            }
        var m = new[,] { { n, sX, sY }, { sX, sXX, sXY }, { sY, sXY, sYY } };
        var pq = Solve3(m, qa, qX, qY); var pr = Solve3(m, ra, rX, rY);
        if (pq is null || pr is null) return (xc, yc);
        double bxx = pq.Value.B, cxx = pq.Value.C, bxy = pr.Value.B, cxy = pr.Value.C;
        double det = bxx * cxy - cxx * bxy, scale = Math.Sqrt(bxx * bxx + cxx * cxx) * Math.Sqrt(bxy * bxy + cxy * cxy);
        if (!(Math.Abs(det) > 1e-3 * scale) || !(scale > 0)) return (xc, yc);
        double dx = -(cxy * pq.Value.A - cxx * pr.Value.A) / det, dy = -(-bxy * pq.Value.A + bxx * pr.Value.A) / det;
        double x = xc + dx, y = yc + dy;
        double xa = i0 * h, xb = (i1 + 1) * h, ya = j0 * h, yb = (j1 + 1) * h;
        if (x < xa - h || x > xb + h || y < ya - h || y > yb + h) return (xc, yc);
        return (Math.Clamp(x, xa, xb), Math.Clamp(y, ya, yb));
    }

    /// <summary>Solves the symmetric 3 x 3 system m p = (u, v, w) by Cramer's rule; null when singular.</summary>
    private static (double A, double B, double C)? Solve3(double[,] m, double u, double v, double w)
    {
        static double Det(double a, double b, double c, double d, double e, double f, double g, double h, double i)
            => a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g);
        double d0 = Det(m[0, 0], m[0, 1], m[0, 2], m[1, 0], m[1, 1], m[1, 2], m[2, 0], m[2, 1], m[2, 2]);
        if (!(Math.Abs(d0) > 1e-12)) return null;
        double a = Det(u, m[0, 1], m[0, 2], v, m[1, 1], m[1, 2], w, m[2, 1], m[2, 2]) / d0;
        double b = Det(m[0, 0], u, m[0, 2], m[1, 0], v, m[1, 2], m[2, 0], w, m[2, 2]) / d0;
        double c = Det(m[0, 0], m[0, 1], u, m[1, 0], m[1, 1], v, m[2, 0], m[2, 1], w) / d0;
        return (a, b, c);
    }

    /// <summary>Sum of wrapped director steps around the node rectangle [ia, ib] x [ja, jb], in the orientation
    /// +x, then +y, then -x, then -y (increasing polar angle in image coordinates); NaN if the loop leaves the grid.</summary>
    public static double LoopWinding(double[] theta, int nx, int ny, int ia, int ja, int ib, int jb)
    {
        if (ia < 0 || ja < 0 || ib >= nx || jb >= ny) return double.NaN;
        double s = 0;
        int pi = ia, pj = ja;
        void Step(int i, int j) { s += Wrap(theta[j * nx + i] - theta[pj * nx + pi]); pi = i; pj = j; }
        for (int i = ia + 1; i <= ib; i++) Step(i, ja);
        for (int j = ja + 1; j <= jb; j++) Step(ib, j);
        for (int i = ib - 1; i >= ia; i--) Step(i, jb);
        for (int j = jb - 1; j >= ja; j--) Step(ia, j);
        return s;
    }

    /// <summary>
    /// e_head = -div Q / |div Q| averaged over the nodes within <paramref name="radiusPx"/> of (x, y), normalised.
    /// div Q = (d_x Qxx + d_y Qxy, d_x Qxy - d_y Qxx) by central differences.
    /// </summary>
    public static (double X, double Y) HeadDirection(NematicGrid g, double x, double y, double radiusPx)
    {
        int nx = g.Nx, ny = g.Ny; double h = g.SpacingPx;
        int r = (int)Math.Ceiling(radiusPx / h);
        int ci = (int)Math.Round(x / h), cj = (int)Math.Round(y / h);
        double ax = 0, ay = 0;
        for (int j = Math.Max(1, cj - r); j <= Math.Min(ny - 2, cj + r); j++)
            for (int i = Math.Max(1, ci - r); i <= Math.Min(nx - 2, ci + r); i++)
            {
                double dx = i * h - x, dy = j * h - y;
                if (dx * dx + dy * dy > radiusPx * radiusPx) continue;
                int k = j * nx + i;
                double dxQxx = (g.Qxx[k + 1] - g.Qxx[k - 1]) / (2 * h), dyQxx = (g.Qxx[k + nx] - g.Qxx[k - nx]) / (2 * h);
                double dxQxy = (g.Qxy[k + 1] - g.Qxy[k - 1]) / (2 * h), dyQxy = (g.Qxy[k + nx] - g.Qxy[k - nx]) / (2 * h);
                double divx = dxQxx + dyQxy, divy = dxQxy - dyQxx;
                double norm = Math.Sqrt(divx * divx + divy * divy);
                if (norm < 1e-12) continue;
                ax -= divx / norm; ay -= divy / norm;
            }
        double n = Math.Sqrt(ax * ax + ay * ay);
        return n > 0 ? (ax / n, ay / n) : (double.NaN, double.NaN);
    }
}
