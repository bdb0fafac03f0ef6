namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Seeds and flooding of the junction segmentation (docs/segmentation.md#method).</summary>
public static class Watershed
{
    /// <summary>
    /// h-minima seeds: the regional minima of <paramref name="level"/> whose dynamic (the rise from the minimum to the
    /// lowest pass over which the flood reaches a deeper minimum) is at least <paramref name="depth"/>, plus the global
    /// minimum. Computed by flooding pixels in increasing order with a union-find over 8-connected basins: when two
    /// basins meet at level v, the shallower one (higher minimum m) is a seed when v − m ≥ depth. Returns the pixel of
    /// each seed's minimum.
    /// </summary>
    /// <remarks>Dynamics of minima: Grimaud M. (1992), "A new measure of contrast: the dynamics", Proc. SPIE 1769:292-305;
    /// h-minima as seeds of a marker-controlled watershed: Soille P. (2003), Morphological Image Analysis, 2nd ed.,
    /// Springer, ch. 6 and 9.</remarks>
    public static List<int> HMinima(float[] level, int w, int h, double depth, bool[]? allowed = null)
    {
        int n = level.Length;
        var order = new int[n];
        for (int i = 0; i < n; i++) order[i] = i;
        var keys = (float[])level.Clone();
        Array.Sort(keys, order);
        var parent = new int[n]; var minPix = new int[n];
        var done = new bool[n];
        var seeds = new List<int>();
        for (int i = 0; i < n; i++) parent[i] = -1;
        foreach (int p in order)
        {
            parent[p] = p; minPix[p] = p; done[p] = true;
            int x = p % w, y = p / w;
            for (int dy = -1; dy <= 1; dy++)
                for (int dx = -1; dx <= 1; dx++)
                {
                    if (dx == 0 && dy == 0) continue;
                    int xx = x + dx, yy = y + dy;
                    if (xx < 0 || yy < 0 || xx >= w || yy >= h) continue;
                    int q = yy * w + xx;
                    if (!done[q]) continue;
                    int a = Find(parent, p), b = Find(parent, q);
                    if (a == b) continue;
                    // a: the deeper basin keeps its minimum; b: the shallower one ends here with dynamic level[p] - min.
                    if (level[minPix[b]] < level[minPix[a]] || (level[minPix[b]] == level[minPix[a]] && minPix[b] < minPix[a])) (a, b) = (b, a);
                    if (level[p] - level[minPix[b]] >= depth && (allowed is null || allowed[minPix[b]])) seeds.Add(minPix[b]);
                    parent[b] = a;
                }
        }
        int root = Find(parent, order[0]);
        if (allowed is null || allowed[minPix[root]]) seeds.Add(minPix[root]);
        return seeds;
    }

    private static int Find(int[] parent, int i)
    {
        while (parent[i] != i) { parent[i] = parent[parent[i]]; i = parent[i]; }
        return i;
    }

    /// <summary>
    /// Marker-controlled watershed by flooding (Meyer 1991): every unlabelled pixel joins the labelled region from which
    /// the flood reaches it first, pixels being taken in increasing order of <paramref name="level"/>; a pixel reached
    /// from several regions takes the one whose neighbouring pixel is lowest.
    /// </summary>
    /// <remarks>Meyer F. (1991), "Un algorithme optimal de ligne de partage des eaux", Proc. 8e Congrès AFCET, 847-857;
    /// Beucher S. and Meyer F. (1993), in Mathematical Morphology in Image Processing, Marcel Dekker, 433-481.</remarks>
    public static void Flood(float[] level, int[] labels, int w, int h)
    {
        var queue = new PriorityQueue<int, (float, long)>();
        long order = 0;
        var queued = new bool[labels.Length];
        void Push(int p) { if (!queued[p] && labels[p] == 0) { queued[p] = true; queue.Enqueue(p, (level[p], order++)); } }
        void PushAround(int p)
        {
            int x = p % w;
            if (x > 0) Push(p - 1);
            if (x < w - 1) Push(p + 1);
            if (p >= w) Push(p - w);
            if (p + w < labels.Length) Push(p + w);
        }
        for (int p = 0; p < labels.Length; p++) if (labels[p] > 0) PushAround(p);
        while (queue.TryDequeue(out int p, out _))
        {
            int x = p % w, lab = 0; float best = float.MaxValue;
            void Take(int q) { if (labels[q] > 0 && level[q] < best) { best = level[q]; lab = labels[q]; } }
            if (x > 0) Take(p - 1);
            if (x < w - 1) Take(p + 1);
            if (p >= w) Take(p - w);
            if (p + w < labels.Length) Take(p + w);
            labels[p] = lab;
            PushAround(p);
        }
    }
}
