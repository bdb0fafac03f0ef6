namespace ShapeNoise.Tracking;

/// <summary>A track that has ended, as the tracker hands it over once: its frames, per-frame series (px, rad), why it
/// ended, and its body-frame radii read back from the temporary radius store (docs/measures.md#track-definitions).</summary>
/// <param name="Id">Track id (1, 2, ... in the order tracks started).</param>
/// <param name="End">Why the track ended.</param>
/// <param name="FrameIndex">Frame of each outline (increasing; gaps where --max-gap closed one).</param>
/// <param name="LengthPx">L per frame.</param>
/// <param name="WidthPx">W per frame.</param>
/// <param name="Elongation">q per frame.</param>
/// <param name="ThetaRad">Long-axis angle per frame, continuous modulo pi along the track.</param>
/// <param name="AreaPx2">Area per frame.</param>
/// <param name="CentroidX">Centroid x per frame.</param>
/// <param name="CentroidY">Centroid y per frame.</param>
/// <param name="Rays">M, radial samples per outline.</param>
/// <param name="BodyFrameRadiiPx">n x M radii rho(psi_k, t) in the body frame, row-major (row t = frame t of the track).</param>
public sealed record FinishedTrack(int Id, TrackEnd End, int[] FrameIndex, double[] LengthPx, double[] WidthPx, double[] Elongation,
    double[] ThetaRad, double[] AreaPx2, double[] CentroidX, double[] CentroidY, int Rays, double[] BodyFrameRadiiPx)
{
    /// <summary>Number of outlines in the track.</summary>
    public int Frames => FrameIndex.Length;

    /// <summary>The same track without the outlines where <paramref name="drop"/> is true (a gap in its frames there).</summary>
    public FinishedTrack Without(bool[] drop)
    {
        if (drop.Length != Frames) throw new ArgumentException("one flag per outline expected", nameof(drop));
        var keep = Enumerable.Range(0, Frames).Where(i => !drop[i]).ToArray();
        T[] K<T>(T[] a) => [.. keep.Select(i => a[i])];
        var rho = new double[keep.Length * Rays];
        for (int j = 0; j < keep.Length; j++) Array.Copy(BodyFrameRadiiPx, keep[j] * Rays, rho, j * Rays, Rays);
        return this with
        {
            FrameIndex = K(FrameIndex), LengthPx = K(LengthPx), WidthPx = K(WidthPx), Elongation = K(Elongation), ThetaRad = K(ThetaRad),
            AreaPx2 = K(AreaPx2), CentroidX = K(CentroidX), CentroidY = K(CentroidY), BodyFrameRadiiPx = rho,
        };
    }
}
