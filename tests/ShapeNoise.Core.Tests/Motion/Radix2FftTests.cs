using ShapeNoise.Motion;

namespace ShapeNoise.Core.Tests.Motion;

/// <summary>The pruned FFT of the motion correlations against the definition of the discrete Fourier transform.</summary>
public class Radix2FftTests
{
    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(8)]
    [InlineData(64)]
    public void Forward_RandomSignal_MatchesDefiningSum(int n)
    {
        // Reference: the DFT's defining sum X_k = sum_j x_j exp(-2 pi i k j / N) (any signal-processing handbook, e.g.
        // Press et al. 2007, Numerical Recipes, eq. 12.1.7), evaluated directly in O(N^2). Tolerance 1e-12 x N: the FFT
        // and the direct sum differ by rounding that grows about like log N and N.
        var rng = new Random(7);
        var re = new double[n]; var im = new double[n];
        for (int j = 0; j < n; j++) { re[j] = rng.NextDouble() - 0.5; im[j] = rng.NextDouble() - 0.5; }
        var (er, ei) = (new double[n], new double[n]);
        for (int k = 0; k < n; k++)
            for (int j = 0; j < n; j++)
            {
                double a = -2 * Math.PI * ((long)k * j % n) / n;
                er[k] += re[j] * Math.Cos(a) - im[j] * Math.Sin(a);
                ei[k] += re[j] * Math.Sin(a) + im[j] * Math.Cos(a);
            }
        Radix2Fft.For(n).Forward(re, im);
        for (int k = 0; k < n; k++)
        {
            Assert.True(Math.Abs(re[k] - er[k]) < 1e-12 * n, $"Re X[{k}]: {re[k]} vs {er[k]}");
            Assert.True(Math.Abs(im[k] - ei[k]) < 1e-12 * n, $"Im X[{k}]: {im[k]} vs {ei[k]}");
        }
    }

    [Fact]
    public void For_LengthNotPowerOfTwo_Throws() => Assert.Throws<ArgumentException>(() => Radix2Fft.For(12));
}
