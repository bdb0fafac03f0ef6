using System.Numerics;
using ShapeNoise.Outlines;

namespace ShapeNoise.Tracking;

/// <summary>Where the tracker put one outline of a frame.</summary>
/// <param name="TrackId">Id of the track the outline belongs to, or 0 when the outline is excluded (border, small).</param>
/// <param name="ThetaContinuousRad">Long-axis angle made continuous modulo pi along the track.</param>
/// <param name="Modes">Body-frame Fourier modes C_n, n = 0..M/2 (null when excluded).</param>
public readonly record struct Placement(int TrackId, double ThetaContinuousRad, Complex[]? Modes);

/// <summary>One-frame segmentation errors the tracker found and bridged, and the divisions and merges of analysed cells
/// that remain (docs/measures.md#one-frame-errors).</summary>
/// <param name="Outliers">Outlines left out as one-frame outliers: spikes that revert (<see cref="OutlierRule"/>) and the
/// outlines of the short tracks between a merge or split and its reversal.</param>
/// <param name="BridgedMerges">Merges that split back into their parents within --max-gap frames.</param>
/// <param name="BridgedSplits">Splits whose parts merged back within --max-gap frames.</param>
/// <param name="Divisions">Divisions of an analysed cell into two or more analysed outlines, bridged splits not counted.</param>
/// <param name="Merges">Merges of two or more analysed cells into an analysed outline, bridged merges not counted.</param>
public readonly record struct TrackingCounts(int Outliers, int BridgedMerges, int BridgedSplits, int Divisions, int Merges);

/// <summary>
/// Tracks, one frame per <see cref="Step"/> call (docs/measures.md#track-definitions; docs/measures.md#one-frame-errors):
/// an outline continues the track of the outline its <see cref="FrameLinks"/> link it to. With
/// <see cref="TrackingOptions.MaxGapFrames"/> G &gt; 0 a track that is not continued sleeps for up to G frames instead
/// of ending, and resumes at a new outline within its radius sqrt(area/pi) of its last centroid (optimal one-to-one
/// assignment, <see cref="Assignment"/>): a lost track at any new outline; a track that merged into M only at a part of
/// M's later split (M is then an outlier: a bridged merge); a track that split only at an outline formed by merging its
/// own parts again (the parts are outliers: a bridged split). A track not continued ends: Division, Merge, Border,
/// Small (its only successor is excluded), else Lost; the tracks still open after the last frame end in
/// <see cref="Finish(Action?)"/> (sleeping ones with the reason they fell asleep, the others MovieEnd). Finished tracks lose their
/// one-frame outliers (<see cref="OutlierRule"/>), which leaves a gap.
/// </summary>
/// <remarks>Ended tracks are handed over once by <see cref="TakeFinished"/>, radii included; the radii of open tracks
/// stay in a temporary file, so memory does not grow with the movie's length.</remarks>
public sealed class Tracker(int rays, TrackingOptions options) : IDisposable
{
    private sealed record Dormant(int Slot, int LastFrame, double X, double Y, double RadiusPx, TrackEnd Why, int Via, int[] Kids);

    private readonly TrackBuilder _builder = new(rays);
    private readonly List<Dormant> _dormant = [];
    private readonly HashSet<int> _outlierTracks = [];
    private readonly HashSet<(int TrackId, int Frame)> _outlierOutlines = [];
    private readonly List<(int Parent, int[] Children)> _divisions = [];
    private readonly List<(int Child, int[] Parents)> _merges = [];
    private readonly Dictionary<int, int> _bornAtEvent = [];   // track id -> first frame, for tracks begun at a merge or split
    private int _bridgedMerges, _bridgedSplits, _outliers;
    private int[]? _prevSlot;               // open-track slot of each outline of the previous frame, or -1
    private int[]? _prevTrack;              // track id of each outline of the previous frame, or 0
    private OutlineShape?[]? _prevShapes;
    private int _prevFrame;

    /// <summary>
    /// Places the outlines of frame <paramref name="frameIndex"/>. <paramref name="shapes"/>[i] must be set for every
    /// outline whose status is <see cref="OutlineStatus.Ok"/>; <paramref name="links"/> links them to the previous
    /// frame's outlines (null for the first frame, or when frames are not consecutive).
    /// </summary>
    public Placement[] Step(int frameIndex, IReadOnlyList<Outline> outlines, IReadOnlyList<OutlineShape?> shapes, FrameLinks? links)
    {
        if (shapes.Count != outlines.Count) throw new ArgumentException("one shape per outline expected", nameof(shapes));
        if (links is null && _prevSlot is not null)
        {
            // A frame without links after an earlier one (a frame missing from an outline table): nothing continues, so
            // the earlier tracks end Lost, or wait as dormant tracks that --max-gap may resume in this very frame, instead
            // of running on to the movie's end.
            var none = NoLinks(_prevSlot.Length, outlines.Count);
            EndNotContinued(outlines, none, new bool[_prevSlot.Length], new int[outlines.Count], Family.Of(none, _prevSlot.Length, outlines.Count));
            _prevSlot = null; _prevTrack = null;
        }
        var family = links is null || _prevSlot is null ? null : Family.Of(links, _prevSlot.Length, outlines.Count);
        var resume = Resume(frameIndex, outlines, shapes, links, family);
        var placed = new Placement[outlines.Count];
        var slot = new int[outlines.Count];
        var track = new int[outlines.Count];
        Array.Fill(slot, -1);
        var continued = _prevSlot is null ? null : new bool[_prevSlot.Length];
        for (int i = 0; i < outlines.Count; i++)
        {
            if (outlines[i].Status != OutlineStatus.Ok) continue;
            var sh = shapes[i] ?? throw new ArgumentException($"outline {i} is Ok but has no shape", nameof(shapes));
            int a = links is null ? -1 : links.Predecessor[i];
            bool continues = a >= 0 && _prevSlot![a] >= 0;
            if (continues) continued![a] = true;
            var (s, theta, modes) = _builder.Append(continues ? _prevSlot![a] : resume[i], frameIndex, sh.Shape, sh.RhoRaw, sh.ModesRaw);
            slot[i] = s;
            track[i] = _builder.IdOf(s);
            if (!continues && resume[i] < 0 && family is not null && family.Parents[i].Count > 0
                && (links!.Merged[i] || family.Parents[i].Any(p => links.Divided[p])))
                _bornAtEvent[track[i]] = frameIndex;
            placed[i] = new Placement(track[i], theta, modes);
        }
        if (links is not null && _prevSlot is not null)
        {
            RecordEvents(outlines, links, track, family);
            EndNotContinued(outlines, links, continued!, track, family);
        }
        _prevSlot = slot; _prevTrack = track; _prevShapes = [.. shapes]; _prevFrame = frameIndex;
        return placed;
    }

    /// <summary>Parents (earlier objects) of each later object and children of each earlier object, from the significant
    /// pairs; without pairs, only the one-to-one links.</summary>
    private sealed record Family(List<int>[] Parents, List<int>[] Children)
    {
        public static Family Of(FrameLinks links, int earlier, int later)
        {
            var p = new List<int>[later]; var c = new List<int>[earlier];
            for (int b = 0; b < later; b++) p[b] = [];
            for (int a = 0; a < earlier; a++) c[a] = [];
            if (links.Pairs is { } pairs) foreach (var (a, b) in pairs) { p[b].Add(a); c[a].Add(b); }
            else for (int b = 0; b < later; b++) if (links.Predecessor[b] >= 0) { p[b].Add(links.Predecessor[b]); c[links.Predecessor[b]].Add(b); }
            return new Family(p, c);
        }
    }

    /// <summary>Divisions of a tracked outline into two or more analysed outlines, and merges of two or more tracked
    /// outlines into an analysed one (slivers at the border and small objects do not count).</summary>
    private void RecordEvents(IReadOnlyList<Outline> outlines, FrameLinks links, int[] track, Family? family)
    {
        if (family is null) return;
        for (int a = 0; a < _prevSlot!.Length; a++)
        {
            if (!links.Divided[a] || _prevTrack![a] == 0) continue;
            var kids = family.Children[a].Where(b => track[b] != 0).Select(b => track[b]).ToArray();
            if (kids.Length >= 2) _divisions.Add((_prevTrack[a], kids));
        }
        for (int b = 0; b < outlines.Count; b++)
        {
            if (!links.Merged[b] || track[b] == 0) continue;
            var parents = family.Parents[b].Where(a => _prevTrack![a] != 0).Select(a => _prevTrack![a]).ToArray();
            if (parents.Length >= 2) _merges.Add((track[b], parents));
        }
    }

    /// <summary>Gap closing: sleeping tracks past --max-gap end; the others may resume at a new outline. Returns, per
    /// outline, the slot it resumes or -1. A track asleep after a merge resumes only at a part of that merge's split; a
    /// track asleep after a split only at an outline formed by its own parts.</summary>
    private int[] Resume(int frameIndex, IReadOnlyList<Outline> outlines, IReadOnlyList<OutlineShape?> shapes, FrameLinks? links, Family? family)
    {
        var resume = new int[outlines.Count];
        Array.Fill(resume, -1);
        if (options.MaxGapFrames == 0) return resume;
        for (int d = 0; d < _dormant.Count;)
        {
            if (frameIndex - _dormant[d].LastFrame > options.MaxGapFrames + 1) { _builder.End(_dormant[d].Slot, _dormant[d].Why); _dormant.RemoveAt(d); }
            else d++;
        }
        var newcomers = new List<int>();
        for (int i = 0; i < outlines.Count; i++)
            if (outlines[i].Status == OutlineStatus.Ok && !(links is not null && _prevSlot is not null && links.Predecessor[i] >= 0 && _prevSlot[links.Predecessor[i]] >= 0))
                newcomers.Add(i);
        if (_dormant.Count == 0 || newcomers.Count == 0) return resume;
        // Track ids of each newcomer's parents in the previous frame (empty without links).
        var parentTracks = newcomers.Select(i => family is null ? [] : family.Parents[i].Select(a => _prevTrack![a]).Where(id => id != 0).ToArray()).ToArray();
        var cost = new double[_dormant.Count, newcomers.Count];
        for (int a = 0; a < _dormant.Count; a++)
            for (int b = 0; b < newcomers.Count; b++)
            {
                var dm = _dormant[a];
                bool allowed = dm.Via != 0 ? parentTracks[b].Contains(dm.Via)
                    : dm.Kids.Length > 0 ? links is not null && links.Merged[newcomers[b]] && parentTracks[b].Count(dm.Kids.Contains) >= 2
                    : true;
                var c = shapes[newcomers[b]]!.Shape;
                double dx = c.CentroidX - dm.X, dy = c.CentroidY - dm.Y;
                double dist = Math.Sqrt(dx * dx + dy * dy);
                cost[a, b] = allowed && dist <= dm.RadiusPx ? dist : double.PositiveInfinity;
            }
        var match = Assignment.Solve(cost, double.MaxValue);
        for (int a = match.Length - 1; a >= 0; a--)
        {
            if (match[a] < 0) continue;
            var dm = _dormant[a];
            resume[newcomers[match[a]]] = dm.Slot;
            if (dm.Via != 0) { if (_outlierTracks.Add(dm.Via)) _bridgedMerges++; }
            else if (dm.Kids.Length > 0) { foreach (var k in dm.Kids) _outlierTracks.Add(k); _bridgedSplits++; }
            _dormant.RemoveAt(a);
        }
        return resume;
    }

    /// <summary>Ends (or, with --max-gap, puts to sleep) each track of the previous frame that no outline continued.
    /// Tracks already known to be outliers (the short track between a merge or split and its reversal) end at once.</summary>
    private void EndNotContinued(IReadOnlyList<Outline> outlines, FrameLinks links, bool[] continued, int[] track, Family? family)
    {
        for (int a = 0; a < _prevSlot!.Length; a++)
        {
            if (_prevSlot[a] < 0 || continued[a]) continue;
            int b = links.Successor[a];
            var why = links.Divided[a] ? TrackEnd.Division
                : b >= 0 && links.Merged[b] ? TrackEnd.Merge
                : b >= 0 && outlines[b].Status == OutlineStatus.Border ? TrackEnd.Border
                : b >= 0 && outlines[b].Status == OutlineStatus.Small ? TrackEnd.Small
                : TrackEnd.Lost;
            int via = why == TrackEnd.Merge && family is not null && links.Pairs is not null ? track[b] : 0;
            int[] kids = why == TrackEnd.Division && family is not null && links.Pairs is not null
                ? [.. family.Children[a].Where(c => track[c] != 0).Select(c => track[c])] : [];
            int id = _prevTrack![a];
            // The short track between a merge or split and its reversal: begun at one, ended by one within --max-gap frames.
            if (options.MaxGapFrames > 0 && why is TrackEnd.Merge or TrackEnd.Division && _bornAtEvent.TryGetValue(id, out int born)
                && _prevFrame - born + 1 <= options.MaxGapFrames)
                _outlierTracks.Add(id);
            _bornAtEvent.Remove(id);
            // A merge into an excluded object (border, small) or a split with fewer than two analysed parts: the track
            // sleeps as a lost one and may resume at any new outline near it.
            if (why == TrackEnd.Merge && via == 0 || why == TrackEnd.Division && kids.Length < 2) { via = 0; kids = []; }
            bool sleeps = options.MaxGapFrames > 0 && !_outlierTracks.Contains(id) && why is TrackEnd.Lost or TrackEnd.Merge or TrackEnd.Division;
            if (sleeps)
            {
                var s = _prevShapes![a]!.Shape;
                _dormant.Add(new Dormant(_prevSlot[a], _prevFrame, s.CentroidX, s.CentroidY, Math.Sqrt(s.AreaPx2 / Math.PI), why, via, kids));
            }
            else _builder.End(_prevSlot[a], why);
        }
    }

    private static FrameLinks NoLinks(int earlier, int later)
    {
        var pred = new int[later]; Array.Fill(pred, -1);
        var succ = new int[earlier]; Array.Fill(succ, -1);
        return new FrameLinks(pred, new bool[earlier], new bool[later], succ);
    }

    /// <summary>After the last frame: sleeping tracks end with the reason they fell asleep, every other open track MovieEnd.
    /// <paramref name="afterBatch"/> (may be null) runs after each batch of ended tracks (<see cref="TrackBuilder.EndAll"/>):
    /// taking the finished tracks there keeps one batch of radii in memory at a time.</summary>
    public void Finish(Action? afterBatch = null) => Finish(afterBatch, TrackBuilder.EndBatchDoubles);

    /// <summary><see cref="Finish(Action?)"/> with batches of at most <paramref name="batchDoubles"/> radii (at least one track).</summary>
    internal void Finish(Action? afterBatch, long batchDoubles)
    {
        foreach (var d in _dormant) _builder.End(d.Slot, d.Why);
        _dormant.Clear();
        _builder.EndAll(TrackEnd.MovieEnd, afterBatch, batchDoubles);
        _prevSlot = null; _prevTrack = null; _prevShapes = null;
    }

    /// <summary>The tracks that ended since the last call, in the order they ended; each is handed over once. Tracks found
    /// to be outliers (between a merge or split and its reversal) are not handed over; the others lose their one-frame
    /// outliers (<see cref="OutlierRule"/>).</summary>
    public List<FinishedTrack> TakeFinished()
    {
        var done = new List<FinishedTrack>(_builder.Finished.Count);
        foreach (var t in _builder.Finished)
        {
            if (_outlierTracks.Contains(t.Id))
            {
                _outliers += t.Frames;
                foreach (var f in t.FrameIndex) _outlierOutlines.Add((t.Id, f));
                continue;
            }
            var flag = OutlierRule.Flag(t);
            int n = flag.Count(x => x);
            if (n == 0) { done.Add(t); continue; }
            _outliers += n;
            for (int i = 0; i < flag.Length; i++) if (flag[i]) _outlierOutlines.Add((t.Id, t.FrameIndex[i]));
            done.Add(t.Without(flag));
        }
        _builder.Finished.Clear();
        return done;
    }

    /// <summary>Whether the outline of track <paramref name="trackId"/> in frame <paramref name="frame"/> was left out as
    /// a one-frame outlier (known once its track has been handed over by <see cref="TakeFinished"/>).</summary>
    public bool IsOutlier(int trackId, int frame) => _outlierOutlines.Contains((trackId, frame));

    /// <summary>The counts so far (final after <see cref="Finish(Action?)"/> and <see cref="TakeFinished"/>). A division or merge
    /// that belongs to a bridged error (its parent, its child or all its parts are outlier tracks) is not counted.</summary>
    public TrackingCounts Counts()
    {
        int div = _divisions.Count(e => !_outlierTracks.Contains(e.Parent) && !e.Children.All(_outlierTracks.Contains));
        int mer = _merges.Count(e => !_outlierTracks.Contains(e.Child) && !e.Parents.All(_outlierTracks.Contains));
        return new TrackingCounts(_outliers, _bridgedMerges, _bridgedSplits, div, mer);
    }

    /// <summary>Deletes the temporary radius file.</summary>
    public void Dispose() => _builder.Dispose();
}
