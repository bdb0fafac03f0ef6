using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using ShapeNoise.Tracking;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Tracking;

/// <summary>
/// One-frame segmentation errors (docs/measures.md#one-frame-errors) injected into our own synthetic movies (recovery
/// tests): a merge gives two cells one label for one frame, a split cuts one cell along its minor axis into two labels
/// for one frame. The clean movie (and, for the ellipses, the realised truth) is the reference; errors are placed in
/// frames 1 .. T-2 and hit each cell at most once per frame.
/// </summary>
public class OneFrameErrorTests(ITestOutputHelper log)
{
    /// <summary>Labels of a frame with their pixel indices.</summary>
    private static Dictionary<int, List<int>> Pixels(int[] img)
    {
        var d = new Dictionary<int, List<int>>();
        for (int p = 0; p < img.Length; p++)
            if (img[p] != 0) { if (!d.TryGetValue(img[p], out var l)) d[img[p]] = l = []; l.Add(p); }
        return d;
    }

    /// <summary>Gives <paramref name="pairs"/> random pairs of labels one label for this frame: touching pairs (a
    /// 4-neighbour pixel of the other) when <paramref name="touching"/>, else each label with its nearest by centroid.</summary>
    private static void Merge(int[] img, int w, Random rng, int pairs, bool touching, HashSet<int> hit)
    {
        var px = Pixels(img);
        var labels = px.Keys.OrderBy(x => x).ToArray();
        var cx = labels.ToDictionary(l => l, l => px[l].Average(p => (double)(p % w)));
        var cy = labels.ToDictionary(l => l, l => px[l].Average(p => (double)(p / w)));
        var neighbours = labels.ToDictionary(l => l, _ => new HashSet<int>());
        if (touching)
            for (int p = 0; p < img.Length; p++)
            {
                int a = img[p];
                if (a == 0) continue;
                foreach (int q in new[] { p + 1, p + w })
                    if (q < img.Length && (q != p + 1 || q % w != 0) && img[q] != 0 && img[q] != a) { neighbours[a].Add(img[q]); neighbours[img[q]].Add(a); }
            }
        for (int k = 0, tries = 0; k < pairs && tries < 100 * pairs; tries++)
        {
            int a = labels[rng.Next(labels.Length)];
            if (hit.Contains(a)) continue;
            int b = touching
                ? neighbours[a].Where(x => !hit.Contains(x)).OrderBy(x => x).DefaultIfEmpty(0).ElementAt(0)
                : labels.Where(x => x != a && !hit.Contains(x)).OrderBy(x => Math.Pow(cx[x] - cx[a], 2) + Math.Pow(cy[x] - cy[a], 2)).First();
            if (b == 0) continue;
            foreach (var p in px[b]) img[p] = a;
            hit.Add(a); hit.Add(b); k++;
        }
    }

    /// <summary>Cuts <paramref name="count"/> random cells along their minor axis (the line through the centroid across
    /// the long axis of the pixels' second moments) into two labels for this frame.</summary>
    private static void Split(int[] img, int w, Random rng, int count, HashSet<int> hit, ref int nextLabel)
    {
        var px = Pixels(img);
        var labels = px.Keys.Where(l => !hit.Contains(l)).OrderBy(x => x).ToArray();
        foreach (var a in labels.OrderBy(_ => rng.Next()).Take(count))
        {
            var p = px[a];
            double mx = p.Average(i => (double)(i % w)), my = p.Average(i => (double)(i / w));
            double sxx = p.Average(i => Math.Pow(i % w - mx, 2)), syy = p.Average(i => Math.Pow(i / w - my, 2)), sxy = p.Average(i => (i % w - mx) * (i / w - my));
            double theta = 0.5 * Math.Atan2(2 * sxy, sxx - syy);   // long axis of the second-moment tensor
            int id = nextLabel++;
            foreach (var i in p)
                if ((i % w - mx) * Math.Cos(theta) + (i / w - my) * Math.Sin(theta) > 0) img[i] = id;
            hit.Add(a);
        }
    }

    /// <summary>A copy of <paramref name="frames"/> with one-frame merges and splits of the given fractions of cell-frames.</summary>
    private static List<int[]> Corrupt(List<int[]> frames, int w, double mergeFraction, double splitFraction, bool touching, int seed)
    {
        var rng = new Random(seed);
        int next = 1 << 20;
        var result = new List<int[]>();
        for (int t = 0; t < frames.Count; t++)
        {
            var img = (int[])frames[t].Clone();
            if (t > 0 && t < frames.Count - 1)
            {
                int cells = Pixels(img).Count;
                var hit = new HashSet<int>();
                Merge(img, w, rng, (int)Math.Round(mergeFraction * cells / 2), touching, hit);   // each merge takes two cells
                Split(img, w, rng, (int)Math.Round(splitFraction * cells), hit, ref next);
            }
            result.Add(img);
        }
        return result;
    }

    [Fact]
    public void Analyze_ConfluentMovieWithOneFrameMergesAndSplits_KeepsVarLAndTrackCount()
    {
        // ~300 cells, 30 frames of our own confluent tissue; 3 % of cell-frames in a merge, 3 % split.
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions { Cells = 300, Frames = 30, Seed = 5 });
        var clean = m.Frames().ToList();
        var dirty = Corrupt(clean, m.Width, 0.03, 0.03, touching: true, seed: 9);
        var o = new AnalysisOptions { BootstrapResamples = 50 };
        var a = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, clean), o);
        var b = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, dirty), o);
        var off = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, dirty), o with { MaxGapFrames = 0 });
        foreach (var (name, r) in new[] { ("clean", a), ("errors, --max-gap 2", b), ("errors, --max-gap 0", off) })
            log.WriteLine($"{name}: tracks {r.Counts.Tracks}, used {r.Counts.TracksUsed}, var_L {r.Pooled.VarL.Value:F4}, outliers {r.Counts.Outliers}, "
                + $"bridged merges {r.Counts.BridgedMerges}, splits {r.Counts.BridgedSplits}, divisions {r.Counts.Divisions}, merges {r.Counts.Merges}, fragments {r.Counts.Fragments}");
        Assert.InRange(b.Pooled.VarL.Value / a.Pooled.VarL.Value, 0.9, 1.1);
        Assert.InRange((double)b.Counts.Tracks / a.Counts.Tracks, 0.9, 1.1);
        Assert.InRange((double)b.Counts.TracksUsed / a.Counts.TracksUsed, 0.9, 1.1);
        Assert.True(b.Counts.BridgedMerges > 0 && b.Counts.BridgedSplits > 0);
        // Without bridging the same errors fragment the tracks (the failure the rule removes).
        Assert.True(off.Counts.Tracks > 1.1 * a.Counts.Tracks);
    }

    [Fact]
    public void Analyze_IsotropicEllipsesWithOneFrameMerges_KeepsTauQNearTruth()
    {
        // Isolated ellipses do not touch: a merge relabels two nearby cells as one label, which the overlap links see as
        // a merge (the label's pixels overlap both cells); its outline is its largest component.
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 40, Frames = 80, SigmaAlongPx = 0.7, SigmaAcrossPx = 0.7, TauFrames = 5, Seed = 22 });
        var clean = Enumerable.Range(0, e.Options.Frames).Select(e.RenderFrame).ToList();
        var dirty = Corrupt(clean, e.Width, 0.03, 0, touching: false, seed: 3);
        var r = MovieAnalyzer.Run(new MemoryMovie(e.Width, e.Height, dirty), new AnalysisOptions { BootstrapResamples = 100 });
        var tau = r.Dynamics.TauQFrames.Value;
        log.WriteLine($"tau_q {tau:F3} frames, realised truth {e.Truth.TauQRealisedFrames:F3}; tracks {r.Counts.Tracks}, outliers {r.Counts.Outliers}, bridged merges {r.Counts.BridgedMerges}");
        Assert.True(r.Counts.BridgedMerges > 0);
        Assert.InRange(tau / e.Truth.TauQRealisedFrames, 0.85, 1.15);
    }
}

/// <summary>The one-frame outlier rule (docs/measures.md#one-frame-errors) on hand-made series: the MAD scale is robust
/// to a single spike (Hampel 1974, JASA 69:383; Rousseeuw and Croux 1993, JASA 88:1273), so a spike that reverts stands
/// out at 4 scales, while a persistent step is a single large change that does not revert.</summary>
public class OutlierRuleTests
{
    // A smooth wiggle of amplitude 0.5 px around 20 px: frame-to-frame changes below 1 px.
    private static double[] Wiggle(int n) => [.. Enumerable.Range(0, n).Select(i => 20 + 0.5 * Math.Sin(1.3 * i))];

    [Fact]
    public void Flag_SpikeThatReverts_FlagsOnlyTheSpike()
    {
        var x = Wiggle(20);
        x[9] += 15;
        var f = OutlierRule.Flag(x, OutlierRule.MinScalePx);
        Assert.Equal([9], Enumerable.Range(0, f.Length).Where(i => f[i]));
    }

    [Fact]
    public void Flag_StepThatPersists_FlagsNothing()
    {
        var x = Wiggle(20);
        for (int i = 9; i < x.Length; i++) x[i] += 15;
        Assert.DoesNotContain(true, OutlierRule.Flag(x, OutlierRule.MinScalePx));
    }

    [Fact]
    public void Flag_SpikeWithinFourScales_IsNotFlagged()
    {
        // A spike of 2 robust scales of the changes (below the 4-scale threshold) stays in.
        var x = Wiggle(20);
        var d = x.Zip(x.Skip(1), (a, b) => b - a).ToArray();
        double s = OutlierRule.RobustScale(d);
        x[9] += 2 * s;
        Assert.DoesNotContain(true, OutlierRule.Flag(x, 0));
    }

    [Fact]
    public void RobustScale_NormalSample_IsNearItsStandardDeviation()
    {
        // 1.4826 MAD is consistent for sigma of a normal distribution (common practice); 20000 draws, sigma 3.
        var rng = new Random(4);
        var v = Enumerable.Range(0, 20000).Select(_ => 3 * MathNet.Numerics.Distributions.Normal.Sample(rng, 0, 1)).ToArray();
        Assert.InRange(OutlierRule.RobustScale(v), 2.9, 3.1);
    }
}
