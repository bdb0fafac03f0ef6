using System.Numerics;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;

namespace ShapeNoise.Fluctuations;

/// <summary>Contour fluctuations of one track in the body frame (docs/measures.md#contour-variances), in px^2.</summary>
/// <param name="Frames">Number of outlines in the track.</param>
/// <param name="VarAlongRaw">w-weighted mean over pole samples of mean_t n^2.</param>
/// <param name="VarAcrossRaw">The same over flank samples.</param>
/// <param name="FloorAlong">Noise floor in the pole sector: w-weighted mean of M f cos^2 g.</param>
/// <param name="FloorAcross">Noise floor in the flank sector.</param>
/// <param name="FloorPerMode">f = median of p_n for M/4 &lt;= n &lt; M/2.</param>
/// <param name="ModePower">p_n = mean_t |C_n(t) - mean_t C_n|^2, n = 0..M/2.</param>
/// <param name="SampleVariance">Per ray sample k: mean_t n(psi_k, t)^2.</param>
/// <param name="SampleFloor">Per ray sample k: M f cos^2 g_k.</param>
/// <param name="NormalAngleDeg">Per ray sample k: angle of the outward normal from the long axis, folded into [0, 90] degrees.</param>
/// <param name="ArcWeight">Per ray sample k: w = sqrt(m^2 + m'^2).</param>
/// <param name="AlongSeries">Per frame: the w-weighted mean over pole samples of the normal displacement n(psi, t), the
/// "along" fluctuation coordinate.</param>
/// <param name="AcrossSeries">Per frame: the same over flank samples, the "across" coordinate.</param>
public sealed record TrackContour(int Frames, double VarAlongRaw, double VarAcrossRaw, double FloorAlong, double FloorAcross,
    double FloorPerMode, double[] ModePower, double[] SampleVariance, double[] SampleFloor, double[] NormalAngleDeg, double[] ArcWeight,
    double[] AlongSeries, double[] AcrossSeries)
{
    /// <summary>Lagged sums of the pole-sector residuals for the temporal noise model (docs/measures.md#temporal-noise-model):
    /// Sum[k] = sum over pairs (t, t+k) of frames both present of sum_j W_j n_j(t) n_j(t+k) / sum_j W_j over pole samples j
    /// (W_j = arc weight), so Sum[0] / Frames = <see cref="VarAlongRaw"/>. Null when the contour was built without them.</summary>
    internal TimeSeries.LagSums? AlongLags { get; init; }
    /// <summary>The same over the flank samples (Sum[0] / Frames = <see cref="VarAcrossRaw"/>).</summary>
    internal TimeSeries.LagSums? AcrossLags { get; init; }

    /// <summary>Floor-corrected var_along = raw - floor.</summary>
    public double VarAlong => VarAlongRaw - FloorAlong;
    /// <summary>Floor-corrected var_across = raw - floor.</summary>
    public double VarAcross => VarAcrossRaw - FloorAcross;
}

/// <summary>Along/across split of the contour-fluctuation variance and its high-mode noise floor.</summary>
/// <remarks>
/// Fourier-mode fluctuation analysis of contours: Pécréaux J. et al. (2004), Eur. Phys. J. E 13:277-290, who also estimate
/// the measurement floor from the flat high-mode tail of the spectrum. Sectors by the outward normal rather than by the ray
/// angle follow the ShapeNoise spec (section 2); normal displacement d cos g and arc-length weight sqrt(m^2 + m'^2) are the
/// first-order geometry of a star-shaped curve r(psi) in polar form (do Carmo M.P. (1976), Differential Geometry of Curves and
/// Surfaces, Prentice-Hall, sec. 1-5).
/// </remarks>
public static class ContourFluctuations
{
    private static readonly double Cos45 = Math.Sqrt(0.5);

    /// <summary>
    /// Computes the contour fluctuations of a track from its body-frame radial samples.
    /// <paramref name="rho"/> holds <paramref name="frames"/> rows of <paramref name="m"/> samples rho(psi_k, t), row-major;
    /// <paramref name="modes"/> holds the matching body-frame Fourier modes, rows of M/2 + 1.
    /// </summary>
    /// <para>The sector lag sums of the temporal noise model (<see cref="TrackContour.AlongLags"/>) are computed for lags
    /// 0..<paramref name="maxLagFrames"/> over <paramref name="frameIndex"/> (null = frames 0..n-1, no gaps).</para>
    public static TrackContour Of(ReadOnlySpan<double> rho, ReadOnlySpan<Complex> modes, int frames, int m, int[]? frameIndex = null, int maxLagFrames = DefaultMaxLagFrames)
    {
        if (rho.Length != frames * m) throw new ArgumentException("rho must hold frames x M samples");
        int nm = m / 2 + 1;
        if (modes.Length != frames * nm) throw new ArgumentException("modes must hold frames x (M/2+1) values");
        var mean = new double[m];
        for (int t = 0; t < frames; t++)
            for (int k = 0; k < m; k++) mean[k] += rho[t * m + k];
        for (int k = 0; k < m; k++) mean[k] /= frames;
        var msd = new double[m];
        for (int t = 0; t < frames; t++)
            for (int k = 0; k < m; k++) { double d = rho[t * m + k] - mean[k]; msd[k] += d * d; }
        for (int k = 0; k < m; k++) msd[k] /= frames;

        // Mode power about the track mean, and the white-noise floor per mode from the upper half of the spectrum.
        var power = new double[nm];
        for (int n = 0; n < nm; n++)
        {
            Complex mc = Complex.Zero;
            for (int t = 0; t < frames; t++) mc += modes[t * nm + n];
            mc /= frames;
            double p = 0;
            for (int t = 0; t < frames; t++) { var d = modes[t * nm + n] - mc; p += d.Real * d.Real + d.Imaginary * d.Imaginary; }
            power[n] = p / frames;
        }
        double floorMode = Descriptive.Median(power.AsSpan(m / 4, m / 2 - m / 4));

        double dpsi = 2 * Math.PI / m;
        var sampleVar = new double[m]; var sampleFloor = new double[m]; var angle = new double[m]; var weight = new double[m];
        double wPole = 0, wFlank = 0, vPole = 0, vFlank = 0, fPole = 0, fFlank = 0;
        var poleW = new double[m]; var cosG = new double[m];
        for (int k = 0; k < m; k++)
        {
            double mk = mean[k];
            double dm = (mean[(k + 1) % m] - mean[(k + m - 1) % m]) / (2 * dpsi);
            double g = Math.Atan(dm / mk);
            double beta = k * dpsi - g;
            double cg2 = Math.Cos(g) * Math.Cos(g);
            double w = Math.Sqrt(mk * mk + dm * dm);
            double c = Math.Abs(Math.Cos(beta));
            double pole = Math.Abs(c - Cos45) < 1e-12 ? 0.5 : c > Cos45 ? 1 : 0;
            sampleVar[k] = msd[k] * cg2;
            sampleFloor[k] = m * floorMode * cg2;
            angle[k] = Math.Acos(Math.Min(1, c)) * 180 / Math.PI;
            weight[k] = w;
            poleW[k] = pole; cosG[k] = Math.Cos(g);
            wPole += pole * w; vPole += pole * w * sampleVar[k]; fPole += pole * w * sampleFloor[k];
            wFlank += (1 - pole) * w; vFlank += (1 - pole) * w * sampleVar[k]; fFlank += (1 - pole) * w * sampleFloor[k];
        }
        var along = new double[frames]; var across = new double[frames];
        for (int t = 0; t < frames; t++)
        {
            double a = 0, c = 0;
            for (int k = 0; k < m; k++)
            {
                double nrm = (rho[t * m + k] - mean[k]) * cosG[k] * weight[k];
                a += poleW[k] * nrm; c += (1 - poleW[k]) * nrm;
            }
            along[t] = a / wPole; across[t] = c / wFlank;
        }
        var (alongLags, acrossLags) = SectorLagSums(rho, mean, cosG, weight, poleW, frames, m, frameIndex, maxLagFrames);
        return new TrackContour(frames, vPole / wPole, vFlank / wFlank, fPole / wPole, fFlank / wFlank, floorMode,
            power, sampleVar, sampleFloor, angle, weight, along, across) { AlongLags = alongLags, AcrossLags = acrossLags };
    }

    /// <summary>Longest lag of the sector lag sums unless told (the default of --max-lag).</summary>
    public const int DefaultMaxLagFrames = 30;

    /// <summary>Per sector, sum over present pairs (t, t+k) of sum_j W_j n_j(t) n_j(t+k) / sum_j W_j, n_j(t) = (rho_j(t) -
    /// mean_j) cos g_j, W_j = pole (or flank) share times arc weight; pairs counted once per frame pair.</summary>
    /// <remarks>The residuals are stored by sample and frame offset (missing frames 0), so the sums of one frame t for
    /// <see cref="Vector{T}.Count"/> consecutive lags are formed lane by lane: each lane computes p = (w_j n_j(t)) n_j(t+k),
    /// a += W_pole,j p, c += (1 - W_pole,j) p over j in order, the operations and order of the scalar loop, so the sums are
    /// the same doubles (bench/README.md).</remarks>
    private static (TimeSeries.LagSums Along, TimeSeries.LagSums Across) SectorLagSums(ReadOnlySpan<double> rho, double[] mean, double[] cosG,
        double[] weight, double[] poleW, int frames, int m, int[]? frameIndex, int maxLag)
    {
        var f = frameIndex ?? Enumerable.Range(0, frames).ToArray();
        if (f.Length != frames) throw new ArgumentException("frameIndex must hold one frame number per outline");
        double wPole = 0, wFlank = 0;
        var flankW = new double[m];
        for (int k = 0; k < m; k++) { wPole += poleW[k] * weight[k]; wFlank += (1 - poleW[k]) * weight[k]; flankW[k] = 1 - poleW[k]; }
        int f0 = f[0], span = f[^1] - f0 + 1, lanes = Vector<double>.Count;
        int row = span + maxLag + lanes;                         // frame offsets, padded with zeros past the last frame
        var nT = new double[m * row];
        for (int t = 0; t < frames; t++)
            for (int k = 0; k < m; k++) nT[k * row + f[t] - f0] = (rho[t * m + k] - mean[k]) * cosG[k];
        var at = new int[span];
        Array.Fill(at, -1);
        for (int i = 0; i < frames; i++) at[f[i] - f0] = i;
        var sa = new double[maxLag + 1]; var sc = new double[maxLag + 1]; var pa = new int[maxLag + 1]; var pc = new int[maxLag + 1];
        Span<double> a = stackalloc double[lanes]; Span<double> c = stackalloc double[lanes];
        for (int i = 0; i < frames; i++)
        {
            int s = f[i] - f0, lags = Math.Min(maxLag, span - 1 - s);
            for (int lag0 = 0; lag0 <= lags; lag0 += lanes)
            {
                var av = Vector<double>.Zero; var cv = Vector<double>.Zero;
                for (int k = 0; k < m; k++)
                {
                    int r = k * row;
                    var p = new Vector<double>(weight[k] * nT[r + s]) * new Vector<double>(nT, r + s + lag0);
                    av += new Vector<double>(poleW[k]) * p; cv += new Vector<double>(flankW[k]) * p;
                }
                av.CopyTo(a); cv.CopyTo(c);
                for (int l = 0; l < lanes && lag0 + l <= lags; l++)
                {
                    int lag = lag0 + l;
                    if (at[s + lag] < 0) continue;
                    sa[lag] += a[l] / wPole; sc[lag] += c[l] / wFlank; pa[lag]++; pc[lag]++;
                }
            }
        }
        return (new TimeSeries.LagSums(sa, pa), new TimeSeries.LagSums(sc, pc));
    }

    /// <summary>Convenience overload: computes the Fourier modes of each row first.</summary>
    public static TrackContour Of(ReadOnlySpan<double> rho, int frames, int m, int[]? frameIndex = null, int maxLagFrames = DefaultMaxLagFrames)
    {
        int nm = m / 2 + 1;
        var modes = new Complex[frames * nm];
        for (int t = 0; t < frames; t++) FourierModes.Of(rho.Slice(t * m, m), modes.AsSpan(t * nm, nm));
        return Of(rho, modes, frames, m, frameIndex, maxLagFrames);
    }
}
