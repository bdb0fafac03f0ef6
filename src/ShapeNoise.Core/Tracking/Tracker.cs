using System.Numerics;
using ShapeNoise.Outlines;

namespace ShapeNoise.Tracking;

/// <summary>Where the tracker put one outline of a frame.</summary>
/// <param name="TrackId">Id of the track the outline belongs to, or 0 when the outline is excluded (border, small).</param>
/// <param name="ThetaContinuousRad">Long-axis angle made continuous modulo pi along the track.</param>
/// <param name="Modes">Body-frame Fourier modes C_n, n = 0..M/2 (null when excluded).</param>
public readonly record struct Placement(int TrackId, double ThetaContinuousRad, Complex[]? Modes);

/// <summary>
/// Tracks, one frame per <see cref="Step"/> call (docs/measures.md#track-definitions; docs/measures.md#3-tracking): an
/// outline continues the track of the outline its <see cref="FrameLinks"/> link it to; with
/// <see cref="TrackingOptions.MaxGapFrames"/> G &gt; 0 a track lost without a division, merge or border contact stays
/// dormant for up to G frames and resumes at a new outline within its radius sqrt(area/pi) of its last centroid
/// (optimal one-to-one assignment, <see cref="Assignment"/>). A track of the previous frame that is not continued ends:
/// Division, Merge, Border, Small (its only successor is excluded), else Lost; the tracks still open after the last
/// frame end in <see cref="Finish"/> (dormant ones Lost, the others MovieEnd).
/// </summary>
/// <remarks>Ended tracks are handed over once by <see cref="TakeFinished"/>, radii included; the radii of open tracks
/// stay in a temporary file, so memory does not grow with the movie's length.</remarks>
public sealed class Tracker(int rays, TrackingOptions options) : IDisposable
{
    private readonly TrackBuilder _builder = new(rays);
    private readonly List<(int Slot, int LastFrame, double X, double Y, double RadiusPx)> _dormant = [];
    private int[]? _prevSlot;               // open-track slot of each outline of the previous frame, or -1
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
            EndNotContinued(frameIndex, outlines, NoLinks(_prevSlot.Length, outlines.Count), new bool[_prevSlot.Length]);
            _prevSlot = null;
        }
        var resume = Resume(frameIndex, outlines, shapes, links);
        var placed = new Placement[outlines.Count];
        var slot = new int[outlines.Count];
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
            placed[i] = new Placement(_builder.IdOf(s), theta, modes);
        }
        if (links is not null) EndNotContinued(frameIndex, outlines, links, continued!);
        _prevSlot = slot; _prevShapes = [.. shapes]; _prevFrame = frameIndex;
        return placed;
    }

    /// <summary>Gap closing: dormant tracks past --max-gap end Lost; the others may resume at a new outline. Returns,
    /// per outline, the slot it resumes or -1.</summary>
    private int[] Resume(int frameIndex, IReadOnlyList<Outline> outlines, IReadOnlyList<OutlineShape?> shapes, FrameLinks? links)
    {
        var resume = new int[outlines.Count];
        Array.Fill(resume, -1);
        if (options.MaxGapFrames == 0) return resume;
        for (int d = 0; d < _dormant.Count;)
        {
            if (frameIndex - _dormant[d].LastFrame > options.MaxGapFrames + 1) { _builder.End(_dormant[d].Slot, TrackEnd.Lost); _dormant.RemoveAt(d); }
            else d++;
        }
        var newcomers = new List<int>();
        for (int i = 0; i < outlines.Count; i++)
            if (outlines[i].Status == OutlineStatus.Ok && !(links is not null && links.Predecessor[i] >= 0 && _prevSlot![links.Predecessor[i]] >= 0))
                newcomers.Add(i);
        if (_dormant.Count == 0 || newcomers.Count == 0) return resume;
        var cost = new double[_dormant.Count, newcomers.Count];
        for (int a = 0; a < _dormant.Count; a++)
            for (int b = 0; b < newcomers.Count; b++)
            {
                var c = shapes[newcomers[b]]!.Shape;
                double dx = c.CentroidX - _dormant[a].X, dy = c.CentroidY - _dormant[a].Y;
                double dist = Math.Sqrt(dx * dx + dy * dy);
                cost[a, b] = dist <= _dormant[a].RadiusPx ? dist : double.PositiveInfinity;
            }
        var match = Assignment.Solve(cost, double.MaxValue);
        for (int a = match.Length - 1; a >= 0; a--)
            if (match[a] >= 0) { resume[newcomers[match[a]]] = _dormant[a].Slot; _dormant.RemoveAt(a); }
        return resume;
    }

    /// <summary>Ends (or, with --max-gap, puts to sleep) each track of the previous frame that no outline continued.</summary>
    private void EndNotContinued(int frameIndex, IReadOnlyList<Outline> outlines, FrameLinks links, bool[] continued)
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
            if (why == TrackEnd.Lost && options.MaxGapFrames > 0)
            {
                var s = _prevShapes![a]!.Shape;
                _dormant.Add((_prevSlot[a], _prevFrame, s.CentroidX, s.CentroidY, Math.Sqrt(s.AreaPx2 / Math.PI)));
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

    /// <summary>After the last frame: dormant tracks end Lost, every other open track MovieEnd.</summary>
    public void Finish()
    {
        foreach (var d in _dormant) _builder.End(d.Slot, TrackEnd.Lost);
        _dormant.Clear();
        _builder.EndAll(TrackEnd.MovieEnd);
        _prevSlot = null; _prevShapes = null;
    }

    /// <summary>The tracks that ended since the last call, in the order they ended; each is handed over once.</summary>
    public List<FinishedTrack> TakeFinished()
    {
        var done = new List<FinishedTrack>(_builder.Finished);
        _builder.Finished.Clear();
        return done;
    }

    /// <summary>Deletes the temporary radius file.</summary>
    public void Dispose() => _builder.Dispose();
}
