namespace ShapeNoise;

/// <summary>Element-wise kernels on spans shared by the stages.</summary>
internal static class SpanMath
{
    /// <summary>dst[x] += c src[x]: a multiply then an add per element, <see cref="System.Numerics.Vector{T}"/>-wide and
    /// not fused, so every element is rounded as in the scalar loop (callers rely on bit-identical sums; bench/README.md).</summary>
    public static void AddScaled(Span<double> dst, ReadOnlySpan<double> src, double c)
    {
        int x = 0;
        if (System.Numerics.Vector.IsHardwareAccelerated)
        {
            int w = System.Numerics.Vector<double>.Count;
            var cv = new System.Numerics.Vector<double>(c);
            for (; x <= dst.Length - w; x += w)
                (new System.Numerics.Vector<double>(dst[x..]) + cv * new System.Numerics.Vector<double>(src[x..])).CopyTo(dst[x..]);
        }
        for (; x < dst.Length; x++) dst[x] += c * src[x];
    }
}
