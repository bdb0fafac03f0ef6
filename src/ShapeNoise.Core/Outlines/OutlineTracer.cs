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
internal static class OutlineTracer
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
        // The box's mask in a pooled buffer (about 5 KB of buffers per outline, 230 000 outlines on the benchmark movie).
        var mask = System.Buffers.ArrayPool<byte>.Shared.Rent(bw * bh);
        try
        {
            Array.Clear(mask, 0, bw * bh);
            for (int y = box.MinY; y <= box.MaxY; y++)
            {
                int src = y * width, dst = (y - oy) * bw - ox;
                for (int x = box.MinX; x <= box.MaxX; x++)
                    if (dense[src + x] == denseIndex) mask[dst + x] = 1;
            }
            int pixels = KeepLargestComponent(mask, bw, bh);
            if (pixels < minAreaPx) return new Outline(box.Label, OutlineStatus.Small, [], pixels);
            float[]? smooth = method == OutlineMethod.Subpixel ? GaussianSmooth(mask, bw, bh, SubpixelSigmaPx) : null;
            return new Outline(box.Label, OutlineStatus.Ok, FollowCracks(mask, bw, bh, method, smooth, ox, oy), pixels);
        }
        finally { System.Buffers.ArrayPool<byte>.Shared.Return(mask); }
    }

    /// <summary>Keeps only the largest 4-connected component of a 0/1 mask (its first w x h bytes; ties: the first in raster
    /// order); returns its size.</summary>
    /// <remarks>Fast path: a flood fill from the first pixel that reaches every set pixel proves there is one component.</remarks>
    public static int KeepLargestComponent(byte[] mask, int w, int h)
    {
        int n = w * h, total = 0;
        for (int i = 0; i < n; i++) total += mask[i];
        int first = Array.IndexOf(mask, (byte)1, 0, n);
        if (first < 0) return 0;
        var stack = System.Buffers.ArrayPool<int>.Shared.Rent(total);
        try
        {
            int size = Fill(mask, w, h, first, 2, stack);          // mark the first component with 2
            if (size == total)
            {
                for (int i = 0; i < n; i++) if (mask[i] == 2) mask[i] = 1;
                return size;
            }
            return KeepLargest(mask, w, h, size, stack);
        }
        finally { System.Buffers.ArrayPool<int>.Shared.Return(stack); }
    }

    /// <summary>Several components (the first marked 2, of <paramref name="firstSize"/> pixels): label them all (1, 2, ... in
    /// a side array), keep the largest.</summary>
    private static int KeepLargest(byte[] mask, int w, int h, int firstSize, int[] stack)
    {
        int n = w * h;
        var comp = new int[n];
        for (int i = 0; i < n; i++) if (mask[i] == 2) { comp[i] = 1; mask[i] = 1; }
        int best = firstSize, bestId = 1, id = 1;
        for (int i = 0; i < n; i++)
        {
            if (mask[i] != 1 || comp[i] != 0) continue;
            id++;
            int size = 0, sp = 0;
            comp[i] = id; stack[sp++] = i;
            while (sp > 0)
            {
                int p = stack[--sp]; size++;
                int x = p % w;
                if (x > 0 && mask[p - 1] != 0 && comp[p - 1] == 0) { comp[p - 1] = id; stack[sp++] = p - 1; }
                if (x < w - 1 && mask[p + 1] != 0 && comp[p + 1] == 0) { comp[p + 1] = id; stack[sp++] = p + 1; }
                if (p >= w && mask[p - w] != 0 && comp[p - w] == 0) { comp[p - w] = id; stack[sp++] = p - w; }
                if (p + w < n && mask[p + w] != 0 && comp[p + w] == 0) { comp[p + w] = id; stack[sp++] = p + w; }
            }
            if (size > best) { best = size; bestId = id; }
        }
        for (int i = 0; i < n; i++) if (comp[i] != bestId) mask[i] = 0;
        return best;
    }

    /// <summary>4-connected flood fill of value-1 pixels from <paramref name="start"/>, writing <paramref name="mark"/>; returns the size.</summary>
    private static int Fill(byte[] mask, int w, int h, int start, byte mark, int[] stack)
    {
        int n = 0, sp = 0, len = w * h;
        mask[start] = mark; stack[sp++] = start;
        while (sp > 0)
        {
            int p = stack[--sp]; n++;
            int x = p % w;
            if (x > 0 && mask[p - 1] == 1) { mask[p - 1] = mark; stack[sp++] = p - 1; }
            if (x < w - 1 && mask[p + 1] == 1) { mask[p + 1] = mark; stack[sp++] = p + 1; }
            if (p >= w && mask[p - w] == 1) { mask[p - w] = mark; stack[sp++] = p - w; }
            if (p + w < len && mask[p + w] == 1) { mask[p + w] = mark; stack[sp++] = p + w; }
        }
        return n;
    }

    /// <summary>Number of cracks between a set pixel and an unset (or outside) 4-neighbour: the outer outline's length plus
    /// that of any hole, so at least the number of vertices <see cref="FollowCracks"/> writes.</summary>
    private static int Cracks(byte[] mask, int w, int h)
    {
        int c = 0;
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x;
                if (mask[i] == 0) continue;
                if (x == 0 || mask[i - 1] == 0) c++;
                if (x == w - 1 || mask[i + 1] == 0) c++;
                if (y == 0 || mask[i - w] == 0) c++;
                if (y == h - 1 || mask[i + w] == 0) c++;
            }
        return c;
    }

    /// <summary>The outer outline of the mask (its first w x h bytes) as vertices, one per crack (before the collinear ones of
    /// <see cref="OutlineMethod.PixelEdge"/> are removed), shifted by (<paramref name="offX"/>, <paramref name="offY"/>).</summary>
    private static Point2[] FollowCracks(byte[] mask, int w, int h, OutlineMethod method, float[]? smooth, int offX, int offY)
    {
        int start = Array.IndexOf(mask, (byte)1, 0, w * h);
        int sx = start % w, sy = start / w;
        // Corners are integer (x, y); pixel (r, c) spans [c, c+1] x [r, r+1]. Start on the top crack of the first pixel,
        // heading +x, inside on the right (right of (dx, dy) with y down is (-dy, dx)).
        int vx = sx, vy = sy, dir = 0;
        // Per direction E, S, W, N: the inside and outside pixel of the crack leaving a corner, and the pixels ahead-right
        // and ahead-left at the corner it reaches, as offsets from the corner it leaves (integer arithmetic, no floors).
        ReadOnlySpan<int> DX = [1, 0, -1, 0], DY = [0, 1, 0, -1];
        ReadOnlySpan<int> inX = [0, -1, -1, 0], inY = [0, 0, -1, -1], outX = [0, 0, -1, -1], outY = [-1, 0, 0, -1];
        var pts = new Point2[Cracks(mask, w, h)];
        int count = 0;
        int guard = 4 * (w + 1) * (h + 1) + 8;
        do
        {
            int dx = DX[dir], dy = DY[dir];
            int ix = vx + inX[dir], iy = vy + inY[dir], ox = vx + outX[dir], oy = vy + outY[dir];
            // Each vertex in the frame's coordinates: the box-relative value, then the box offset added (as before the
            // vertices were written in place: the same two roundings).
            switch (method)
            {
                case OutlineMethod.PixelEdge:
                    pts[count++] = new Point2((double)vx + offX, (double)vy + offY);
                    break;
                case OutlineMethod.Midpoint:
                    pts[count++] = new Point2(vx + 0.5 * dx + offX, vy + 0.5 * dy + offY);
                    break;
                default:
                {
                    double fi = smooth![iy * w + ix], fo = smooth[oy * w + ox];
                    double t = fi > 0.5 && fo < 0.5 ? (fi - 0.5) / (fi - fo) : 0.5;
                    pts[count++] = new Point2(ix + 0.5 + t * (ox - ix) + offX, iy + 0.5 + t * (oy - iy) + offY);
                    break;
                }
            }
            vx += dx; vy += dy;
            // The crack that would continue straight has inside pixel (vx + inX, vy + inY) and outside (vx + outX, vy + outY).
            int arX = vx + inX[dir], arY = vy + inY[dir], alX = vx + outX[dir], alY = vy + outY[dir];
            bool ar = arX >= 0 && arY >= 0 && arX < w && arY < h && mask[arY * w + arX] != 0;
            bool al = alX >= 0 && alY >= 0 && alX < w && alY < h && mask[alY * w + alX] != 0;
            if (!ar) dir = (dir + 1) & 3;          // turn right (also at diagonal contacts: 4-connectivity)
            else if (al) dir = (dir + 3) & 3;      // turn left
            if (--guard < 0 || count == pts.Length && (vx != sx || vy != sy || dir != 0)) throw new InvalidOperationException("outline tracing did not close");
        } while (vx != sx || vy != sy || dir != 0);

        if (count < pts.Length) Array.Resize(ref pts, count);   // the mask has holes
        return method == OutlineMethod.PixelEdge ? RemoveCollinear(pts) : pts;
    }

    private static Point2[] RemoveCollinear(Point2[] pts)
    {
        var kept = new List<Point2>(pts.Length);
        int n = pts.Length;
        for (int i = 0; i < n; i++)
        {
            var a = pts[(i + n - 1) % n]; var b = pts[i]; var c = pts[(i + 1) % n];
            if ((b.X - a.X) * (c.Y - b.Y) - (b.Y - a.Y) * (c.X - b.X) != 0) kept.Add(b);
        }
        return kept.ToArray();
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
