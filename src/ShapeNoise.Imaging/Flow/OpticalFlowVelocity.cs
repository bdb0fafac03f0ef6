using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;
using OpenCvSharp;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Nematic;

namespace ShapeNoise.Imaging.Flow;

/// <summary>Cell velocities from dense optical flow of the raw movie (an alternative to tracked centroids).</summary>
/// <remarks>Farneback G. (2003), "Two-frame motion estimation based on polynomial expansion", Proc. 13th Scandinavian
/// Conference on Image Analysis, LNCS 2749:363-370 (OpenCV's calcOpticalFlowFarneback). The velocity of a cell in frame t
/// is the mean of the flows t-1 -> t and t -> t+1 at its centroid (one-sided at the ends), px/frame. As an
/// <see cref="IVelocitySource"/> it is chosen before the run; binding it reads the raw movie once.</remarks>
/// <param name="rawPath">The raw (intensity) movie the label movie was segmented from.</param>
/// <param name="selection">Plane and scale selection used when opening the raw movie.</param>
public sealed class OpticalFlowVelocity(string rawPath, MovieSelection? selection = null) : IVelocitySource
{
    /// <summary>Reads the raw movie once and returns each analysed cell's flow velocity (NaN for a cell not in it).</summary>
    public Func<CellRecord, (double Vx, double Vy)> Bind(IReadOnlyList<CellRecord> cells, IReadOnlyList<TrackRecord> tracks)
    {
        var v = ForCells(rawPath, cells, selection);
        return c => v.TryGetValue((c.Frame, c.Label), out var x) ? x : (double.NaN, double.NaN);
    }

    /// <summary>Dense flow a -> b (px) of two intensity frames; returns a 2-channel float Mat.</summary>
    public static Mat Flow(int[] a, int[] b, int w, int h)
    {
        using var ma = To8Bit(a, w, h); using var mb = To8Bit(b, w, h);
        var flow = new Mat();
        Cv2.CalcOpticalFlowFarneback(ma, mb, flow, 0.5, 3, 15, 3, 5, 1.2, OpticalFlowFlags.None);
        return flow;
    }

    /// <summary>Median of the flow over the frame (for checks on rigid motion).</summary>
    public static (double Dx, double Dy) MedianFlow(int[] a, int[] b, int w, int h, int margin = 16)
    {
        using var f = Flow(a, b, w, h);
        var xs = new List<double>(); var ys = new List<double>();
        for (int y = margin; y < h - margin; y++)
            for (int x = margin; x < w - margin; x++) { var v = f.At<Vec2f>(y, x); xs.Add(v.Item0); ys.Add(v.Item1); }
        xs.Sort(); ys.Sort();
        return (xs[xs.Count / 2], ys[ys.Count / 2]);
    }

    private static Mat To8Bit(int[] v, int w, int h)
    {
        int min = v.Min(), max = Math.Max(v.Max(), min + 1);
        var bytes = new byte[v.Length];
        for (int i = 0; i < v.Length; i++) bytes[i] = (byte)(255.0 * (v[i] - min) / (max - min));
        var m = new Mat(h, w, MatType.CV_8UC1);
        System.Runtime.InteropServices.Marshal.Copy(bytes, 0, m.Data, bytes.Length);
        return m;
    }

    /// <summary>Velocity of every analysed cell, keyed by (frame, label), from the flow of the raw movie.</summary>
    public static Dictionary<(int Frame, int Label), (double Vx, double Vy)> ForCells(string rawPath, IReadOnlyList<CellRecord> cells, MovieSelection? selection = null)
    {
        var byFrame = FrameRuns.Of(cells).ToDictionary(x => x.Frame, x => (x.Start, x.Count));
        var result = new Dictionary<(int, int), (double, double)>();
        using var movie = LabelMovies.Open(rawPath, selection ?? MovieSelection.None);
        int[]? prev = null; Mat? back = null;   // back = flow (t-1 -> t) while visiting frame t
        int w = movie.Info.Width, h = movie.Info.Height, lastIndex = -1;
        (double, double) Sample(Mat f, double x, double y)
        {
            int xi = Math.Clamp((int)x, 0, w - 1), yi = Math.Clamp((int)y, 0, h - 1);
            var v = f.At<Vec2f>(yi, xi);
            return (v.Item0, v.Item1);
        }
        void Assign(int frame, Mat? before, Mat? after)
        {
            if (!byFrame.TryGetValue(frame, out var run)) return;
            for (int i = run.Start; i < run.Start + run.Count; i++)
            {
                var c = cells[i];
                double x = c.Shape.CentroidX, y = c.Shape.CentroidY;
                (double, double)? a = before is null ? null : Sample(before, x, y), b = after is null ? null : Sample(after, x, y);
                result[(c.Frame, c.Label)] = a is { } p && b is { } q ? (0.5 * (p.Item1 + q.Item1), 0.5 * (p.Item2 + q.Item2)) : (a ?? b ?? (double.NaN, double.NaN));
            }
        }
        foreach (var f in movie.Frames())
        {
            if (prev is not null)
            {
                var fwd = Flow(prev, f.Labels, w, h);   // (t-1 -> t): "after" for frame t-1, "before" for frame t
                Assign(f.Index - 1, back, fwd);
                back?.Dispose();
                back = fwd;
            }
            prev = f.Labels; lastIndex = f.Index;
        }
        if (lastIndex >= 0) Assign(lastIndex, back, null);
        back?.Dispose();
        return result;
    }
}
