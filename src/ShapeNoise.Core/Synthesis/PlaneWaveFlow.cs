using ShapeNoise.Motion;

namespace ShapeNoise.Synthesis;

/// <summary>
/// An incompressible random flow of one wavenumber: the stream function psi(x, t) = A sum_j cos(k e_j . x + phi_j(t)) of
/// N plane waves with k = 2 pi / wavelength, random unit directions e_j and phases phi_j that diffuse in time,
/// phi_j(t + 1) = phi_j(t) + sqrt(2 / tau) xi (xi a unit normal), so the velocity at a fixed point decorrelates as
/// exp(-|t| / tau). The velocity v = (d psi / dy, -d psi / dx) = A k sum_j sin(k e_j . x + phi_j) (-e_jy, e_jx) is
/// divergence-free (the divergence of a curl), and its spatial correlation C_vv(r) is J0(kr) (the angle average of
/// cos(k e . r)). Used by the monolayer scenario (docs/motion.md#synthetic-flows).
/// </summary>
/// <remarks>Random-phase superposition of Fourier modes as a synthetic turbulent field: Kraichnan R.H. (1970),
/// "Diffusion by a random velocity field", Phys. Fluids 13:22-31. J0's first zero kr = 2.405: Abramowitz M. and Stegun I.A.
/// (1964), Handbook of Mathematical Functions, table 9.5.</remarks>
public sealed class PlaneWaveFlow
{
    private readonly double[] _ex, _ey;
    private readonly double[][] _phase;   // [frame][wave]

    /// <summary>Wavenumber k = 2 pi / wavelength (1/px).</summary>
    public double WavenumberPerPx { get; }
    /// <summary>Velocity amplitude of each wave, A k (px/frame).</summary>
    public double WaveSpeedPx { get; }
    /// <summary>Number of plane waves N.</summary>
    public int Waves => _ex.Length;
    /// <summary>Number of frames the phases are drawn for.</summary>
    public int Frames => _phase.Length;

    private PlaneWaveFlow(double k, double waveSpeed, double[] ex, double[] ey, double[][] phase)
    { WavenumberPerPx = k; WaveSpeedPx = waveSpeed; _ex = ex; _ey = ey; _phase = phase; }

    /// <summary>A field of <paramref name="waves"/> plane waves of one wavelength with A k = 1 px/frame per wave, seeded:
    /// directions uniform on the circle, start phases uniform, then phase diffusion with correlation time tau.</summary>
    public static PlaneWaveFlow Create(int waves, double wavelengthPx, double tauFrames, int frames, int seed)
    {
        if (waves < 1) throw new ArgumentException($"the flow needs >= 1 plane wave (got {waves})");
        if (!(wavelengthPx > 0) || !(tauFrames > 0) || frames < 1) throw new ArgumentException("the flow's wavelength and correlation time must be > 0");
        var rng = new Random(seed);
        var ex = new double[waves]; var ey = new double[waves];
        var phase = new double[frames][];
        phase[0] = new double[waves];
        for (int j = 0; j < waves; j++)
        {
            double a = rng.NextDouble() * 2 * Math.PI;
            ex[j] = Math.Cos(a); ey[j] = Math.Sin(a); phase[0][j] = rng.NextDouble() * 2 * Math.PI;
        }
        double step = Math.Sqrt(2 / tauFrames);
        for (int t = 1; t < frames; t++)
        {
            phase[t] = new double[waves];
            for (int j = 0; j < waves; j++) phase[t][j] = phase[t - 1][j] + step * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1);
        }
        return new PlaneWaveFlow(2 * Math.PI / wavelengthPx, 1, ex, ey, phase);
    }

    /// <summary>The same waves and phases with every amplitude multiplied by <paramref name="factor"/>.</summary>
    public PlaneWaveFlow Scaled(double factor) => new(WavenumberPerPx, WaveSpeedPx * factor, _ex, _ey, _phase);

    /// <summary>v(x, t) = A k sum_j sin(k e_j . x + phi_j(t)) (-e_jy, e_jx) (px/frame).</summary>
    public (double Vx, double Vy) Velocity(int t, double x, double y)
    {
        var ph = _phase[t];
        double k = WavenumberPerPx, vx = 0, vy = 0;
        for (int j = 0; j < _ex.Length; j++)
        {
            double s = Math.Sin(k * (_ex[j] * x + _ey[j] * y) + ph[j]);
            vx -= s * _ey[j]; vy += s * _ex[j];
        }
        return (WaveSpeedPx * vx, WaveSpeedPx * vy);
    }

    /// <summary>psi(x, t) = A sum_j cos(k e_j . x + phi_j(t)) (px^2/frame), with A = <see cref="WaveSpeedPx"/> / k.</summary>
    public double StreamFunction(int t, double x, double y)
    {
        var ph = _phase[t];
        double k = WavenumberPerPx, s = 0;
        for (int j = 0; j < _ex.Length; j++) s += Math.Cos(k * (_ex[j] * x + _ey[j] * y) + ph[j]);
        return WaveSpeedPx / k * s;
    }

    /// <summary>The field of frame t on the grid x = (i + 1/2) h, y = (j + 1/2) h, i &lt; nx, j &lt; ny (node j nx + i).</summary>
    public (double[] Vx, double[] Vy) OnGrid(int t, int nx, int ny, double spacingPx)
    {
        var vx = new double[nx * ny]; var vy = new double[nx * ny];
        for (int j = 0; j < ny; j++)
            for (int i = 0; i < nx; i++) (vx[j * nx + i], vy[j * nx + i]) = Velocity(t, (i + 0.5) * spacingPx, (j + 0.5) * spacingPx);
        return (vx, vy);
    }

    /// <summary>Rms speed of the fluctuation about each frame's mean, pooled over frames:
    /// sqrt(mean_t RmsSpeed_t^2) over the grid of <see cref="OnGrid"/> (px/frame).</summary>
    public double GridRmsSpeed(int nx, int ny, double spacingPx)
    {
        double s = 0;
        for (int t = 0; t < Frames; t++)
        {
            var (vx, vy) = OnGrid(t, nx, ny, spacingPx);
            double r = VelocityFieldStatistics.RmsSpeed(vx, vy);
            s += r * r;
        }
        return Math.Sqrt(s / Frames);
    }
}
