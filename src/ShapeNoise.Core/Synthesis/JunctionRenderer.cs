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

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public RawRenderOptions Validated()
    {
        if (!(Snr > 0)) throw new ArgumentException($"--snr must be > 0 (got {Snr})");
        if (!(PsfSigmaPx >= 0)) throw new ArgumentException($"--psf must be >= 0 px (got {PsfSigmaPx})");
        if (Illumination is < 0 or >= 1) throw new ArgumentException($"--illumination must be in [0, 1) (got {Illumination})");
        if (Bleach is < 0 or >= 1) throw new ArgumentException($"--bleach must be in [0, 1) (got {Bleach})");
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

    /// <summary>Renders frame <paramref name="t"/> of <paramref name="frames"/> (uint16 values as int).</summary>
    public static int[] Render(int[] labels, int width, int height, int t, int frames, RawRenderOptions o, Random rng)
    {
        var line = new double[labels.Length];
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
        double peakLine = o.PsfSigmaPx > 0 ? Math.Min(1, 2 / (Math.Sqrt(2 * Math.PI) * o.PsfSigmaPx)) : 1;
        double p = PeakPhotons(o.Snr, o.BackgroundPhotons, o.ReadNoise);
        double bleach = Math.Pow(1 - o.Bleach, frames > 1 ? t / (double)(frames - 1) : 0);
        var img = new int[labels.Length];
        for (int y = 0; y < height; y++)
            for (int x = 0; x < width; x++)
            {
                int i = y * width + x;
                double u = x / (double)width - 0.3, v = y / (double)height - 0.4;
                double illum = 1 - o.Illumination * Math.Min(1, 2 * (u * u + v * v));
                double lambda = illum * (o.BackgroundPhotons + bleach * p * line[i] / peakLine);
                double counts = Poisson.Sample(rng, Math.Max(1e-9, lambda)) + o.ReadNoise * Normal.Sample(rng, 0, 1) + 100;   // 100: camera offset
                img[i] = (int)Math.Clamp(Math.Round(counts), 0, 65535);
            }
        return img;
    }

    private static void Blur(double[] f, int w, int h, double sigma)
    {
        int r = (int)Math.Ceiling(3 * sigma);
        var k = new double[2 * r + 1];
        double sum = 0;
        for (int i = -r; i <= r; i++) { k[i + r] = Math.Exp(-0.5 * i * i / (sigma * sigma)); sum += k[i + r]; }
        for (int i = 0; i < k.Length; i++) k[i] /= sum;
        var tmp = new double[f.Length];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                double s = 0;
                for (int i = -r; i <= r; i++) { int xx = Math.Clamp(x + i, 0, w - 1); s += k[i + r] * f[y * w + xx]; }
                tmp[y * w + x] = s;
            }
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                double s = 0;
                for (int i = -r; i <= r; i++) { int yy = Math.Clamp(y + i, 0, h - 1); s += k[i + r] * tmp[yy * w + x]; }
                f[y * w + x] = s;
            }
    }
}
