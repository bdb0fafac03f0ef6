using OpenCvSharp;

namespace ShapeNoise.Imaging.Segmentation;

/// <summary>Options of the junction-marker segmentation; lengths derive from the expected cell diameter.</summary>
public sealed record SegmentOptions
{
    /// <summary>Expected cell diameter (um; px when the pixel size is unknown).</summary>
    public double CellDiameterUm { get; init; } = 10;
    /// <summary>Pixel size (um/px) used to convert the diameter; 1 when unknown.</summary>
    public double PixelSizeUm { get; init; } = 1;
    /// <summary>Background flattening: the image is divided by its Gaussian blur of this many cell diameters.</summary>
    public double FlattenDiameters { get; init; } = 2;
    /// <summary>Smoothing sigma as a fraction of the diameter.</summary>
    public double SmoothFraction { get; init; } = 0.1;
    /// <summary>Seeds: regional minima of the smoothed signal over a window of this fraction of the diameter
    /// (0.9 tuned on rendered monolayers of aspect-2 cells at SNR 8: one seed per cell).</summary>
    public double SeedWindowFraction { get; init; } = 0.9;
    /// <summary>Smoothing (px) of the image the flood runs on: about the point-spread width.</summary>
    public double BoundarySigmaPx { get; init; } = 0.6;
    /// <summary>Regions smaller than this fraction of the expected cell area are merged into a neighbour.</summary>
    public double MinAreaFraction { get; init; } = 0.15;

    /// <summary>Regions larger than this many expected cell areas are not cells (background, failed splits) and are dropped.</summary>
    public double MaxAreaFactor { get; init; } = 6;

    /// <summary>Expected cell diameter in pixels: CellDiameterUm / PixelSizeUm.</summary>
    public double DiameterPx => CellDiameterUm / PixelSizeUm;

    /// <summary>Returns these options unchanged when every value is in range; throws <see cref="ArgumentException"/> naming the option otherwise.</summary>
    public SegmentOptions Validated()
    {
        if (!(CellDiameterUm > 0)) throw new ArgumentException($"--cell-diameter must be > 0 (got {CellDiameterUm})");
        if (!(DiameterPx >= 4)) throw new ArgumentException($"--cell-diameter is {DiameterPx:F1} px; cells must be at least 4 px across");
        if (!(FlattenDiameters > 0) || !(SmoothFraction > 0) || !(SeedWindowFraction > 0) || !(BoundarySigmaPx > 0))
            throw new ArgumentException("--flatten, --smooth, --seed-window and --boundary-sigma must be > 0");
        if (MinAreaFraction < 0 || !(MaxAreaFactor > 1)) throw new ArgumentException("--min-area-fraction must be >= 0 and --max-area-factor > 1");
        return this;
    }
}

/// <summary>
/// Segments one frame of a junction or membrane marker into cells with OpenCV: flatten the background (divide by a wide
/// Gaussian blur), smooth, take seeds from the regional minima of the signal (cell interiors are dark) within a window of
/// half a cell diameter, grow them by marker-controlled watershed, give watershed lines to a neighbouring cell, merge
/// fragments below a minimum area, drop regions too large to be a cell, and relabel 1..N.
/// </summary>
/// <remarks>Marker-controlled watershed: Beucher S. and Meyer F. (1993), "The morphological approach to segmentation:
/// the watershed transformation", in Mathematical Morphology in Image Processing, Marcel Dekker, 433-481; flooding by
/// level as in Meyer F. (1991), "Un algorithme optimal de ligne de partage des eaux", Proc. 8e Congrès AFCET, 847-857.
/// OpenCV does the background flattening, smoothing, minimum filter and seed components.</remarks>
public static class JunctionSegmenter
{
    /// <summary>Segments the row-major intensity frame <paramref name="raw"/> (<paramref name="width"/> x <paramref name="height"/>) and returns its labels, row-major, 0 = no cell, cells numbered 1..N.</summary>
    public static int[] Segment(int[] raw, int width, int height, SegmentOptions o, int[]? previous = null)
    {
        double d = o.DiameterPx;
        using var img = new Mat(height, width, MatType.CV_32FC1);
        var f = new float[raw.Length];
        for (int i = 0; i < raw.Length; i++) f[i] = raw[i];
        System.Runtime.InteropServices.Marshal.Copy(f, 0, img.Data, f.Length);
        // Flatten: divide by the wide blur (uneven illumination and bleaching are multiplicative).
        using var wide = new Mat();
        Cv2.GaussianBlur(img, wide, new Size(0, 0), o.FlattenDiameters * d);
        using var flat = new Mat();
        Cv2.Divide(img, wide, flat);
        using var smooth = new Mat();
        Cv2.GaussianBlur(flat, smooth, new Size(0, 0), Math.Max(0.5, o.SmoothFraction * d));
        // Seeds: pixels equal to the minimum over a (half-diameter) window, below the median level, grouped into components.
        int win = Math.Max(3, (int)Math.Round(o.SeedWindowFraction * d)) | 1;
        using var kernel = Cv2.GetStructuringElement(MorphShapes.Ellipse, new Size(win, win));
        using var eroded = new Mat();
        Cv2.Erode(smooth, eroded, kernel);
        var sm = new float[raw.Length]; var er = new float[raw.Length];
        System.Runtime.InteropServices.Marshal.Copy(smooth.Data, sm, 0, sm.Length);
        System.Runtime.InteropServices.Marshal.Copy(eroded.Data, er, 0, er.Length);
        var sorted = (float[])sm.Clone(); Array.Sort(sorted);
        float median = sorted[sorted.Length / 2];
        using var seedMask = new Mat(height, width, MatType.CV_8UC1, Scalar.All(0));
        var seedBytes = new byte[raw.Length];
        for (int i = 0; i < sm.Length; i++) if (sm[i] <= er[i] && sm[i] < median) seedBytes[i] = 255;
        System.Runtime.InteropServices.Marshal.Copy(seedBytes, 0, seedMask.Data, seedBytes.Length);
        using var markers = new Mat();
        int n = Cv2.ConnectedComponents(seedMask, markers, PixelConnectivity.Connectivity8, MatType.CV_32S);
        var labels = new int[raw.Length];
        System.Runtime.InteropServices.Marshal.Copy(markers.Data, labels, 0, labels.Length);
        // Flood by intensity (Meyer's priority flood) on a lightly smoothed image, so boundaries follow the junction
        // ridges closely (the heavier smoothing above only serves to find one seed per cell). OpenCV's cv::watershed grows
        // regions by colour similarity between neighbours, which lets one region run along the bright ridges; flooding
        // by level does not.
        using var fine = new Mat();
        Cv2.GaussianBlur(flat, fine, new Size(0, 0), o.BoundarySigmaPx);
        var level = new float[raw.Length];
        System.Runtime.InteropServices.Marshal.Copy(fine.Data, level, 0, level.Length);
        Flood(level, labels, width, height);
        MergeSmall(labels, width, height, (int)(o.MinAreaFraction * Math.PI * d * d / 4));
        DropLarge(labels, o.MaxAreaFactor * Math.PI * d * d / 4);
        return Relabel(labels);
    }

    /// <summary>
    /// Marker-controlled watershed by flooding (Meyer 1991): every unlabelled pixel joins the labelled region from which
    /// the flood reaches it first, pixels being taken in increasing order of <paramref name="level"/>.
    /// </summary>
    public static void Flood(float[] level, int[] labels, int w, int h)
    {
        var queue = new PriorityQueue<int, (float, long)>();
        long order = 0;
        var queued = new bool[labels.Length];
        void Push(int p) { if (!queued[p] && labels[p] == 0) { queued[p] = true; queue.Enqueue(p, (level[p], order++)); } }
        for (int p = 0; p < labels.Length; p++)
        {
            if (labels[p] <= 0) continue;
            int x = p % w;
            if (x > 0) Push(p - 1);
            if (x < w - 1) Push(p + 1);
            if (p >= w) Push(p - w);
            if (p + w < labels.Length) Push(p + w);
        }
        while (queue.TryDequeue(out int p, out _))
        {
            int x = p % w, lab = 0;
            // Take the label of a labelled 4-neighbour (the first found; the flood order decides the boundaries).
            if (x > 0 && labels[p - 1] > 0) lab = labels[p - 1];
            else if (x < w - 1 && labels[p + 1] > 0) lab = labels[p + 1];
            else if (p >= w && labels[p - w] > 0) lab = labels[p - w];
            else if (p + w < labels.Length && labels[p + w] > 0) lab = labels[p + w];
            labels[p] = lab;
            if (x > 0) Push(p - 1);
            if (x < w - 1) Push(p + 1);
            if (p >= w) Push(p - w);
            if (p + w < labels.Length) Push(p + w);
        }
    }

    /// <summary>Regions below <paramref name="minArea"/> px join the neighbour they share the longest border with.</summary>
    private static void MergeSmall(int[] l, int w, int h, int minArea)
    {
        var area = new Dictionary<int, int>();
        foreach (var v in l) if (v > 0) area[v] = area.GetValueOrDefault(v) + 1;
        var small = area.Where(kv => kv.Value < minArea).Select(kv => kv.Key).ToHashSet();
        if (small.Count == 0) return;
        var border = new Dictionary<(int, int), int>();
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int a = l[y * w + x];
                if (!small.Contains(a)) continue;
                if (x + 1 < w && l[y * w + x + 1] != a && l[y * w + x + 1] > 0) border[(a, l[y * w + x + 1])] = border.GetValueOrDefault((a, l[y * w + x + 1])) + 1;
                if (y + 1 < h && l[(y + 1) * w + x] != a && l[(y + 1) * w + x] > 0) border[(a, l[(y + 1) * w + x])] = border.GetValueOrDefault((a, l[(y + 1) * w + x])) + 1;
                if (x > 0 && l[y * w + x - 1] != a && l[y * w + x - 1] > 0) border[(a, l[y * w + x - 1])] = border.GetValueOrDefault((a, l[y * w + x - 1])) + 1;
                if (y > 0 && l[(y - 1) * w + x] != a && l[(y - 1) * w + x] > 0) border[(a, l[(y - 1) * w + x])] = border.GetValueOrDefault((a, l[(y - 1) * w + x])) + 1;
            }
        var target = border.GroupBy(kv => kv.Key.Item1).ToDictionary(g => g.Key, g => g.OrderByDescending(kv => kv.Value).ThenBy(kv => kv.Key.Item2).First().Key.Item2);
        for (int i = 0; i < l.Length; i++) if (small.Contains(l[i]) && target.TryGetValue(l[i], out var t)) l[i] = t;
    }

    /// <summary>Regions larger than <paramref name="maxArea"/> px are not cells: set to background.</summary>
    private static void DropLarge(int[] l, double maxArea)
    {
        var area = new Dictionary<int, int>();
        foreach (var v in l) if (v > 0) area[v] = area.GetValueOrDefault(v) + 1;
        var drop = area.Where(kv => kv.Value > maxArea).Select(kv => kv.Key).ToHashSet();
        if (drop.Count == 0) return;
        for (int i = 0; i < l.Length; i++) if (drop.Contains(l[i])) l[i] = 0;
    }

    private static int[] Relabel(int[] l)
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
