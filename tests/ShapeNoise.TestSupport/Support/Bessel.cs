namespace ShapeNoise.Tests.Support;

/// <summary>Bessel functions for tests (MathNet.Numerics 5 has no J0).</summary>
public static class Bessel
{
    /// <summary>J0 by its power series sum_m (-1)^m (x/2)^(2m) / (m!)^2 (Abramowitz and Stegun 9.1.10); converges fast for x &lt; 6.</summary>
    public static double J0(double x)
    {
        double term = 1, sum = 1, q = x * x / 4;
        for (int m = 1; m < 40; m++) { term *= -q / (m * m); sum += term; }
        return sum;
    }
}
