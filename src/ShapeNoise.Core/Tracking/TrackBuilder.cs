using System.Numerics;
using ShapeNoise.Shape;

namespace ShapeNoise.Tracking;

/// <summary>
/// Accumulates the outlines of the tracks that are still open, keeps the long axis continuous modulo pi along each track
/// (each frame takes the representative within pi/2 of the previous one, which shifts the body-frame samples by M/2 when
/// it adds pi), and hands a track over as a <see cref="FinishedTrack"/> when it ends. Open tracks keep their radii in a
/// temporary file (<see cref="RadiusStore"/>), so memory does not grow with the movie's length; a finished track's radii
/// are read back once, into its <see cref="FinishedTrack.BodyFrameRadiiPx"/>.
/// </summary>
internal sealed class TrackBuilder(int rays) : IDisposable
{
    private readonly RadiusStore _store = new(rays);
    private sealed class Open
    {
        public int Id;
        public readonly List<int> Frames = [];
        public readonly List<double> L = [], W = [], Q = [], Theta = [], Area = [], Cx = [], Cy = [];
        public readonly List<long> Rho = [];   // indices into the radius store
    }

    private readonly List<Open?> _slots = [];
    private readonly Stack<int> _free = new();
    private int _nextId = 1;

    /// <summary>Tracks that have ended, in the order they ended.</summary>
    public List<FinishedTrack> Finished { get; } = [];

    /// <summary>Track id held by an open slot.</summary>
    public int IdOf(int slot) => _slots[slot]!.Id;

    /// <summary>
    /// Appends an outline to the open track in <paramref name="slot"/> (or starts a new track when slot is -1).
    /// <paramref name="rhoRaw"/> holds the radial samples cast from the frame's own long axis; they are copied.
    /// Returns the slot, the continuous axis angle and the body-frame modes of this outline.
    /// </summary>
    public (int Slot, double ThetaContinuous, Complex[] Modes) Append(int slot, int frame, ShapeMeasures shape, ReadOnlySpan<double> rhoRaw,
        Complex[]? modesRaw = null)
    {
        if (rhoRaw.Length != rays) throw new ArgumentException($"expected {rays} radial samples");
        Open tr;
        if (slot < 0)
        {
            tr = new Open { Id = _nextId++ };
            if (_free.Count > 0) { slot = _free.Pop(); _slots[slot] = tr; }
            else { slot = _slots.Count; _slots.Add(tr); }
        }
        else tr = _slots[slot] ?? throw new InvalidOperationException("slot is not open");

        double theta = shape.ThetaRad;
        var rho = new double[rays];
        int half = 0;
        if (tr.Theta.Count > 0)
        {
            double prev = tr.Theta[^1];
            half = (int)Math.Round((prev - theta) / Math.PI);
            theta += half * Math.PI;
        }
        int shift = (half & 1) != 0 ? rays / 2 : 0;   // r(theta + pi + psi_k) = rho_raw[k + M/2]
        for (int k = 0; k < rays; k++) rho[k] = rhoRaw[(k + shift) % rays];
        Complex[] modes;
        if (modesRaw is null) { modes = new Complex[rays / 2 + 1]; FourierModes.Of(rho, modes); }
        else
        {
            // A shift by M/2 samples multiplies C_n by exp(i n pi) = (-1)^n.
            modes = modesRaw;
            if (shift != 0) for (int n = 1; n < modes.Length; n += 2) modes[n] = -modes[n];
        }

        tr.Frames.Add(frame); tr.L.Add(shape.LengthPx); tr.W.Add(shape.WidthPx); tr.Q.Add(shape.Elongation);
        tr.Theta.Add(theta); tr.Area.Add(shape.AreaPx2); tr.Cx.Add(shape.CentroidX); tr.Cy.Add(shape.CentroidY); tr.Rho.Add(_store.Append(rho));
        return (slot, theta, modes);
    }

    /// <summary>Closes the track in <paramref name="slot"/>.</summary>
    public void End(int slot, TrackEnd why)
    {
        var tr = _slots[slot] ?? throw new InvalidOperationException("slot is not open");
        End(slot, why, Radii(tr));
    }

    /// <summary>The track's radii read back from the store, frame after frame.</summary>
    private double[] Radii(Open tr)
    {
        int n = tr.Frames.Count;
        var rho = new double[n * rays];
        for (int t = 0; t < n; t++) _store.Read(tr.Rho[t], rho.AsSpan(t * rays, rays));
        return rho;
    }

    private void End(int slot, TrackEnd why, double[] rho)
    {
        var tr = _slots[slot]!;
        _slots[slot] = null; _free.Push(slot);
        Finished.Add(new FinishedTrack(tr.Id, why, tr.Frames.ToArray(), tr.L.ToArray(), tr.W.ToArray(), tr.Q.ToArray(),
            tr.Theta.ToArray(), tr.Area.ToArray(), tr.Cx.ToArray(), tr.Cy.ToArray(), rays, rho));
    }

    /// <summary>Deletes the temporary radius file.</summary>
    public void Dispose() => _store.Dispose();

    /// <summary>Radii (doubles) read back at once when the open tracks are closed: 2^25 doubles, 256 MB.</summary>
    public const long EndBatchDoubles = 1L << 25;

    /// <summary>Closes every open track, in slot order; <paramref name="afterBatch"/> (may be null) runs after each batch of
    /// tracks whose radii together stay within <see cref="EndBatchDoubles"/>, so a caller that takes the finished tracks
    /// there holds one batch of radii at a time.</summary>
    /// <remarks>At the end of a movie nearly every track is open: their radii are read back in sequential passes over the
    /// store (one per batch; not one small read per outline). A 2048 x 2048 px, 200-frame movie has about 1 GB of radii,
    /// which would otherwise all be in memory at once (bench/README.md).</remarks>
    public void EndAll(TrackEnd why, Action? afterBatch = null, long batchDoubles = EndBatchDoubles)
    {
        var open = new List<int>();
        for (int s = 0; s < _slots.Count; s++) if (_slots[s] is not null) open.Add(s);
        // Where each stored outline goes: track i of the batch, frame position t (-1: not in this batch).
        var owner = new int[_store.Count]; var position = new int[_store.Count];
        Array.Fill(owner, -1);
        for (int first = 0; first < open.Count;)
        {
            int last = first; long held = 0;
            while (last < open.Count && (last == first || held + (long)_slots[open[last]]!.Frames.Count * rays <= batchDoubles))
                held += (long)_slots[open[last++]]!.Frames.Count * rays;
            var radii = new double[last - first][];
            for (int i = 0; i < radii.Length; i++)
            {
                var tr = _slots[open[first + i]]!;
                radii[i] = new double[tr.Frames.Count * rays];
                for (int t = 0; t < tr.Rho.Count; t++) { owner[tr.Rho[t]] = i; position[tr.Rho[t]] = t; }
            }
            _store.ReadAll((index, rho) =>
            {
                int i = owner[index];
                if (i >= 0) rho.CopyTo(radii[i].AsSpan(position[index] * rays, rays));
            });
            for (int i = 0; i < radii.Length; i++)
            {
                var tr = _slots[open[first + i]]!;
                foreach (long index in tr.Rho) owner[index] = -1;
                End(open[first + i], why, radii[i]);
            }
            first = last;
            afterBatch?.Invoke();
        }
    }
}
