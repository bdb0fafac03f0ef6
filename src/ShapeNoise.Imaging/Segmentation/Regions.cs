namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Region clean-up of the junction segmentation: merging across ridgeless boundaries, fragments, oversized
/// regions, ridge-following boundary placement (docs/segmentation.md#method).</summary>
public static class Regions
{
    /// <summary>
    /// Merges neighbouring regions whose shared boundary carries no ridge: contrast = mean of <paramref name="level"/>
    /// over the boundary's pixel pairs − the higher of the two regions' interior levels (10th percentile of the region:
    /// the junction band on its rim, up to most of a small cell, stays out); pairs with contrast below
    /// <paramref name="minContrast"/> are merged, weakest first (union-find, statistics of the original regions).
    /// Returns the number of merges.
    /// </summary>
    /// <remarks>Region merging by boundary strength after a watershed: Beucher S. (1994), "Watershed, hierarchical
    /// segmentation and waterfall algorithm", in Mathematical Morphology and its Applications to Image Processing,
    /// Kluwer, 69-76; Haris K. et al. (1998), IEEE Trans. Image Processing 7:1684-1699.</remarks>
    public static int MergeRidgeless(int[] labels, float[] level, int w, int h, double minContrast)
    {
        int max = 0;
        foreach (var l in labels) if (l > max) max = l;
        if (max < 2) return 0;
        var median = RegionLowLevels(labels, level, max);
        var sum = new Dictionary<long, (double S, int N)>();
        void Add(int a, int b, double v)
        {
            long key = a < b ? (long)a << 32 | (uint)b : (long)b << 32 | (uint)a;
            var c = sum.GetValueOrDefault(key);
            sum[key] = (c.S + v, c.N + 1);
        }
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x, a = labels[i];
                if (a <= 0) continue;
                if (x + 1 < w && labels[i + 1] > 0 && labels[i + 1] != a) Add(a, labels[i + 1], 0.5 * (level[i] + level[i + 1]));
                if (y + 1 < h && labels[i + w] > 0 && labels[i + w] != a) Add(a, labels[i + w], 0.5 * (level[i] + level[i + w]));
            }
        var weak = new List<(double C, int A, int B)>();
        foreach (var (key, (s, n)) in sum)
        {
            int a = (int)(key >> 32), b = (int)(key & 0xffffffff);
            double c = s / n - Math.Max(median[a], median[b]);
            if (c < minContrast) weak.Add((c, a, b));
        }
        if (weak.Count == 0) return 0;
        weak.Sort();
        var parent = new int[max + 1];
        for (int i = 0; i <= max; i++) parent[i] = i;
        int merges = 0;
        foreach (var (_, a, b) in weak)
        {
            int ra = Find(parent, a), rb = Find(parent, b);
            if (ra == rb) continue;
            parent[Math.Max(ra, rb)] = Math.Min(ra, rb);
            merges++;
        }
        for (int i = 0; i < labels.Length; i++) if (labels[i] > 0) labels[i] = Find(parent, labels[i]);
        return merges;
    }

    private static int Find(int[] parent, int i)
    {
        while (parent[i] != i) { parent[i] = parent[parent[i]]; i = parent[i]; }
        return i;
    }

    private static double[] RegionLowLevels(int[] labels, float[] level, int max)
    {
        var count = new int[max + 2];
        foreach (var l in labels) if (l > 0) count[l + 1]++;
        for (int i = 1; i < count.Length; i++) count[i] += count[i - 1];
        var start = (int[])count.Clone();
        var vals = new float[count[^1]];
        for (int i = 0; i < labels.Length; i++) if (labels[i] > 0) vals[start[labels[i]]++] = level[i];
        var med = new double[max + 1];
        for (int l = 1; l <= max; l++)
        {
            int lo = count[l], n = count[l + 1] - lo;
            if (n == 0) continue;
            Array.Sort(vals, lo, n);
            med[l] = vals[lo + n / 10];
        }
        return med;
    }

    /// <summary>
    /// Places boundaries on the ridge of <paramref name="level"/>: a pixel p of region A whose 4-neighbour p + d lies in
    /// region B, with p − d in A, moves to B when the signal falls monotonically towards B across p, S(p − d) &gt; S(p) &gt; S(p + d) (the ridge maximum,
    /// where the derivative across the boundary changes sign, lies behind p's centre); of several such neighbours the
    /// steepest fall wins; moves apply at once, in row order (a simultaneous update lets two pixels swap), and a pixel moves at most once. Repeated up to <paramref name="passes"/> times or until nothing moves. Returns the moves.
    /// </summary>
    /// <remarks>The boundary is the crest line of the smoothed junction signal, located at the zero crossing of its first
    /// derivative across the junction (Steger C. (1998), "An unbiased detector of curvilinear structures", IEEE Trans.
    /// PAMI 20:113-125); pixel centres on either side of the crest belong to the cells on either side.</remarks>
    public static int PlaceOnRidges(int[] labels, float[] level, int w, int h, int passes)
    {
        int moved = 0;
        var done = new bool[labels.Length];
        for (int pass = 0; pass < passes; pass++)
        {
            int m = 0;
            for (int y = 1; y < h - 1; y++)
                for (int x = 1; x < w - 1; x++)
                {
                    int i = y * w + x, a = labels[i];
                    if (a <= 0 || done[i]) continue;
                    double best = 0; int to = a;
                    Check(i + 1, i - 1); Check(i - 1, i + 1); Check(i + w, i - w); Check(i - w, i + w);
                    if (to != a) { labels[i] = to; done[i] = true; m++; }

                    void Check(int q, int back)
                    {
                        int b = labels[q];
                        if (b <= 0 || b == a || labels[back] != a) return;
                        // Only when p lies on the flank, not on the crest: S(p − d) > S(p) > S(p + d).
                        if (!(level[back] > level[i] && level[i] > level[q])) return;
                        double fall = level[q] - level[back];
                        if (fall < best) { best = fall; to = b; }
                    }
                }
            moved += m;
            if (m == 0) break;
        }
        return moved;
    }

    /// <summary>Regions below <paramref name="minArea"/> px join the neighbour they share the longest border with. Returns the merges.</summary>
    public static int MergeSmall(int[] l, int w, int h, int minArea)
    {
        var area = new Dictionary<int, int>();
        foreach (var v in l) if (v > 0) area[v] = area.GetValueOrDefault(v) + 1;
        var small = new HashSet<int>();
        foreach (var (k, v) in area) if (v < minArea) small.Add(k);
        if (small.Count == 0) return 0;
        var border = new Dictionary<(int, int), int>();
        void Count(int a, int b) { if (b > 0 && b != a) border[(a, b)] = border.GetValueOrDefault((a, b)) + 1; }
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x, a = l[i];
                if (!small.Contains(a)) continue;
                if (x + 1 < w) Count(a, l[i + 1]);
                if (y + 1 < h) Count(a, l[i + w]);
                if (x > 0) Count(a, l[i - 1]);
                if (y > 0) Count(a, l[i - w]);
            }
        var target = new Dictionary<int, (int To, int N)>();
        foreach (var ((a, b), n) in border)
            if (!target.TryGetValue(a, out var t) || n > t.N || (n == t.N && b < t.To)) target[a] = (b, n);
        for (int i = 0; i < l.Length; i++) if (small.Contains(l[i]) && target.TryGetValue(l[i], out var t)) l[i] = t.To;
        return target.Count;
    }

    /// <summary>Every cell keeps only its largest 4-connected piece (the first found on a tie); the pixels of its other
    /// pieces take, in repeated passes, the most common label among their 4-neighbours outside such pieces (a cell or
    /// background; the lowest label on a tie). Returns the pixels relabelled.</summary>
    public static int KeepLargestPieces(int[] l, int w, int h)
    {
        int n = l.Length;
        var piece = new int[n];            // 4-connected component id + 1
        var size = new List<int> { 0 };
        var stack = new Stack<int>();
        for (int s = 0; s < n; s++)
        {
            if (l[s] <= 0 || piece[s] != 0) continue;
            int id = size.Count, count = 0;
            piece[s] = id; stack.Push(s);
            while (stack.Count > 0)
            {
                int i = stack.Pop(), x = i % w;
                count++;
                if (x > 0) Visit(i - 1); if (x + 1 < w) Visit(i + 1); if (i >= w) Visit(i - w); if (i + w < n) Visit(i + w);
                void Visit(int j) { if (piece[j] == 0 && l[j] == l[s]) { piece[j] = id; stack.Push(j); } }
            }
            size.Add(count);
        }
        var largest = new Dictionary<int, int>();   // label -> its largest piece
        for (int i = 0; i < n; i++)
            if (l[i] > 0 && (!largest.TryGetValue(l[i], out var p) || size[piece[i]] > size[p])) largest[l[i]] = piece[i];
        var stray = new List<int>();
        for (int i = 0; i < n; i++) if (l[i] > 0 && largest[l[i]] != piece[i]) stray.Add(i);
        int moved = stray.Count;
        var isStray = new bool[n];
        foreach (var i in stray) isStray[i] = true;
        Span<int> nb = stackalloc int[4];
        while (stray.Count > 0)
        {
            var next = new List<int>();
            var assign = new List<(int I, int L)>();
            foreach (var i in stray)
            {
                int x = i % w, k = 0;
                if (x > 0 && !isStray[i - 1]) nb[k++] = l[i - 1];
                if (x + 1 < w && !isStray[i + 1]) nb[k++] = l[i + 1];
                if (i >= w && !isStray[i - w]) nb[k++] = l[i - w];
                if (i + w < n && !isStray[i + w]) nb[k++] = l[i + w];
                if (k == 0) { next.Add(i); continue; }
                int best = nb[0], bestN = 0;
                for (int a = 0; a < k; a++)
                {
                    int c = 0;
                    for (int b = 0; b < k; b++) if (nb[b] == nb[a]) c++;
                    if (c > bestN || (c == bestN && nb[a] < best)) { best = nb[a]; bestN = c; }
                }
                assign.Add((i, best));
            }
            if (assign.Count == 0) break;   // cannot happen: a stray piece always touches something else
            foreach (var (i, lb) in assign) { l[i] = lb; isStray[i] = false; }
            stray = next;
        }
        return moved;
    }

    /// <summary>Regions larger than <paramref name="maxArea"/> px are not cells: set to background.</summary>
    public static void DropLarge(int[] l, double maxArea)
    {
        var area = new Dictionary<int, int>();
        foreach (var v in l) if (v > 0) area[v] = area.GetValueOrDefault(v) + 1;
        var drop = new HashSet<int>();
        foreach (var (k, v) in area) if (v > maxArea) drop.Add(k);
        if (drop.Count == 0) return;
        for (int i = 0; i < l.Length; i++) if (drop.Contains(l[i])) l[i] = 0;
    }

    /// <summary>Labels renumbered 1..N in order of first appearance (row-major).</summary>
    public static int[] Relabel(int[] l)
    {
        var map = new Dictionary<int, int>();
        var r = new int[l.Length];
        for (int i = 0; i < l.Length; i++)
        {
            if (l[i] <= 0) continue;
            if (!map.TryGetValue(l[i], out var v)) map[l[i]] = v = map.Count + 1;
            r[i] = v;
        }
        return r;
    }
}
