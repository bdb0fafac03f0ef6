namespace ShapeNoise;

/// <summary>The bit-reversal permutation of the radix-2 transforms (<see cref="Shape.FourierModes.Radix2"/>,
/// <see cref="Motion.Radix2Fft"/>): index i of a length-2^bits transform goes to the index with its bits reversed.</summary>
internal static class BitReversal
{
    /// <summary>The low <paramref name="bits"/> bits of <paramref name="i"/> in reverse order (0 when bits is 0).</summary>
    public static int Of(int i, int bits) => bits == 0 ? 0 : (int)(Reverse32((uint)i) >> (32 - bits));

    private static uint Reverse32(uint v)
    {
        v = ((v >> 1) & 0x55555555u) | ((v & 0x55555555u) << 1);
        v = ((v >> 2) & 0x33333333u) | ((v & 0x33333333u) << 2);
        v = ((v >> 4) & 0x0F0F0F0Fu) | ((v & 0x0F0F0F0Fu) << 4);
        v = ((v >> 8) & 0x00FF00FFu) | ((v & 0x00FF00FFu) << 8);
        return (v >> 16) | (v << 16);
    }
}
