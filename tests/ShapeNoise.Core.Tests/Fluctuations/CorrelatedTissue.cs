using ShapeNoise.Fluctuations;
using ShapeNoise.Statistics;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Fluctuations;

/// <summary>Settings of the fast synthetic confluent tissue (<see cref="CorrelatedTissue"/>); lengths in px, times in frames.</summary>
/// <param name="Columns">Cells per lattice row.</param>
/// <param name="Rows">Lattice rows (spaced a sqrt(3)/2, odd rows shifted by a/2: a hexagonal lattice).</param>
/// <param name="SpacingPx">Lattice spacing a.</param>
/// <param name="JitterPx">Standard deviation of the Gaussian jitter of each cell's position (each axis).</param>
/// <param name="Frames">Frames T of every track.</param>
/// <param name="TauFrames">Correlation time tau of the AR(1) shape noise, the same for L and W.</param>
/// <param name="L0Px">Mean length.</param>
/// <param name="W0Px">Mean width.</param>
/// <param name="SigmaA">Relative amplitude sA of the length noise (its superpopulation root mean square).</param>
/// <param name="SigmaB">Relative amplitude sB of the width noise.</param>
/// <param name="KernelPx">Gaussian kernel length l of the spatial correlation; 0 for independent cells.</param>
/// <param name="ModulationLog">g: sA_i = sA exp(g u_i - g^2) with u a unit-variance field smoothed by the same kernel, so
/// E[sA_i^2] = sA^2 (E[exp(2 g u)] = exp(2 g^2) for a unit normal u); 0 for no between-region variation.</param>
public sealed record TissueOptions(int Columns = 24, int Rows = 24, double SpacingPx = 16, double JitterPx = 1.5,
    int Frames = 40, double TauFrames = 4, double L0Px = 24, double W0Px = 12, double SigmaA = 0.08, double SigmaB = 0.06,
    double KernelPx = 0, double ModulationLog = 0)
{
    /// <summary>The estimand: the superpopulation anisotropy (L0 sA)^2 / (W0 sB)^2 (see <see cref="CorrelatedTissue"/>).</summary>
    public double TrueAnisotropy => L0Px * L0Px * SigmaA * SigmaA / (W0Px * W0Px * SigmaB * SigmaB);

    /// <summary>Distance at which the generator's cell-to-cell correlation falls to 1/e: the smoothed field has correlation
    /// exp(-r^2 / 4 l^2) (the convolution of two Gaussian kernels of width l is a Gaussian of width sqrt(2) l), so r = 2 l.</summary>
    public double TrueCorrelationLengthPx => 2 * KernelPx;
}

/// <summary>
/// A fast synthetic confluent tissue at the level of <see cref="TrackRecord"/>, for coverage studies of the within-movie
/// intervals (docs/statistics.md#within-movie-intervals) where rendering and segmenting a movie per replication is too slow.
/// Cells sit still on a jittered hexagonal lattice; cell i has L_i(t) = L0 (1 + sA_i x_i(t)) and W_i(t) = W0 (1 + sB y_i(t)),
/// x and y independent unit-variance AR(1) series in time (x(t) = rho x(t-1) + sqrt(1 - rho^2) e(t), rho = exp(-1/tau)), made
/// spatially correlated as in MonolayerMovie.Smooth: every frame's innovations (and the start values) are replaced by
/// e'_i = sum_j w_ij e_j / sqrt(sum_j w_ij^2), w_ij = exp(-d_ij^2 / 2 l^2) (not periodic: a field of view has edges).
/// <para>Why the truth is (L0 sA)^2 / (W0 sB)^2: a track's var_L is the population variance of its T lengths, whose
/// expectation is L0^2 sA_i^2 c(T, rho) with c = 1 - (1/T)[1 + 2 sum_k (1 - k/T) rho^k] &lt; 1 (the downward bias of a
/// variance about the series' own mean, AR(1) algebra, e.g. Box and Jenkins, from memory); var_W has W0^2 sB^2 c(T, rho) with
/// the same c because L and W share tau and T. The pooled anisotropy is sum_i T var_L,i / sum_i T var_W,i, a ratio of means,
/// so c cancels in the ratio of expectations and the estimator is consistent for (L0 sA)^2 E[m^2] / (W0 sB)^2 = the truth
/// (left over: the O(1/n_eff) bias of a ratio of means, small against the interval width).</para>
/// <para>Between-region variation: sA_i = sA m_i with m_i = exp(g u_i - g^2), u a smooth random field (the same kernel),
/// drawn anew for each replication, so regions of one movie differ in anisotropy. The estimand is the superpopulation mean
/// (over tissues and regions) (L0 sA)^2 E[m^2] / (W0 sB)^2 with E[m^2] = 1, and a movie sees only a few independent regions:
/// the interval must account for them, which the bootstrap over spatial blocks does and the bootstrap over tracks does not.</para>
/// </summary>
public static class CorrelatedTissue
{
    /// <summary>The used tracks of one seeded replication (same options and seed, same tracks).</summary>
    public static List<TrackRecord> Generate(TissueOptions o, int seed)
    {
        var rng = new Random(seed);
        int n = o.Columns * o.Rows, T = o.Frames;
        var px = new double[n]; var py = new double[n];
        double dy = o.SpacingPx * Math.Sqrt(3) / 2;
        for (int r = 0, i = 0; r < o.Rows; r++)
            for (int c = 0; c < o.Columns; c++, i++)
            {
                px[i] = (c + (r % 2 == 1 ? 0.5 : 0)) * o.SpacingPx + o.JitterPx * Normal(rng);
                py[i] = r * dy + o.JitterPx * Normal(rng);
            }
        var smooth = o.KernelPx > 0 ? Kernel(px, py, o.KernelPx) : null;
        double[] Field()
        {
            var e = new double[n];
            for (int i = 0; i < n; i++) e[i] = Normal(rng);
            return smooth is null ? e : Apply(smooth, e);
        }
        var u = Field();
        var m = new double[n];
        for (int i = 0; i < n; i++) m[i] = Math.Exp(o.ModulationLog * u[i] - o.ModulationLog * o.ModulationLog);
        double rho = Math.Exp(-1 / o.TauFrames), innov = Math.Sqrt(1 - rho * rho);
        var L = new double[n][]; var W = new double[n][];
        for (int i = 0; i < n; i++) { L[i] = new double[T]; W[i] = new double[T]; }
        double[] x = Field(), y = Field();
        for (int t = 0; t < T; t++)
        {
            if (t > 0)
            {
                var ex = Field(); var ey = Field();
                for (int i = 0; i < n; i++) { x[i] = rho * x[i] + innov * ex[i]; y[i] = rho * y[i] + innov * ey[i]; }
            }
            for (int i = 0; i < n; i++)
            {
                L[i][t] = o.L0Px * (1 + o.SigmaA * m[i] * x[i]);
                W[i][t] = o.W0Px * (1 + o.SigmaB * y[i]);
            }
        }
        var frames = Enumerable.Range(0, T).ToArray();
        var tracks = new List<TrackRecord>(n);
        for (int i = 0; i < n; i++)
        {
            var cx = Enumerable.Repeat(px[i], T).ToArray();
            var cy = Enumerable.Repeat(py[i], T).ToArray();
            tracks.Add(new TrackRecord(i + 1, 0, T - 1, TrackEnd.MovieEnd, frames, L[i], W[i], new double[T], new double[T], new double[T],
                cx, cy, PlaceholderContour(T), Descriptive.PopulationVariance(L[i]), Descriptive.PopulationVariance(W[i]), true));
        }
        return tracks;
    }

    /// <summary>Mean centroids of the tracks (as SpatialBlocks.For takes them).</summary>
    public static (double[] X, double[] Y) Centroids(IReadOnlyList<TrackRecord> tracks)
        => (tracks.Select(t => t.CentroidX.Average()).ToArray(), tracks.Select(t => t.CentroidY.Average()).ToArray());

    /// <summary>A contour record with no contour signal: Pooling and SpatialBlocks count a track as used only when it has a
    /// contour; the contour-based estimates of these tracks are not what the coverage study checks (var_L / var_W is).</summary>
    private static TrackContour PlaceholderContour(int frames)
        => new(frames, 1, 1, 0, 0, 0, new double[3], [1, 1, 1, 1], new double[4], [0, 30, 60, 90], [1, 1, 1, 1], new double[frames], new double[frames]);

    private static double Normal(Random rng) => MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);

    /// <summary>Per cell, its neighbours within 4 l and the normalised weights w_ij / sqrt(sum_j w_ij^2).</summary>
    private static (int[] J, double[] W)[] Kernel(double[] px, double[] py, double l)
    {
        int n = px.Length;
        double cut2 = 16 * l * l;
        var k = new (int[] J, double[] W)[n];
        for (int i = 0; i < n; i++)
        {
            var j = new List<int>(); var w = new List<double>();
            double w2 = 0;
            for (int q = 0; q < n; q++)
            {
                double d2 = (px[i] - px[q]) * (px[i] - px[q]) + (py[i] - py[q]) * (py[i] - py[q]);
                if (d2 > cut2) continue;
                double v = Math.Exp(-d2 / (2 * l * l));
                j.Add(q); w.Add(v); w2 += v * v;
            }
            double norm = Math.Sqrt(w2);
            k[i] = (j.ToArray(), w.Select(v => v / norm).ToArray());
        }
        return k;
    }

    private static double[] Apply((int[] J, double[] W)[] k, double[] e)
    {
        var r = new double[e.Length];
        for (int i = 0; i < e.Length; i++)
        {
            double s = 0;
            var (j, w) = k[i];
            for (int q = 0; q < j.Length; q++) s += w[q] * e[j[q]];
            r[i] = s;
        }
        return r;
    }
}
