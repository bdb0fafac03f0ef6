using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;
using OpenCvSharp;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Drawing;

/// <summary>
/// defects-frame-NNN.png: a few frames drawn with OpenCV — cell boundaries, each cell's long axis as a short line,
/// +1/2 defects as a comet (filled head toward e_head, tail behind) and -1/2 defects as a three-armed symbol.
/// </summary>
public sealed class DefectOverlays(int frames = 3) : IFrameFigures
{
    /// <summary>The caption shared by the overlay frames (one strip in the report).</summary>
    public const string Caption = "Frames with each cell's long axis (short lines), +1/2 defects as red comets (the dot is the head) and −1/2 defects as blue three-armed symbols.";

    /// <summary>Draws the chosen frames (first, last, evenly between) and hands them back as defects-frame-NNN.png figures, in frame order.</summary>
    public IReadOnlyList<Figure> Draw(AnalysisResult result, Func<ILabelMovie> reopen)
    {
        var figures = new List<Figure>();
        int total = result.Counts.Frames;
        if (total == 0) return figures;
        var wanted = Enumerable.Range(0, frames).Select(i => frames == 1 ? 0 : (int)Math.Round(i * (total - 1) / (double)(frames - 1))).Distinct().ToHashSet();
        var cellsByFrame = result.Cells.Where(c => wanted.Contains(c.Frame)).GroupBy(c => c.Frame).ToDictionary(g => g.Key, g => g.ToList());
        var defectsByFrame = result.Defects.Observations.GroupBy(o => o.Frame).ToDictionary(g => g.Key, g => g.ToList());
        using var movie = reopen();
        foreach (var frame in movie.Frames(wanted.Contains))
        {
            using var img = Draw(frame, cellsByFrame.GetValueOrDefault(frame.Index) ?? [], defectsByFrame.GetValueOrDefault(frame.Index) ?? [], result.Defects.CoarsePx);
            figures.Add(new Figure($"defects-frame-{frame.Index:D3}.png", Caption, img.ImEncode(".png")));
            if (frame.Index >= wanted.Max()) break;
        }
        return figures;
    }

    /// <summary>Draws one frame (scaled up so the symbols stay legible on small movies).</summary>
    public static Mat Draw(LabelFrame f, IReadOnlyList<CellRecord> cells, IReadOnlyList<Nematic.DefectObservation> defects, double coarsePx)
    {
        int scale = Math.Max(1, (int)Math.Ceiling(800.0 / Math.Max(f.Width, f.Height)));
        var bgr = new byte[f.Width * f.Height * 3];
        for (int y = 0; y < f.Height; y++)
            for (int x = 0; x < f.Width; x++)
            {
                int l = f.Labels[y * f.Width + x];
                bool edge = l == 0 || (x + 1 < f.Width && f.Labels[y * f.Width + x + 1] != l) || (y + 1 < f.Height && f.Labels[(y + 1) * f.Width + x] != l);
                byte v = edge ? (byte)120 : (byte)235;
                int o = 3 * (y * f.Width + x);
                bgr[o] = bgr[o + 1] = bgr[o + 2] = v;
            }
        var img = new Mat(f.Height, f.Width, MatType.CV_8UC3);
        System.Runtime.InteropServices.Marshal.Copy(bgr, 0, img.Data, bgr.Length);
        if (scale > 1) Cv2.Resize(img, img, new Size(f.Width * scale, f.Height * scale), 0, 0, InterpolationFlags.Nearest);
        Point P(double x, double y) => new((int)Math.Round(x * scale), (int)Math.Round(y * scale));
        foreach (var c in cells)
        {
            var s = c.Shape;
            double half = 0.35 * s.LengthPx, dx = half * Math.Cos(s.ThetaRad), dy = half * Math.Sin(s.ThetaRad);
            Cv2.Line(img, P(s.CentroidX - dx, s.CentroidY - dy), P(s.CentroidX + dx, s.CentroidY + dy), new Scalar(160, 90, 30), Math.Max(1, scale / 2), LineTypes.AntiAlias);
        }
        double size = 0.6 * coarsePx;
        foreach (var o in defects)
        {
            var d = o.Defect;
            if (d.Charge == 0.5 && double.IsFinite(d.HeadX))
            {
                var head = P(d.X + 0.5 * size * d.HeadX, d.Y + 0.5 * size * d.HeadY);
                Cv2.Line(img, P(d.X - size * d.HeadX, d.Y - size * d.HeadY), head, new Scalar(20, 20, 200), 2 * Math.Max(1, scale / 2), LineTypes.AntiAlias);
                Cv2.Circle(img, head, (int)(0.25 * size * scale), new Scalar(20, 20, 200), -1, LineTypes.AntiAlias);
            }
            else if (d.Charge == -0.5)
            {
                for (int k = 0; k < 3; k++)
                {
                    double a = -Math.PI / 2 + k * 2 * Math.PI / 3;
                    Cv2.Line(img, P(d.X, d.Y), P(d.X + size * Math.Cos(a), d.Y + size * Math.Sin(a)), new Scalar(200, 60, 20), 2 * Math.Max(1, scale / 2), LineTypes.AntiAlias);
                }
            }
        }
        return img;
    }
}
