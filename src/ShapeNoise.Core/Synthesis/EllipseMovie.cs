using System.Text.Json.Serialization;
using MathNet.Numerics.Distributions;
using ShapeNoise.Fluctuations;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;

namespace ShapeNoise.Synthesis;

/// <summary>Options of the fluctuating-ellipse scenario; validated on construction.</summary>
public sealed record EllipseMovieOptions
{
    /// <summary>Number of cells (ellipses) on the canvas.</summary>
    public int Cells { get; init; } = 40;
    /// <summary>Number of frames.</summary>
    public int Frames { get; init; } = 80;
    /// <summary>Mean semi-major axis a0 (px).</summary>
    public double SemiMajorPx { get; init; } = 14;
    /// <summary>Mean semi-minor axis b0 (px).</summary>
    public double SemiMinorPx { get; init; } = 9;
    /// <summary>Standard deviation of a(t) (px).</summary>
    public double SigmaAlongPx { get; init; } = 1.0;
    /// <summary>Standard deviation of b(t) (px).</summary>
    public double SigmaAcrossPx { get; init; } = 0.5;
    /// <summary>Correlation time of the semi-axis processes (frames).</summary>
    public double TauFrames { get; init; } = 5;
    /// <summary>Correlation time of a(t) alone (frames); null = <see cref="TauFrames"/>.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? TauAlongFrames { get; init; }
    /// <summary>Correlation time of b(t) alone (frames); null = <see cref="TauFrames"/>.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double? TauAcrossFrames { get; init; }
    /// <summary>Standard deviation eta_a of white measurement noise added to the rendered a(t) every frame (px); 0 = none.
    /// The truth stays the noise-free signal.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double NoiseAlongPx { get; init; }
    /// <summary>Standard deviation eta_b of white measurement noise added to the rendered b(t) every frame (px); 0 = none.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double NoiseAcrossPx { get; init; }
    /// <summary>Standard deviation of white radial measurement noise on the outline's pole sector (px; docs/sim-params.md#round-trip):
    /// every frame each cell's radius r(phi) gets delta(phi), linearly interpolated between <see cref="RadialNoiseNodes"/> independent
    /// normal draws at equal body-frame angles; a node is in the pole sector when its ellipse normal lies within 45 degrees of
    /// the long axis (docs/measures.md#contour-variances). 0 = none.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double RadialNoisePolePx { get; init; }
    /// <summary>Standard deviation of the white radial measurement noise on the flank sector (px); 0 = none.</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingDefault)] public double RadialNoiseFlankPx { get; init; }
    /// <summary>Number of independent radial noise nodes around each outline.</summary>
    public const int RadialNoiseNodes = 64;
    /// <summary>Steady rotation speed of each cell's axis (degrees per frame; sign drawn per cell).</summary>
    public double RotationDegPerFrame { get; init; }
    /// <summary>Correlation time of the axis orientation under rotational diffusion (frames): C_theta(k) = exp(-k / tau_theta),
    /// i.e. angular steps of variance 1 / (2 tau_theta) rad^2 per frame, since E cos 2 dtheta = exp(-2 var dtheta). 0 = no rotational diffusion.</summary>
    public double TauThetaFrames { get; init; } = 40;
    /// <summary>Standard deviation of the centre's slow Ornstein-Uhlenbeck drift (px).</summary>
    public double DriftPx { get; init; } = 1.5;
    /// <summary>Canvas width; 0 = just large enough for the cells.</summary>
    public int Width { get; init; }
    /// <summary>Canvas height; 0 = just large enough for the cells.</summary>
    public int Height { get; init; }
    /// <summary>Pixel size written into the movie's metadata (µm per px).</summary>
    public double PixelSizeUm { get; init; } = 0.5;
    /// <summary>Frame interval written into the movie's metadata (min).</summary>
    public double FrameIntervalMin { get; init; } = 2;
    /// <summary>Seed of every random draw of the scenario; the same seed gives the same movie.</summary>
    public int Seed { get; init; } = 7;

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public EllipseMovieOptions Validated()
    {
        if (Cells < 1) throw new ArgumentException($"--cells must be >= 1 (got {Cells})");
        if (Frames < 2) throw new ArgumentException($"--frames must be >= 2 (got {Frames})");
        if (!(SemiMinorPx > 1 && SemiMajorPx >= SemiMinorPx)) throw new ArgumentException("--semi-major and --semi-minor must satisfy a >= b > 1 px");
        if (SigmaAlongPx < 0 || SigmaAcrossPx < 0) throw new ArgumentException("--sigma-along and --sigma-across must be >= 0");
        if (SemiMinorPx - 4 * SigmaAcrossPx < 1) throw new ArgumentException("--sigma-across is too large for --b (b - 4 sigma must stay above 1 px)");
        if (!(TauFrames > 0)) throw new ArgumentException("--tau must be > 0 frames");
        if (TauAlongFrames is { } ta && !(ta > 0) || TauAcrossFrames is { } tb && !(tb > 0)) throw new ArgumentException("the semi-axis correlation times must be > 0 frames");
        if (!(NoiseAlongPx >= 0) || !(NoiseAcrossPx >= 0)) throw new ArgumentException("the semi-axis measurement noise must be >= 0 px");
        if (!(RadialNoisePolePx >= 0) || !(RadialNoiseFlankPx >= 0)) throw new ArgumentException("the radial measurement noise must be >= 0 px");
        if (SemiMinorPx - 4 * Math.Sqrt(SigmaAcrossPx * SigmaAcrossPx + NoiseAcrossPx * NoiseAcrossPx) < 1) throw new ArgumentException("the measurement noise is too large for --b (b - 4 sd must stay above 1 px)");
        if (TauThetaFrames < 0) throw new ArgumentException("--tau-theta must be >= 0 frames (0 = no rotational diffusion)");
        if (!(PixelSizeUm > 0) || !(FrameIntervalMin > 0)) throw new ArgumentException("--pixel-size and --frame-interval must be > 0");
        if (Width < 0 || Height < 0) throw new ArgumentException("--width and --height must be >= 0");
        return this;
    }
}

/// <summary>Realised truth of one synthetic movie, by the spec's definitions evaluated on the continuous ellipses.</summary>
public sealed record EllipseTruth(
    double Anisotropy, double AnisotropyContour, double VarLPx2, double VarWPx2, double VarAlongPx2, double VarAcrossPx2,
    double TauFrames, double SigmaAlongPx, double SigmaAcrossPx, double MeanCellRadiusPx,
    double TauQRealisedFrames, double TauLengthRealisedFrames, double TauThetaFrames, double TauThetaRealisedFrames,
    double[][] CentreX, double[][] CentreY, double[][] A, double[][] B, double[][] Theta, int[][] LabelOfCell)
{
    /// <summary>The temporal noise model's estimator on the noise-free shapes: s2_L / s2_W of the Ornstein-Uhlenbeck fits
    /// to the pooled autocovariance of L = 2a and W = 2b (docs/measures.md#temporal-noise-model), the realised truth of
    /// the default headline anisotropy.</summary>
    public double AnisotropySignalRealised { get; init; } = double.NaN;
}

/// <summary>
/// Isolated fluctuating ellipses: semi-axes a(t) = a0 + sigma_a x(t), b(t) = b0 + sigma_b y(t) with x, y independent
/// unit-variance AR(1) processes (the Ornstein-Uhlenbeck process sampled at the frame interval, rho = exp(-1/tau)),
/// slow rotation and a slow Ornstein-Uhlenbeck drift of the centre, rasterised at pixel centres. Label ids are drawn
/// afresh every frame. Our own invented scenario, for demos and recovery tests.
/// </summary>
/// <remarks>Exact AR(1) discretisation of the Ornstein-Uhlenbeck process: Gillespie D.T. (1996), "Exact numerical
/// simulation of the Ornstein-Uhlenbeck process and its integral", Phys. Rev. E 54:2084-2091.</remarks>
public sealed class EllipseMovie
{
    /// <summary>The validated options the movie was generated with.</summary>
    public EllipseMovieOptions Options { get; }
    /// <summary>Canvas width (px).</summary>
    public int Width { get; }
    /// <summary>Canvas height (px).</summary>
    public int Height { get; }
    /// <summary>The realised truth of this draw (per-cell centre, semi-axis and angle series and the statistics they realise), for recovery tests.</summary>
    public EllipseTruth Truth { get; }
    private readonly int _slot;
    private readonly double[][]? _noiseA, _noiseB;
    private readonly double[][]? _radial;

    private EllipseMovie(EllipseMovieOptions o, int w, int h, int slot, EllipseTruth truth, double[][]? noiseA = null, double[][]? noiseB = null, double[][]? radial = null)
    { Options = o; Width = w; Height = h; _slot = slot; Truth = truth; _noiseA = noiseA; _noiseB = noiseB; _radial = radial; }

    /// <summary>Draws every cell's trajectory (not yet the pixels) and evaluates the truth with <paramref name="rays"/> rays.</summary>
    public static EllipseMovie Generate(EllipseMovieOptions o, int rays = 64)
    {
        o.Validated();
        var rng = new Random(o.Seed);
        double reach = o.SemiMajorPx + 4 * o.SigmaAlongPx + 3 * o.DriftPx + 3;
        int slot = (int)Math.Ceiling(2 * reach);
        int cols = (int)Math.Ceiling(Math.Sqrt(o.Cells)), rows = (o.Cells + cols - 1) / cols;
        int w = o.Width > 0 ? o.Width : cols * slot + 4, h = o.Height > 0 ? o.Height : rows * slot + 4;
        int fitCols = (w - 4) / slot, fitRows = (h - 4) / slot;
        if (fitCols * fitRows < o.Cells) throw new ArgumentException($"a {w}x{h} canvas holds at most {fitCols * fitRows} such cells without overlap");
        int n = o.Cells, T = o.Frames;
        double rho = Math.Exp(-1.0 / (o.TauAlongFrames ?? o.TauFrames)), innov = Math.Sqrt(1 - rho * rho);
        double rhoB = Math.Exp(-1.0 / (o.TauAcrossFrames ?? o.TauFrames)), innovB = Math.Sqrt(1 - rhoB * rhoB);
        double rhoD = Math.Exp(-1.0 / 20), innovD = Math.Sqrt(1 - rhoD * rhoD);
        var cx = Jagged(n, T); var cy = Jagged(n, T); var a = Jagged(n, T); var b = Jagged(n, T); var th = Jagged(n, T);
        for (int i = 0; i < n; i++)
        {
            double sx = 2 + (i % fitCols + 0.5) * slot, sy = 2 + (i / fitCols + 0.5) * slot;
            double x = Normal.Sample(rng, 0, 1), y = Normal.Sample(rng, 0, 1), dx = Normal.Sample(rng, 0, 1), dy = Normal.Sample(rng, 0, 1);
            double theta0 = (rng.NextDouble() - 0.5) * Math.PI, omega = (rng.Next(2) == 0 ? -1 : 1) * o.RotationDegPerFrame * Math.PI / 180;
            double rotSd = o.TauThetaFrames > 0 ? Math.Sqrt(1 / (2 * o.TauThetaFrames)) : 0, theta = theta0;   // E cos 2 dtheta = exp(-2 k sd^2)
            for (int t = 0; t < T; t++)
            {
                if (t > 0)
                {
                    x = rho * x + innov * Normal.Sample(rng, 0, 1);
                    y = rhoB * y + innovB * Normal.Sample(rng, 0, 1);
                    dx = rhoD * dx + innovD * Normal.Sample(rng, 0, 1);
                    dy = rhoD * dy + innovD * Normal.Sample(rng, 0, 1);
                }
                a[i][t] = o.SemiMajorPx + o.SigmaAlongPx * x;
                b[i][t] = o.SemiMinorPx + o.SigmaAcrossPx * y;
                cx[i][t] = sx + o.DriftPx * dx;
                cy[i][t] = sy + o.DriftPx * dy;
                if (t > 0) theta += omega + rotSd * Normal.Sample(rng, 0, 1);
                th[i][t] = theta;
            }
        }
        var labels = new int[T][];
        for (int t = 0; t < T; t++)
        {
            var used = new HashSet<int>();
            labels[t] = new int[n];
            for (int i = 0; i < n; i++) { int id; do id = 1 + rng.Next(65535); while (!used.Add(id)); labels[t][i] = id; }
        }
        var truth = EvaluateTruth(o, rays, cx, cy, a, b, th, labels);
        // White measurement noise on the rendered semi-axes, from its own stream so the signal is the same draw with or without it.
        double[][]? na = null, nb = null;
        if (o.NoiseAlongPx > 0 || o.NoiseAcrossPx > 0)
        {
            var nrng = new Random(unchecked(o.Seed * 7919 + 104729));
            na = Jagged(n, T); nb = Jagged(n, T);
            for (int i = 0; i < n; i++)
                for (int t = 0; t < T; t++) { na[i][t] = o.NoiseAlongPx * Normal.Sample(nrng, 0, 1); nb[i][t] = o.NoiseAcrossPx * Normal.Sample(nrng, 0, 1); }
        }
        return new EllipseMovie(o, w, h, slot, truth, na, nb, RadialNoise(o, a, b, na, nb));
    }

    /// <summary>Per cell, T x K radial noise values delta (px), node k at body-frame angle 2 pi k / K; the node's sector by the
    /// normal of that frame's ellipse: pole when |cos phi| / a^2 > |sin phi| / b^2 (normal within 45 degrees of the a-axis).
    /// Its own random stream, so the signal and the semi-axis noise are the same draws with or without it. Null when off.</summary>
    private static double[][]? RadialNoise(EllipseMovieOptions o, double[][] a, double[][] b, double[][]? na, double[][]? nb)
    {
        if (!(o.RadialNoisePolePx > 0 || o.RadialNoiseFlankPx > 0)) return null;
        const int K = EllipseMovieOptions.RadialNoiseNodes;
        var rng = new Random(unchecked(o.Seed * 6007 + 224737));
        int n = a.Length, T = a[0].Length;
        var r = new double[n][];
        for (int i = 0; i < n; i++)
        {
            r[i] = new double[T * K];
            for (int t = 0; t < T; t++)
            {
                double ai = a[i][t] + (na?[i][t] ?? 0), bi = b[i][t] + (nb?[i][t] ?? 0);
                for (int k = 0; k < K; k++)
                {
                    double phi = 2 * Math.PI * k / K;
                    bool pole = Math.Abs(Math.Cos(phi)) * bi * bi > Math.Abs(Math.Sin(phi)) * ai * ai;
                    r[i][t * K + k] = (pole ? o.RadialNoisePolePx : o.RadialNoiseFlankPx) * Normal.Sample(rng, 0, 1);
                }
            }
        }
        return r;
    }

    private static double[][] Jagged(int n, int t) { var r = new double[n][]; for (int i = 0; i < n; i++) r[i] = new double[t]; return r; }

    /// <summary>The spec's measures on the continuous shapes: L = 2a, W = 2b; body-frame rho(psi) of the exact ellipse.</summary>
    private static EllipseTruth EvaluateTruth(EllipseMovieOptions o, int m, double[][] cx, double[][] cy, double[][] a, double[][] b, double[][] th, int[][] labels)
    {
        int n = a.Length, T = a[0].Length;
        double sL = 0, sW = 0, sAl = 0, sAc = 0, sArea = 0;
        var frames = new int[n][]; var qSums = new List<TimeSeries.LagSums>(); var lSums = new List<TimeSeries.LagSums>(); var wSums = new List<TimeSeries.LagSums>(); var thSums = new List<TimeSeries.LagSums>();
        int maxLag = Math.Min(30, T - 1), fitLags = Math.Min(maxLag, Math.Max(4, T / 3));
        var rho = new double[T * m];
        var twoA = new double[T]; var twoB = new double[T];
        for (int i = 0; i < n; i++)
        {
            for (int t = 0; t < T; t++)
            {
                twoA[t] = 2 * a[i][t]; twoB[t] = 2 * b[i][t];
                sArea += Math.PI * a[i][t] * b[i][t];
                for (int k = 0; k < m; k++) rho[t * m + k] = RadialFunction.Ellipse(a[i][t], b[i][t], 2 * Math.PI * k / m);
            }
            frames[i] = Enumerable.Range(0, T).ToArray();
            var q = new double[T];
            for (int t = 0; t < T; t++) q[t] = (a[i][t] - b[i][t]) / (a[i][t] + b[i][t]);
            qSums.Add(TimeSeries.PooledAutocovariance.Of(new TimeSeries.TrackSeries(frames[i], q), maxLag));
            lSums.Add(TimeSeries.PooledAutocovariance.Of(new TimeSeries.TrackSeries(frames[i], (double[])twoA.Clone()), maxLag));
            wSums.Add(TimeSeries.PooledAutocovariance.Of(new TimeSeries.TrackSeries(frames[i], (double[])twoB.Clone()), maxLag));
            thSums.Add(Dynamics.OrientationCorrelation.Of(new TimeSeries.TrackSeries(frames[i], th[i]), maxLag));
            sL += Descriptive.PopulationVariance(twoA);
            sW += Descriptive.PopulationVariance(twoB);
            var c = ContourFluctuations.Of(rho, T, m);
            sAl += c.VarAlongRaw; sAc += c.VarAcrossRaw;
        }
        // Realised correlation times: the same estimators on the noise-free continuous shapes.
        double tauQ = TimeSeries.OrnsteinUhlenbeckFit.Fit(qSums, frames, [], fitLags).TauFrames;
        var fitL = TimeSeries.OrnsteinUhlenbeckFit.Fit(lSums, frames, [], fitLags);
        double tauL = fitL.TauFrames;
        double signalRatio = fitL.SignalVariance / TimeSeries.OrnsteinUhlenbeckFit.Fit(wSums, frames, [], fitLags).SignalVariance;
        double tauTh = Dynamics.OrientationCorrelation.FitTracks(thSums, [], maxLag, 20.0 * T).TauFrames;
        // Every track has T frames, so the frame-weighted pooled mean is the plain mean over cells.
        return new EllipseTruth(sL / sW, sAl / sAc, sL / n, sW / n, sAl / n, sAc / n, o.TauFrames, o.SigmaAlongPx, o.SigmaAcrossPx,
            Math.Sqrt(sArea / (n * T) / Math.PI), tauQ, tauL, o.TauThetaFrames, tauTh, cx, cy, a, b, th, labels) { AnisotropySignalRealised = signalRatio };
    }

    /// <summary>Rasterises frame <paramref name="t"/>: a pixel belongs to a cell when its centre lies inside the ellipse.</summary>
    public int[] RenderFrame(int t)
    {
        var img = new int[Width * Height];
        var tr = Truth;
        for (int i = 0; i < Options.Cells; i++)
        {
            double x0 = tr.CentreX[i][t], y0 = tr.CentreY[i][t], a = tr.A[i][t] + (_noiseA?[i][t] ?? 0), b = tr.B[i][t] + (_noiseB?[i][t] ?? 0), c = Math.Cos(tr.Theta[i][t]), s = Math.Sin(tr.Theta[i][t]);
            int id = tr.LabelOfCell[t][i];
            if (_radial is not null) { RenderRadial(img, i, t, id, x0, y0, a, b, c, s); continue; }
            int xmin = Math.Max(0, (int)Math.Floor(x0 - a - 1)), xmax = Math.Min(Width - 1, (int)Math.Ceiling(x0 + a + 1));
            int ymin = Math.Max(0, (int)Math.Floor(y0 - a - 1)), ymax = Math.Min(Height - 1, (int)Math.Ceiling(y0 + a + 1));
            for (int y = ymin; y <= ymax; y++)
                for (int x = xmin; x <= xmax; x++)
                {
                    double dx = x + 0.5 - x0, dy = y + 0.5 - y0;
                    double u = (dx * c + dy * s) / a, v = (-dx * s + dy * c) / b;
                    if (u * u + v * v <= 1) img[y * Width + x] = id;
                }
        }
        return img;
    }

    /// <summary>One cell with radial noise: a pixel centre at body-frame (u, v), r = |(u, v)|, phi = atan2(v, u), belongs to the
    /// cell when r &lt;= r_ellipse(phi) + delta(phi), r_ellipse = a b r / sqrt(b^2 u^2 + a^2 v^2), delta linear between nodes.</summary>
    private void RenderRadial(int[] img, int i, int t, int id, double x0, double y0, double a, double b, double c, double s)
    {
        const int K = EllipseMovieOptions.RadialNoiseNodes;
        var d = _radial![i].AsSpan(t * K, K);
        double reach = a + 1 + 5 * Math.Max(Options.RadialNoisePolePx, Options.RadialNoiseFlankPx);
        int xmin = Math.Max(0, (int)Math.Floor(x0 - reach)), xmax = Math.Min(Width - 1, (int)Math.Ceiling(x0 + reach));
        int ymin = Math.Max(0, (int)Math.Floor(y0 - reach)), ymax = Math.Min(Height - 1, (int)Math.Ceiling(y0 + reach));
        for (int y = ymin; y <= ymax; y++)
            for (int x = xmin; x <= xmax; x++)
            {
                double dx = x + 0.5 - x0, dy = y + 0.5 - y0;
                double u = dx * c + dy * s, v = -dx * s + dy * c, r = Math.Sqrt(u * u + v * v);
                if (r == 0) { img[y * Width + x] = id; continue; }
                double re = a * b * r / Math.Sqrt(b * b * u * u + a * a * v * v);
                double pos = (Math.Atan2(v, u) + 2 * Math.PI) % (2 * Math.PI) / (2 * Math.PI) * K;
                int k = (int)pos % K; double f = pos - Math.Floor(pos);
                if (r <= re + (1 - f) * d[k] + f * d[(k + 1) % K]) img[y * Width + x] = id;
            }
    }
}
