using ShapeNoise.Shape;

namespace ShapeNoise.Outlines;

/// <summary>One traced outline: its label, status, polygon (image coordinates) and the pixel count of the component traced.</summary>
public sealed record Outline(int Label, OutlineStatus Status, Point2[] Vertices, int ComponentPixels);

/// <summary>Outer boundary of the largest 4-connected component of a label, as a closed polygon.</summary>
/// <remarks>
/// The boundary is followed crack by crack (the edges between an inside and an outside pixel) keeping the inside on the
/// right and turning right at diagonal contacts, which is the 4-connected rule (Rosenfeld A. (1970), "Connectivity in
/// digital pictures", J. ACM 17:146-160). Each crack is one edge crossing of marching squares (Lorensen W.E. and Cline H.E.
/// (1987), "Marching cubes", Computer Graphics 21:163-169) with saddles split as 4-connectivity requires, so the crack
/// sequence gives the midpoint and sub-pixel polygons in order without a separate assembly step.
/// </remarks>
public static class OutlineTracer
{
    /// <summary>Gaussian width (px) of the smoothing used by <see cref="OutlineMethod.Subpixel"/>.</summary>
    public const double SubpixelSigmaPx = 1.0;

    /// <summary>
    /// Traces label <paramref name="box"/>.Label of a dense-indexed frame (see <see cref="LabelScan"/>; <paramref name="denseIndex"/>
    /// is the box's index + 1). Objects within <paramref name="borderMarginPx"/> of the image edge are reported as
    /// <see cref="OutlineStatus.Border"/>, components smaller than <paramref name="minAreaPx"/> as <see cref="OutlineStatus.Small"/>.
    /// </summary>
    public static Outline Trace(ReadOnlySpan<int> dense, int width, int height, LabelBox box, int denseIndex,
        OutlineMethod method, int borderMarginPx, int minAreaPx)
    {
        if (box.MinX < borderMarginPx || box.MinY < borderMarginPx || box.MaxX > width - 1 - borderMarginPx || box.MaxY > height - 1 - borderMarginPx)
            return new Outline(box.Label, OutlineStatus.Border, [], box.PixelCount);
        if (box.PixelCount < minAreaPx)
            return new Outline(box.Label, OutlineStatus.Small, [], box.PixelCount);

        int pad = method == OutlineMethod.Subpixel ? (int)Math.Ceiling(3 * SubpixelSigmaPx) + 1 : 1;
        int ox = box.MinX - pad, oy = box.MinY - pad;
        int bw = box.MaxX - box.MinX + 1 + 2 * pad, bh = box.MaxY - box.MinY + 1 + 2 * pad;
        var mask = new byte[bw * bh];
        for (int y = box.MinY; y <= box.MaxY; y++)
        {
            int src = y * width, dst = (y - oy) * bw - ox;
            for (int x = box.MinX; x <= box.MaxX; x++)
                if (dense[src + x] == denseIndex) mask[dst + x] = 1;
        }
        int pixels = KeepLargestComponent(mask, bw, bh);
        if (pixels < minAreaPx) return new Outline(box.Label, OutlineStatus.Small, [], pixels);

        float[]? smooth = method == OutlineMethod.Subpixel ? GaussianSmooth(mask, bw, bh, SubpixelSigmaPx) : null;
        var verts = FollowCracks(mask, bw, bh, method, smooth);
        for (int i = 0; i < verts.Count; i++) verts[i] = new Point2(verts[i].X + ox, verts[i].Y + oy);
        return new Outline(box.Label, OutlineStatus.Ok, verts.ToArray(), pixels);
    }

    /// <summary>Keeps only the largest 4-connected component of a 0/1 mask (ties: the first in raster order); returns its size.</summary>
    public static int KeepLargestComponent(byte[] mask, int w, int h)
    {
        var comp = new int[mask.Length];
        var stack = new Stack<int>();
        int best = 0, bestId = 0, id = 0;
        for (int i = 0; i < mask.Length; i++)
        {
            if (mask[i] == 0 || comp[i] != 0) continue;
            id++;
            int size = 0;
            comp[i] = id; stack.Push(i);
            while (stack.Count > 0)
            {
                int p = stack.Pop(); size++;
                int x = p % w, y = p / w;
                if (x > 0 && mask[p - 1] != 0 && comp[p - 1] == 0) { comp[p - 1] = id; stack.Push(p - 1); }
                if (x < w - 1 && mask[p + 1] != 0 && comp[p + 1] == 0) { comp[p + 1] = id; stack.Push(p + 1); }
                if (y > 0 && mask[p - w] != 0 && comp[p - w] == 0) { comp[p - w] = id; stack.Push(p - w); }
                if (y < h - 1 && mask[p + w] != 0 && comp[p + w] == 0) { comp[p + w] = id; stack.Push(p + w); }
            }
            if (size > best) { best = size; bestId = id; }
        }
        if (id > 1)
            for (int i = 0; i < mask.Length; i++) if (comp[i] != bestId) mask[i] = 0;
        return best;
    }

    private static List<Point2> FollowCracks(byte[] mask, int w, int h, OutlineMethod method, float[]? smooth)
    {
        int start = Array.IndexOf(mask, (byte)1);
        int sx = start % w, sy = start / w;
        // Corners are integer (x, y); pixel (r, c) spans [c, c+1] x [r, r+1]. Start on the top crack of the first pixel, heading +x.
        int vx = sx, vy = sy, dx = 1, dy = 0;
        var pts = new List<Point2>(64);
        bool Inside(int px, int py) => px >= 0 && py >= 0 && px < w && py < h && mask[py * w + px] != 0;
        int guard = 4 * (w + 1) * (h + 1) + 8;
        do
        {
            // Crack from (vx, vy) to (vx+dx, vy+dy); inside on the right (right of (dx,dy) with y down is (-dy, dx)).
            int rx = -dy, ry = dx;
            // Pixel indices of the inside (right) and outside (left) pixels of this crack.
            double mx = vx + 0.5 * dx, my = vy + 0.5 * dy;
            int inX = (int)Math.Floor(mx + 0.5 * rx), inY = (int)Math.Floor(my + 0.5 * ry);
            int outX = (int)Math.Floor(mx - 0.5 * rx), outY = (int)Math.Floor(my - 0.5 * ry);
            switch (method)
            {
                case OutlineMethod.PixelEdge:
                    pts.Add(new Point2(vx, vy));
                    break;
                case OutlineMethod.Midpoint:
                    pts.Add(new Point2(mx, my));
                    break;
                default:
                {
                    double fi = smooth![inY * w + inX], fo = smooth[outY * w + outX];
                    double t = fi > 0.5 && fo < 0.5 ? (fi - 0.5) / (fi - fo) : 0.5;
                    double cxIn = inX + 0.5, cyIn = inY + 0.5, cxOut = outX + 0.5, cyOut = outY + 0.5;
                    pts.Add(new Point2(cxIn + t * (cxOut - cxIn), cyIn + t * (cyOut - cyIn)));
                    break;
                }
            }
            vx += dx; vy += dy;
            // Pixels ahead-right and ahead-left of the new corner.
            double ax = vx + 0.5 * dx, ay = vy + 0.5 * dy;
            bool ar = Inside((int)Math.Floor(ax + 0.5 * rx), (int)Math.Floor(ay + 0.5 * ry));
            bool al = Inside((int)Math.Floor(ax - 0.5 * rx), (int)Math.Floor(ay - 0.5 * ry));
            if (!ar) { int t = dx; dx = -dy; dy = t; }          // turn right (also at diagonal contacts: 4-connectivity)
            else if (al) { int t = dx; dx = dy; dy = -t; }      // turn left
            if (--guard < 0) throw new InvalidOperationException("outline tracing did not close");
        } while (vx != sx || vy != sy || dx != 1 || dy != 0);

        if (method == OutlineMethod.PixelEdge) RemoveCollinear(pts);
        return pts;
    }

    private static void RemoveCollinear(List<Point2> pts)
    {
        var kept = new List<Point2>(pts.Count);
        int n = pts.Count;
        for (int i = 0; i < n; i++)
        {
            var a = pts[(i + n - 1) % n]; var b = pts[i]; var c = pts[(i + 1) % n];
            if ((b.X - a.X) * (c.Y - b.Y) - (b.Y - a.Y) * (c.X - b.X) != 0) kept.Add(b);
        }
        pts.Clear(); pts.AddRange(kept);
    }

    /// <summary>Separable Gaussian blur of a 0/1 mask (kernel truncated at 3 sigma, normalised), zero outside.</summary>
    public static float[] GaussianSmooth(byte[] mask, int w, int h, double sigma)
    {
        int r = (int)Math.Ceiling(3 * sigma);
        var k = new float[2 * r + 1];
        double sum = 0;
        for (int i = -r; i <= r; i++) { k[i + r] = (float)Math.Exp(-0.5 * i * i / (sigma * sigma)); sum += k[i + r]; }
        for (int i = 0; i < k.Length; i++) k[i] = (float)(k[i] / sum);
        var tmp = new float[w * h];
        var outp = new float[w * h];
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                float s = 0;
                for (int i = -r; i <= r; i++) { int xx = x + i; if (xx >= 0 && xx < w) s += k[i + r] * mask[y * w + xx]; }
                tmp[y * w + x] = s;
            }
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                float s = 0;
                for (int i = -r; i <= r; i++) { int yy = y + i; if (yy >= 0 && yy < h) s += k[i + r] * tmp[yy * w + x]; }
                outp[y * w + x] = s;
            }
        return outp;
    }
}
