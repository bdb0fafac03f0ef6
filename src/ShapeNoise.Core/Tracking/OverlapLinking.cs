namespace ShapeNoise.Tracking;

/// <summary>Links between the objects of two consecutive frames.</summary>
/// <param name="Predecessor">For each object of the later frame, the index of the object of the earlier frame it continues, or -1.</param>
/// <param name="Divided">For each object of the earlier frame: true if it split into two or more objects.</param>
/// <param name="Merged">For each object of the later frame: true if it formed from two or more objects.</param>
/// <param name="Successor">For each object of the earlier frame, its only significant successor, or -1 (none, or a division).</param>
public sealed record FrameLinks(int[] Predecessor, bool[] Divided, bool[] Merged, int[] Successor)
{
    /// <summary>Number of objects of the earlier frame that divided (count of true in <see cref="Divided"/>).</summary>
    public int Divisions { get { int n = 0; foreach (var d in Divided) if (d) n++; return n; } }
    /// <summary>Number of objects of the later frame that formed by merging (count of true in <see cref="Merged"/>).</summary>
    public int Merges { get { int n = 0; foreach (var m in Merged) if (m) n++; return n; } }
    /// <summary>Every significant pair (earlier object, later object), or null when the links were built without them
    /// (outline tables); the tracker needs them to bridge merges and splits that revert (docs/measures.md#one-frame-errors).</summary>
    public (int Earlier, int Later)[]? Pairs { get; init; }
}

/// <summary>One-to-one linking of label masks in consecutive frames by pixel overlap; label ids need not be stable.</summary>
/// <remarks>
/// One joint-histogram pass over the two dense label images counts the overlap o(a, b) of every pair. A pair is
/// significant when o &gt;= f * min(|a|, |b|) (f = minOverlapFraction, default 0.25). An object of the
/// earlier frame with two or more significant successors divided; an object of the later frame with two or more significant
/// predecessors is a merge; both end the tracks involved. Otherwise a and b are linked when each is the other's only
/// significant partner. Overlap-based linking as in, e.g., Aigouy B. et al. (2010), "Cell flow reorients the axis of planar
/// polarity in the wing epithelium of Drosophila", Cell 142:773-786.
/// </remarks>
public static class OverlapLinking
{
    [ThreadStatic] private static Dictionary<long, int>? _overlap;

    /// <param name="prevDense">Dense index image of the earlier frame (0 background, i+1 = object i).</param>
    /// <param name="prevCount">Pixel count per object of the earlier frame.</param>
    /// <param name="curDense">Dense index image of the later frame.</param>
    /// <param name="curCount">Pixel count per object of the later frame.</param>
    /// <param name="minOverlapFraction">f in the significance rule.</param>
    public static FrameLinks Link(ReadOnlySpan<int> prevDense, ReadOnlySpan<int> prevCount,
        ReadOnlySpan<int> curDense, ReadOnlySpan<int> curCount, double minOverlapFraction = 0.25)
    {
        if (prevDense.Length != curDense.Length) throw new ArgumentException("frames differ in size");
        int np = prevCount.Length, nc = curCount.Length;
        // One dictionary per thread, cleared and reused frame after frame (its arrays are large-object-heap sized); the
        // result does not depend on its order (the pairs are sorted, the counts are sums).
        var overlap = _overlap ??= new Dictionary<long, int>();
        overlap.Clear();
        long lastKey = -1; int run = 0;
        for (int i = 0; i < prevDense.Length; i++)
        {
            int a = prevDense[i], b = curDense[i];
            if (a == 0 || b == 0) continue;
            long key = (long)(a - 1) * nc + (b - 1);
            if (key == lastKey) { run++; continue; }
            if (lastKey >= 0) overlap[lastKey] = overlap.GetValueOrDefault(lastKey) + run;
            lastKey = key; run = 1;
        }
        if (lastKey >= 0) overlap[lastKey] = overlap.GetValueOrDefault(lastKey) + run;

        var succCount = new int[np]; var succOf = new int[np];
        var predCount = new int[nc]; var predOf = new int[nc];
        var pairs = new List<(int, int)>();
        foreach (var (key, o) in overlap)
        {
            int a = (int)(key / nc), b = (int)(key % nc);
            if (o < minOverlapFraction * Math.Min(prevCount[a], curCount[b])) continue;
            pairs.Add((a, b));
            succCount[a]++; succOf[a] = b;
            predCount[b]++; predOf[b] = a;
        }
        var pred = new int[nc];
        var divided = new bool[np];
        var merged = new bool[nc];
        var succ = new int[np];
        for (int a = 0; a < np; a++) { divided[a] = succCount[a] >= 2; succ[a] = succCount[a] == 1 ? succOf[a] : -1; }
        for (int b = 0; b < nc; b++)
        {
            merged[b] = predCount[b] >= 2;
            pred[b] = -1;
            if (predCount[b] == 1)
            {
                int a = predOf[b];
                if (succCount[a] == 1 && succOf[a] == b) pred[b] = a;
            }
        }
        pairs.Sort();
        return new FrameLinks(pred, divided, merged, succ) { Pairs = [.. pairs] };
    }
}
