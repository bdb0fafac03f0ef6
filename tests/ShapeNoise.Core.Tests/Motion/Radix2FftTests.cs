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

    [Theory]
    [InlineData(8, 1)]
    [InlineData(16, 7)]
    [InlineData(64, 13)]
    public void ForwardColumns_RandomMatrix_EachColumnIsItsDftAndForwardsDoubles(int n, int width)
    {
        // Reference: the DFT's defining sum per column (as above), tolerance 1e-12 x N. The batched form also claims the
        // same doubles as the one-sequence transform (the motion outputs stay byte-identical, bench/README.md), checked exactly.
        var rng = new Random(11);
        var re = new double[n * width]; var im = new double[n * width];
        for (int k = 0; k < re.Length; k++) { re[k] = rng.NextDouble() - 0.5; im[k] = rng.NextDouble() - 0.5; }
        var (r0, i0) = ((double[])re.Clone(), (double[])im.Clone());
        Radix2Fft.For(n).ForwardColumns(re, im, width);
        for (int c = 0; c < width; c++)
        {
            var cr = new double[n]; var ci = new double[n];
            for (int t = 0; t < n; t++) { cr[t] = r0[t * width + c]; ci[t] = i0[t * width + c]; }
            for (int k = 0; k < n; k++)
            {
                double er = 0, ei = 0;
                for (int j = 0; j < n; j++)
                {
                    double a = -2 * Math.PI * ((long)k * j % n) / n;
                    er += cr[j] * Math.Cos(a) - ci[j] * Math.Sin(a);
                    ei += cr[j] * Math.Sin(a) + ci[j] * Math.Cos(a);
                }
                Assert.True(Math.Abs(re[k * width + c] - er) < 1e-12 * n && Math.Abs(im[k * width + c] - ei) < 1e-12 * n, $"column {c}, X[{k}]");
            }
            Radix2Fft.For(n).Forward(cr, ci);
            for (int k = 0; k < n; k++)
            {
                Assert.Equal(BitConverter.DoubleToInt64Bits(cr[k]), BitConverter.DoubleToInt64Bits(re[k * width + c]));
                Assert.Equal(BitConverter.DoubleToInt64Bits(ci[k]), BitConverter.DoubleToInt64Bits(im[k * width + c]));
            }
        }
    }

    [Fact]
    public void For_LengthNotPowerOfTwo_Throws() => Assert.Throws<ArgumentException>(() => Radix2Fft.For(12));
}
