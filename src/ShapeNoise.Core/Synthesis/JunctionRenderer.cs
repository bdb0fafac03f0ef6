using MathNet.Numerics.Distributions;

namespace ShapeNoise.Synthesis;

/// <summary>Options of the raw junction-marker rendering; validated on construction.</summary>
public sealed record RawRenderOptions
{
    /// <summary>Signal-to-noise ratio: junction signal above background over the noise sd at the junction.</summary>
    public double Snr { get; init; } = 8;
    /// <summary>Gaussian point-spread sigma (px).</summary>
    public double PsfSigmaPx { get; init; } = 1.2;
    /// <summary>Background photons per pixel.</summary>
    public double BackgroundPhotons { get; init; } = 20;
    /// <summary>Camera read-noise sd (photo-electrons).</summary>
    public double ReadNoise { get; init; } = 3;
    /// <summary>Relative amplitude of the smooth illumination falloff across the field (0 = flat).</summary>
    public double Illumination { get; init; } = 0.3;
    /// <summary>Fraction of the signal lost to photobleaching by the last frame (exponential).</summary>
    public double Bleach { get; init; } = 0.3;
    /// <summary>Seed of the photon, read-noise and illumination draws.</summary>
    public int Seed { get; init; } = 3;
    /// <summary>Physical junction width (px): the marker fills the band within LineWidthPx / 2 of the true cell-cell
    /// boundary (pixel area coverage by 4 x 4 sub-samples); null = the one-pixel line on both sides of every label change
    /// (the original rendering, docs/segmentation.md#render-family).</summary>
    public double? LineWidthPx { get; init; }
    /// <summary>Out-of-focus haze: the junction pattern blurred by a Gaussian of <see cref="HazeSigmaPx"/>, with a mean of
    /// this fraction of the peak junction signal (0 = none).</summary>
    public double Haze { get; init; }
    /// <summary>Width (px) of the out-of-focus blur of <see cref="Haze"/>.</summary>
    public double HazeSigmaPx { get; init; } = 20;
    /// <summary>Cytoplasmic marker pool: every cell's interior carries this fraction of the peak junction signal, times a
    /// per-cell factor uniform in [0.75, 1.25] (0 = none).</summary>
    public double Cytoplasm { get; init; }

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public RawRenderOptions Validated()
    {
        if (!(Snr > 0)) throw new ArgumentException($"--snr must be > 0 (got {Snr})");
        if (!(PsfSigmaPx >= 0)) throw new ArgumentException($"--psf must be >= 0 px (got {PsfSigmaPx})");
        if (Illumination is < 0 or >= 1) throw new ArgumentException($"--illumination must be in [0, 1) (got {Illumination})");
        if (Bleach is < 0 or >= 1) throw new ArgumentException($"--bleach must be in [0, 1) (got {Bleach})");
        if (LineWidthPx is { } lw && !(lw is >= 0.25 and <= 8)) throw new ArgumentException($"--line-width must be in [0.25, 8] px (got {lw})");
        if (!(Haze >= 0) || !(HazeSigmaPx > 0)) throw new ArgumentException($"--haze must be >= 0 (got {Haze})");
        if (!(Cytoplasm is >= 0 and < 1)) throw new ArgumentException($"--cytoplasm must be in [0, 1) (got {Cytoplasm})");
        return this;
    }
}

/// <summary>
/// Renders the raw movie of a junction or membrane marker from a label movie: bright one-pixel lines where labels meet,
/// blurred by a Gaussian point-spread function, scaled by a smooth illumination field and an exponential photobleaching
/// factor, then Poisson shot noise and Gaussian read noise. The peak line signal P (photons above background) is set so
/// that P / sqrt(P + B + r^2) equals the requested SNR at the first frame (B background photons, r read noise).
/// Our own rendering for tests and demos.
/// </summary>
/// <remarks>Noise model of a photon-counting camera: Poisson statistics plus Gaussian read noise (e.g. Pawley J.B. (2006),
/// Handbook of Biological Confocal Microscopy, 3rd ed., ch. 2 and 12).</remarks>
public static class JunctionRenderer
{
    /// <summary>Peak photons P with P / sqrt(P + B + r^2) = SNR.</summary>
    public static double PeakPhotons(double snr, double background, double readNoise)
    {
        double s2 = snr * snr;
        return 0.5 * (s2 + Math.Sqrt(s2 * s2 + 4 * s2 * (background + readNoise * readNoise)));
    }

    /// <summary>Renders frame <paramref name="t"/> of <paramref name="frames"/> (uint16 values as int): expected photons
    /// λ = I(x) [B + b(t) (P L(x) / L_peak + P h H(x) + P c C(x))], then Poisson(λ) + N(0, r²) + 100 (camera offset), with
    /// I the illumination field, b(t) = (1 − bleach)^(t / (frames − 1)), L the point-spread-blurred junction image, H the
    /// haze and C the cytoplasm.</summary>
    public static int[] Render(int[] labels, int width, int height, int t, int frames, RawRenderOptions o, Random rng)
    {
        double[] line;
        double peakLine;
        if (o.LineWidthPx is { } lw)
        {
            line = BandCoverage(labels, width, height, lw);
            if (o.PsfSigmaPx > 0) Blur(line, width, height, o.PsfSigmaPx);
            // Peak of a straight band of width w blurred by a Gaussian of sigma s: 2 Phi(w / 2s) - 1.
            peakLine = o.PsfSigmaPx > 0 ? 2 * Normal.CDF(0, 1, lw / (2 * o.PsfSigmaPx)) - 1 : 1;
            peakLine = Math.Min(peakLine, lw);
        }
        else
        {
            line = new double[labels.Length];
            for (int y = 0; y < height; y++)
                for (int x = 0; x < width; x++)
                {
                    int i = y * width + x, l = labels[i];
                    bool edge = (x + 1 < width && labels[i + 1] != l) || (y + 1 < height && labels[i + width] != l)
                             || (x > 0 && labels[i - 1] != l) || (y > 0 && labels[i - width] != l);
                    if (edge) line[i] = 1;
                }
            if (o.PsfSigmaPx > 0) Blur(line, width, height, o.PsfSigmaPx);
            // Normalise so the blurred line peaks at 1 (a straight line's blurred peak).
            peakLine = o.PsfSigmaPx > 0 ? Math.Min(1, 2 / (Math.Sqrt(2 * Math.PI) * o.PsfSigmaPx)) : 1;
        }
        double p = PeakPhotons(o.Snr, o.BackgroundPhotons, o.ReadNoise);
        var extra = Extra(line, labels, width, height, o, peakLine);
        double bleach = Math.Pow(1 - o.Bleach, frames > 1 ? t / (double)(frames - 1) : 0);
        var img = new int[labels.Length];
        for (int y = 0; y < height; y++)
            for (int x = 0; x < width; x++)
            {
                int i = y * width + x;
                double u = x / (double)width - 0.3, v = y / (double)height - 0.4;
                double illum = 1 - o.Illumination * Math.Min(1, 2 * (u * u + v * v));
                double marker = line[i] / peakLine + (extra is null ? 0 : extra[i]);
                double lambda = illum * (o.BackgroundPhotons + bleach * p * marker);
                double counts = Poisson.Sample(rng, Math.Max(1e-9, lambda)) + o.ReadNoise * Normal.Sample(rng, 0, 1) + 100;   // 100: camera offset
                img[i] = (int)Math.Clamp(Math.Round(counts), 0, 65535);
            }
        return img;
    }

    /// <summary>Haze h H(x) + cytoplasm c C(x) in units of the peak junction signal, or null when both are 0.</summary>
    private static double[]? Extra(double[] line, int[] labels, int w, int h, RawRenderOptions o, double peakLine)
    {
        if (o.Haze <= 0 && o.Cytoplasm <= 0) return null;
        var e = new double[line.Length];
        if (o.Haze > 0)
        {
            var haze = (double[])line.Clone();
            Blur(haze, w, h, o.HazeSigmaPx);
            double mean = 0;
            foreach (var v in haze) mean += v;
            mean /= haze.Length;
            if (mean > 0) for (int i = 0; i < e.Length; i++) e[i] += o.Haze * haze[i] / mean;
        }
        if (o.Cytoplasm > 0)
        {
            var c = new double[line.Length];
            for (int i = 0; i < c.Length; i++)
            {
                if (labels[i] == 0) continue;
                // Per-cell factor in [0.75, 1.25] from a hash of the label and the seed (fixed over frames).
                uint k = unchecked((uint)labels[i] * 2654435761u ^ (uint)o.Seed * 40503u);
                k ^= k >> 15; k = unchecked(k * 2246822519u); k ^= k >> 13;
                c[i] = o.Cytoplasm * (0.75 + 0.5 * (k % 10007) / 10006.0);
            }
            if (o.PsfSigmaPx > 0) Blur(c, w, h, o.PsfSigmaPx);
            for (int i = 0; i < e.Length; i++) e[i] += c[i];
        }
        return e;
    }

    /// <summary>Fraction of each pixel (4 x 4 sub-samples) within <paramref name="widthPx"/> / 2 of the boundary between
    /// 4-neighbour pixels of different labels (the true cell-cell contact, on pixel edges).</summary>
    public static double[] BandCoverage(int[] labels, int w, int h, double widthPx)
    {
        // Edge flags: vertical edge right of pixel i, horizontal edge below pixel i.
        var right = new bool[labels.Length]; var below = new bool[labels.Length];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x;
                if (x + 1 < w && labels[i + 1] != labels[i]) right[i] = true;
                if (y + 1 < h && labels[i + w] != labels[i]) below[i] = true;
            }
        const int n = 4;
        double half = widthPx / 2, half2 = half * half;
        int r = (int)Math.Ceiling(half + 1);
        var cov = new double[labels.Length];
        Span<double> sx = stackalloc double[n * n]; Span<double> sy = stackalloc double[n * n];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                for (int k = 0; k < n * n; k++) { sx[k] = x + ((k % n) + 0.5) / n - 0.5; sy[k] = y + ((k / n) + 0.5) / n - 0.5; }
                int hit = 0; uint inside = 0;
                for (int yy = Math.Max(0, y - r); yy <= Math.Min(h - 1, y + r); yy++)
                    for (int xx = Math.Max(0, x - r); xx <= Math.Min(w - 1, x + r); xx++)
                    {
                        int j = yy * w + xx;
                        if (right[j]) Mark(sx, sy, xx + 0.5, yy - 0.5, xx + 0.5, yy + 0.5, half2, ref inside);
                        if (below[j]) Mark(sx, sy, xx - 0.5, yy + 0.5, xx + 0.5, yy + 0.5, half2, ref inside);
                    }
                for (int k = 0; k < n * n; k++) if ((inside & (1u << k)) != 0) hit++;
                cov[y * w + x] = hit / (double)(n * n);
            }
        return cov;
    }

    /// <summary>Sets bit k of <paramref name="inside"/> for each sub-sample within sqrt(<paramref name="d2"/>) of the segment (ax, ay)-(bx, by).</summary>
    private static void Mark(ReadOnlySpan<double> sx, ReadOnlySpan<double> sy, double ax, double ay, double bx, double by, double d2, ref uint inside)
    {
        double vx = bx - ax, vy = by - ay, vv = vx * vx + vy * vy;
        for (int k = 0; k < sx.Length; k++)
        {
            if ((inside & (1u << k)) != 0) continue;
            double s = Math.Clamp(((sx[k] - ax) * vx + (sy[k] - ay) * vy) / vv, 0, 1);
            double dx = sx[k] - ax - s * vx, dy = sy[k] - ay - s * vy;
            if (dx * dx + dy * dy <= d2) inside |= 1u << k;
        }
    }

    private static void Blur(double[] f, int w, int h, double sigma)
        => SampledGaussian.Blur(f, w, h, SampledGaussian.Kernel(sigma)).CopyTo(f, 0);
}
