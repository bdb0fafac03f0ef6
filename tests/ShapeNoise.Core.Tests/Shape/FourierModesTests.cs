using System.Numerics;
using MathNet.Numerics.IntegralTransforms;
using ShapeNoise.Shape;

namespace ShapeNoise.Tests.Shape;

public class FourierModesTests
{
    [Fact]
    public void Of_RandomSamples_AgreesWithMathNetFourier()
    {
        // Reference library: MathNet.Numerics' FFT with no scaling and the exp(-i) convention (FourierOptions.Matlab).
        var rng = new Random(5);
        var rho = Enumerable.Range(0, 64).Select(_ => 10 + rng.NextDouble()).ToArray();
        var ours = new Complex[33];
        FourierModes.Of(rho, ours);
        var reference = rho.Select(x => new Complex(x, 0)).ToArray();
        Fourier.Forward(reference, FourierOptions.Matlab);
        for (int n = 0; n <= 32; n++) Assert.True(Complex.Abs(ours[n] - reference[n] / 64) < 1e-12);
    }

    [Fact]
    public void Radix2_RandomComplexInput_IsFftSharpsTransformBitForBit()
    {
        // Reference library: FftSharp 2.2.0's FFT.Forward (the transform the modes were computed with before the tables;
        // the recorded regression fixtures rest on its doubles, so the tabulated transform must give the same ones).
        var rng = new Random(6);
        for (int m = 2; m <= 1024; m *= 2)
        {
            var x = Enumerable.Range(0, m).Select(_ => new Complex(rng.NextDouble() * 20 - 10, rng.NextDouble() - 0.5)).ToArray();
            var reference = (Complex[])x.Clone();
            FftSharp.FFT.Forward(reference);
            FourierModes.Radix2.For(m).Forward(x);
            for (int n = 0; n < m; n++)
            {
                Assert.Equal(BitConverter.DoubleToInt64Bits(reference[n].Real), BitConverter.DoubleToInt64Bits(x[n].Real));
                Assert.Equal(BitConverter.DoubleToInt64Bits(reference[n].Imaginary), BitConverter.DoubleToInt64Bits(x[n].Imaginary));
            }
        }
    }

    [Fact]
    public void Direct_NonPowerOfTwo_MatchesCosineInput()
    {
        // rho = 5 + 2 cos(3 psi) + sin(5 psi) at M = 72: C_0 = 5, C_3 = 1, C_5 = -i/2 (definition of the DFT).
        const int m = 72;
        var rho = Enumerable.Range(0, m).Select(k => { double p = 2 * Math.PI * k / m; return 5 + 2 * Math.Cos(3 * p) + Math.Sin(5 * p); }).ToArray();
        var c = new Complex[m / 2 + 1];
        FourierModes.Of(rho, c);
        Assert.True(Complex.Abs(c[0] - 5) < 1e-12);
        Assert.True(Complex.Abs(c[3] - 1) < 1e-12);
        Assert.True(Complex.Abs(c[5] - new Complex(0, -0.5)) < 1e-12);
        Assert.True(Complex.Abs(c[4]) < 1e-12);
    }
}
