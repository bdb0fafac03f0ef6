using ShapeNoise.Fluctuations;
using ShapeNoise.Outlines;
using ShapeNoise.Shape;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Tracking;

/// <summary>The tracker frame by frame, without the pipeline. The expected tracks follow from the project's spec,
/// docs/measures.md#track-definitions and docs/measures.md#3-tracking: a track ends at a division, a merge, the border,
/// too small, or a gap longer than --max-gap (Lost); with --max-gap G a lost track resumes at a new outline within its
/// radius sqrt(area/pi) of its last centroid. The links are written by hand as the overlap rule would give them
/// (the linking itself is checked in OverlapLinkingTests; the assignment against brute force in AssignmentTests).</summary>
public class TrackerTests
{
    private const int Rays = 32;

    /// <summary>A 10 x 6 px (semi-axes) ellipse as a 48-gon about (cx, cy): area ~ 188 px^2, radius sqrt(area/pi) ~ 7.7 px.</summary>
    private static Outline Ellipse(int label, double cx, double cy, OutlineStatus status = OutlineStatus.Ok)
    {
        var v = new Point2[48];
        for (int k = 0; k < v.Length; k++)
        {
            double t = 2 * Math.PI * k / v.Length;
            v[k] = new Point2(cx + 10 * Math.Cos(t), cy + 6 * Math.Sin(t));
        }
        return new Outline(label, status, v, 188);
    }

    private static OutlineShape?[] Shapes(Outline[] o)
        => [.. o.Select(x => x.Status == OutlineStatus.Ok ? OutlineShape.Of(x.Vertices, Rays) : null)];

    /// <summary>Links where object a of the earlier frame continues object pairs[a] of the later one (-1: none).</summary>
    private static FrameLinks OneToOne(int laterCount, params int[] successor)
    {
        var pred = Enumerable.Repeat(-1, laterCount).ToArray();
        for (int a = 0; a < successor.Length; a++) if (successor[a] >= 0) pred[successor[a]] = a;
        return new FrameLinks(pred, new bool[successor.Length], new bool[laterCount], successor);
    }

    private static Placement[] Step(Tracker t, int frame, Outline[] o, FrameLinks? links) => t.Step(frame, o, Shapes(o), links);

    /// <summary>Two cells A (left) and B (right); A is missing from the frames in <paramref name="missing"/> and
    /// comes back 1 px further right. Returns every finished track by id.</summary>
    private static Dictionary<int, FinishedTrack> DropOut(int maxGap, int frames, params int[] missing)
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: maxGap, minTrackFrames: 3));
        var done = new List<FinishedTrack>();
        bool prevHadA = false;
        for (int f = 0; f < frames; f++)
        {
            bool hasA = !missing.Contains(f);
            var o = hasA ? new[] { Ellipse(1, 30 + (f > 1 ? 1 : 0), 30), Ellipse(2, 80, 30) } : new[] { Ellipse(2, 80, 30) };
            FrameLinks? links = f == 0 ? null
                : prevHadA && hasA ? OneToOne(2, 0, 1) : prevHadA ? OneToOne(1, -1, 0) : hasA ? OneToOne(2, 1) : OneToOne(1, 0);
            Step(tracker, f, o, links);
            done.AddRange(tracker.TakeFinished());
            prevHadA = hasA;
        }
        tracker.Finish();
        done.AddRange(tracker.TakeFinished());
        return done.ToDictionary(t => t.Id);
    }

    [Fact]
    public void Step_OneFrameDropOutWithinMaxGap_ResumesTheSameTrack()
    {
        var tracks = DropOut(maxGap: 1, frames: 6, missing: 2);
        Assert.Equal(2, tracks.Count);                                   // A and B, nothing else
        Assert.Equal([0, 1, 3, 4, 5], tracks[1].FrameIndex);             // A's track skips frame 2
        Assert.Equal(TrackEnd.MovieEnd, tracks[1].End);
        Assert.Equal(TrackEnd.MovieEnd, tracks[2].End);
        Assert.Equal(5 * Rays, tracks[1].BodyFrameRadiiPx.Length);       // n x M radii handed over with the track
    }

    [Fact]
    public void Step_DropOutLongerThanMaxGap_EndsLostAndStartsANewTrack()
    {
        var tracks = DropOut(maxGap: 1, frames: 7, missing: [2, 3]);
        Assert.Equal(3, tracks.Count);
        Assert.Equal([0, 1], tracks[1].FrameIndex);
        Assert.Equal(TrackEnd.Lost, tracks[1].End);
        Assert.Equal([4, 5, 6], tracks[3].FrameIndex);                   // A again, as a new track
        Assert.Equal([0, 1, 2, 3, 4, 5, 6], tracks[2].FrameIndex);       // B untouched
    }

    [Fact]
    public void Step_DropOutWithoutMaxGap_EndsLostAtOnce()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 0));
        Step(tracker, 0, [Ellipse(1, 30, 30), Ellipse(2, 80, 30)], null);
        Step(tracker, 1, [Ellipse(2, 80, 30)], OneToOne(1, -1, 0));
        var ended = Assert.Single(tracker.TakeFinished());
        Assert.Equal((1, TrackEnd.Lost), (ended.Id, ended.End));
    }

    [Fact]
    public void Step_NewOutlineOutsideTheTrackRadius_DoesNotResume()
    {
        // The lost cell's radius is ~7.7 px; an outline 20 px away is another cell.
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2));
        Step(tracker, 0, [Ellipse(1, 30, 30)], null);
        Step(tracker, 1, [], OneToOne(0, -1));
        var placed = Step(tracker, 2, [Ellipse(1, 50, 30)], null);
        Assert.Equal(2, placed[0].TrackId);
    }

    [Fact]
    public void Step_FrameMissingFromTheMovie_EndsTheEarlierTracksLost()
    {
        // Frames 0, 1, then 3 (frame 2 absent, as in an outline table that skips it): no links into frame 3, so the
        // tracks of frames 0-1 end Lost (docs/measures.md#track-definitions: a gap longer than --max-gap 0 ends a track),
        // not MovieEnd, and frame 3's cell starts a new track.
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 0, minTrackFrames: 3));
        var done = new List<FinishedTrack>();
        Step(tracker, 0, [Ellipse(1, 30, 30)], null);
        Step(tracker, 1, [Ellipse(1, 30, 30)], OneToOne(1, 0));
        Step(tracker, 3, [Ellipse(1, 30, 30)], null);
        done.AddRange(tracker.TakeFinished());
        tracker.Finish();
        done.AddRange(tracker.TakeFinished());
        Assert.Equal(2, done.Count);
        Assert.Equal([0, 1], done[0].FrameIndex);
        Assert.Equal(TrackEnd.Lost, done[0].End);
        Assert.Equal([3], done[1].FrameIndex);
        Assert.Equal(TrackEnd.MovieEnd, done[1].End);
    }

    [Fact]
    public void Step_FrameMissingWithinMaxGap_ResumesAcrossIt()
    {
        // With --max-gap 1 the same missing frame is bridged: one track over frames 0, 1, 3.
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 1, minTrackFrames: 3));
        Step(tracker, 0, [Ellipse(1, 30, 30)], null);
        Step(tracker, 1, [Ellipse(1, 30, 30)], OneToOne(1, 0));
        Step(tracker, 3, [Ellipse(1, 31, 30)], null);
        tracker.Finish();
        var done = tracker.TakeFinished().ToList();
        Assert.Single(done);
        Assert.Equal([0, 1, 3], done[0].FrameIndex);
    }

    [Fact]
    public void Step_Division_EndsTheMotherTrackWithDivision()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 0));   // without --max-gap: ends at once
        Step(tracker, 0, [Ellipse(1, 40, 40)], null);
        // Two significant successors: divided, no one-to-one link.
        var placed = Step(tracker, 1, [Ellipse(1, 34, 40), Ellipse(2, 46, 40)], new FrameLinks([-1, -1], [true], [false, false], [-1]));
        var ended = Assert.Single(tracker.TakeFinished());
        Assert.Equal((1, TrackEnd.Division), (ended.Id, ended.End));
        Assert.Equal([2, 3], placed.Select(p => p.TrackId));             // the daughters start new tracks
    }

    [Fact]
    public void Step_Merge_EndsBothTracksWithMerge()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 0));   // without --max-gap: ends at once
        Step(tracker, 0, [Ellipse(1, 30, 40), Ellipse(2, 50, 40)], null);
        var placed = Step(tracker, 1, [Ellipse(1, 40, 40)], new FrameLinks([-1], [false, false], [true], [0, 0]));
        var ended = tracker.TakeFinished().OrderBy(t => t.Id).ToList();
        Assert.Equal([(1, TrackEnd.Merge), (2, TrackEnd.Merge)], ended.Select(t => (t.Id, t.End)));
        Assert.Equal(3, placed[0].TrackId);
    }

    /// <summary>Links with their significant pairs (earlier, later), as the overlap rule gives them.</summary>
    private static FrameLinks WithPairs(int earlier, int later, params (int A, int B)[] pairs)
    {
        var succCount = new int[earlier]; var predCount = new int[later]; var succOf = new int[earlier]; var predOf = new int[later];
        foreach (var (a, b) in pairs) { succCount[a]++; succOf[a] = b; predCount[b]++; predOf[b] = a; }
        var pred = new int[later]; var succ = new int[earlier];
        for (int a = 0; a < earlier; a++) succ[a] = succCount[a] == 1 ? succOf[a] : -1;
        for (int b = 0; b < later; b++) pred[b] = predCount[b] == 1 && succCount[predOf[b]] == 1 ? predOf[b] : -1;
        return new FrameLinks(pred, [.. succCount.Select(c => c >= 2)], [.. predCount.Select(c => c >= 2)], succ) { Pairs = pairs };
    }

    [Fact]
    public void Step_MergeThatSplitsBackWithinMaxGap_BridgesBothTracksAndDropsTheMerge()
    {
        // docs/measures.md#one-frame-errors: A and B merge into M in frame 1, M splits back into A and B in frame 2.
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2, minTrackFrames: 3));
        Step(tracker, 0, [Ellipse(1, 30, 40), Ellipse(2, 50, 40)], null);
        Step(tracker, 1, [Ellipse(1, 40, 40)], WithPairs(2, 1, (0, 0), (1, 0)));
        var placed = Step(tracker, 2, [Ellipse(1, 30, 40), Ellipse(2, 50, 40)], WithPairs(1, 2, (0, 0), (0, 1)));
        Step(tracker, 3, [Ellipse(1, 30, 40), Ellipse(2, 50, 40)], OneToOne(2, 0, 1));
        tracker.Finish();
        var done = tracker.TakeFinished().OrderBy(t => t.Id).ToList();
        Assert.Equal([1, 2], placed.Select(p => p.TrackId));
        Assert.Equal([1, 2], done.Select(t => t.Id));                     // M (track 3) is not handed over
        Assert.All(done, t => Assert.Equal([0, 2, 3], t.FrameIndex));     // bridged across frame 1
        var c = tracker.Counts();
        Assert.Equal((1, 0, 1, 0, 0), (c.BridgedMerges, c.BridgedSplits, c.Outliers, c.Merges, c.Divisions));
        Assert.True(tracker.IsOutlier(3, 1));
    }

    [Fact]
    public void Step_SplitThatMergesBackWithinMaxGap_BridgesTheTrackAndDropsTheParts()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2, minTrackFrames: 3));
        Step(tracker, 0, [Ellipse(1, 40, 40)], null);
        Step(tracker, 1, [Ellipse(1, 34, 40), Ellipse(2, 46, 40)], WithPairs(1, 2, (0, 0), (0, 1)));
        var placed = Step(tracker, 2, [Ellipse(1, 40, 40)], WithPairs(2, 1, (0, 0), (1, 0)));
        tracker.Finish();
        var done = Assert.Single(tracker.TakeFinished());
        Assert.Equal(1, placed[0].TrackId);
        Assert.Equal([0, 2], done.FrameIndex);
        var c = tracker.Counts();
        Assert.Equal((0, 1, 2, 0, 0), (c.BridgedMerges, c.BridgedSplits, c.Outliers, c.Merges, c.Divisions));
    }

    [Fact]
    public void Step_DivisionThatPersists_IsCountedAndTheMotherEndsWithDivision()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2, minTrackFrames: 3));
        Step(tracker, 0, [Ellipse(1, 40, 40)], null);
        Step(tracker, 1, [Ellipse(1, 34, 40), Ellipse(2, 46, 40)], WithPairs(1, 2, (0, 0), (0, 1)));
        for (int f = 2; f < 6; f++) Step(tracker, f, [Ellipse(1, 34, 40), Ellipse(2, 46, 40)], OneToOne(2, 0, 1));
        tracker.Finish();
        var done = tracker.TakeFinished().OrderBy(t => t.Id).ToList();
        Assert.Equal([(1, TrackEnd.Division), (2, TrackEnd.MovieEnd), (3, TrackEnd.MovieEnd)], done.Select(t => (t.Id, t.End)));
        var c = tracker.Counts();
        Assert.Equal((1, 0, 0), (c.Divisions, c.BridgedSplits, c.Outliers));
    }

    [Fact]
    public void TakeFinished_OneFrameSpikeInAreaThatReverts_DropsThatOutlineAndKeepsTheTrack()
    {
        // docs/measures.md#one-frame-errors: frame 5 is outlined 1.6 times too large (one-to-one linked), then reverts.
        static Outline Scaled(double cx, double a, double b)
        {
            var v = new Point2[48];
            for (int k = 0; k < v.Length; k++) { double t = 2 * Math.PI * k / v.Length; v[k] = new Point2(cx + a * Math.Cos(t), 40 + b * Math.Sin(t)); }
            return new Outline(1, OutlineStatus.Ok, v, (int)(Math.PI * a * b));
        }
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2, minTrackFrames: 3));
        for (int f = 0; f < 12; f++)
        {
            double wiggle = 0.3 * Math.Sin(1.7 * f);
            var o = f == 5 ? Scaled(40, 16, 9.6) : Scaled(40 + 0.2 * f, 10 + wiggle, 6 - 0.5 * wiggle);
            Step(tracker, f, [o], f == 0 ? null : OneToOne(1, 0));
        }
        tracker.Finish();
        var t = Assert.Single(tracker.TakeFinished());
        Assert.Equal(Enumerable.Range(0, 12).Where(f => f != 5), t.FrameIndex);
        Assert.Equal(1, tracker.Counts().Outliers);
        Assert.True(tracker.IsOutlier(t.Id, 5));
    }

    [Fact]
    public void Step_CellReachesTheBorder_EndsWithBorderAndIsNotPlaced()
    {
        using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 2));
        Step(tracker, 0, [Ellipse(1, 12, 40)], null);
        var placed = Step(tracker, 1, [Ellipse(1, 10, 40, OutlineStatus.Border)], OneToOne(1, 0));
        Assert.Equal(0, placed[0].TrackId);
        var ended = Assert.Single(tracker.TakeFinished());
        Assert.Equal((1, TrackEnd.Border), (ended.Id, ended.End));
    }

    [Fact]
    public void TrackFluctuationsOf_TrackShorterThanMinTrack_IsNotUsedAndHasNoContour()
    {
        // docs/measures.md#track-definitions: only tracks of at least --min-track frames enter the statistics.
        var tracks = DropOut(maxGap: 0, frames: 4);
        var a = TrackFluctuations.Of(tracks[1], minTrackFrames: 4);
        var b = TrackFluctuations.Of(tracks[1], minTrackFrames: 5);
        Assert.True(a.Used); Assert.NotNull(a.Contour); Assert.Equal(4, a.Contour!.Frames);
        Assert.False(b.Used); Assert.Null(b.Contour);
        Assert.Equal(a.VarLPx2, b.VarLPx2);
    }

    /// <summary>Closing the open tracks batch by batch (one track per batch here) hands over the same tracks, in the same
    /// order, with the same radii bit for bit as closing them in one batch (the default for a movie of this size); the
    /// caller's hook runs once per batch.</summary>
    [Fact]
    public void Finish_OneTrackPerBatch_SameTracksAndRadiiAsOneBatch()
    {
        List<FinishedTrack> Run(long batchDoubles, out int batches)
        {
            using var tracker = new Tracker(Rays, new TrackingOptions(maxGapFrames: 0));
            var o = new[] { Ellipse(1, 20, 20), Ellipse(2, 60, 20), Ellipse(3, 100, 20) };
            Step(tracker, 0, o, null);
            for (int f = 1; f < 4; f++)
            {
                o = [Ellipse(1, 20 + f, 20), Ellipse(2, 60, 20 + 0.5 * f), Ellipse(3, 100 - f, 21)];
                Step(tracker, f, o, OneToOne(3, 0, 1, 2));
            }
            var done = new List<FinishedTrack>();
            int calls = 0;
            tracker.Finish(() => { calls++; done.AddRange(tracker.TakeFinished()); }, batchDoubles);
            done.AddRange(tracker.TakeFinished());
            batches = calls;
            return done;
        }
        var one = Run(TrackBuilder.EndBatchDoubles, out int oneBatches);
        var each = Run(1, out int eachBatches);
        Assert.Equal(1, oneBatches);
        Assert.Equal(3, eachBatches);
        Assert.Equal(one.Select(t => t.Id), each.Select(t => t.Id));
        for (int i = 0; i < one.Count; i++) Assert.Equal(one[i].BodyFrameRadiiPx, each[i].BodyFrameRadiiPx);
        Assert.All(one, t => Assert.Equal(4, t.Frames));
    }
}

