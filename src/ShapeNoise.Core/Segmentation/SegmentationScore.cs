namespace ShapeNoise.Segmentation;

/// <summary>Segmentation quality against reference labels.</summary>
/// <param name="Seg">SEG: mean over reference objects of the Jaccard index with the segmented object covering more than
/// half of it (0 when none does).</param>
/// <param name="F1">Detection F1 of one-to-one matches with Jaccard &gt; 0.5.</param>
/// <param name="Precision">Matches / segmented objects.</param>
/// <param name="Recall">Matches / reference objects.</param>
/// <param name="ReferenceObjects">Reference objects scored.</param>
/// <param name="SegmentedObjects">Segmented objects.</param>
/// <param name="Matches">Matches with Jaccard &gt; 0.5.</param>
public readonly record struct SegmentationScore(double Seg, double F1, double Precision, double Recall, int ReferenceObjects, int SegmentedObjects, int Matches)
{
    /// <summary>
    /// Scores one frame. SEG after Ulman V. et al. (2017), "An objective comparison of cell-tracking algorithms", Nature
    /// Methods 14:1141-1152: a reference object R and a segmented object S match when |R ∩ S| &gt; 0.5 |R|, then
    /// J = |R ∩ S| / |R ∪ S|; SEG is the mean J over reference objects. A match with J &gt; 0.5 is a detection (each S can
    /// match at most one R at that threshold), so precision = matches / segmented objects, recall = matches / reference objects.
    /// </summary>
    public static SegmentationScore Of(ReadOnlySpan<int> reference, ReadOnlySpan<int> segmented)
        => Pool([Accumulate(reference, segmented)]);

    /// <summary>Per-frame sums: sum of J over reference objects, counts.</summary>
    public readonly record struct Sums(double JaccardSum, int Reference, int Segmented, int Matches);

    /// <summary>Sums of one frame for <see cref="Pool"/>: with |R ∩ S| &gt; 0.5 |R| as the match rule, the sum of J = |R ∩ S| / |R ∪ S| over matched reference objects, the object counts and the matches with J &gt; 0.5. Throws <see cref="ArgumentException"/> when the images differ in size.</summary>
    public static Sums Accumulate(ReadOnlySpan<int> reference, ReadOnlySpan<int> segmented)
    {
        if (reference.Length != segmented.Length) throw new ArgumentException("images differ in size");
        var refSize = new Dictionary<int, int>(); var segSize = new Dictionary<int, int>(); var both = new Dictionary<(int, int), int>();
        for (int i = 0; i < reference.Length; i++)
        {
            int r = reference[i], s = segmented[i];
            if (r != 0) refSize[r] = refSize.GetValueOrDefault(r) + 1;
            if (s != 0) segSize[s] = segSize.GetValueOrDefault(s) + 1;
            if (r != 0 && s != 0) both[(r, s)] = both.GetValueOrDefault((r, s)) + 1;
        }
        double jSum = 0; int matches = 0;
        foreach (var ((r, s), o) in both)
        {
            if (2 * o <= refSize[r]) continue;               // S must cover more than half of R
            double j = o / (double)(refSize[r] + segSize[s] - o);
            jSum += j;
            if (j > 0.5) matches++;
        }
        return new Sums(jSum, refSize.Count, segSize.Count, matches);
    }

    /// <summary>Pools frames: SEG over all reference objects, F1 over all detections.</summary>
    public static SegmentationScore Pool(IEnumerable<Sums> frames)
    {
        double j = 0; int r = 0, s = 0, m = 0;
        foreach (var f in frames) { j += f.JaccardSum; r += f.Reference; s += f.Segmented; m += f.Matches; }
        double p = s > 0 ? m / (double)s : double.NaN, rc = r > 0 ? m / (double)r : double.NaN;
        return new SegmentationScore(r > 0 ? j / r : double.NaN, p + rc > 0 ? 2 * p * rc / (p + rc) : 0, p, rc, r, s, m);
    }
}
