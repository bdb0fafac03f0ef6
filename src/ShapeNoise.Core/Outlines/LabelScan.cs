using ShapeNoise.Reading;

namespace ShapeNoise.Outlines;

/// <summary>Bounding box and pixel count of one label in one frame (inclusive pixel bounds).</summary>
internal readonly record struct LabelBox(int Label, int MinX, int MinY, int MaxX, int MaxY, int PixelCount);

/// <summary>One pass over a frame: every label's bounding box and pixel count, and a dense index image
/// (0 = background, i + 1 = the i-th label in <see cref="Boxes"/>).</summary>
internal sealed class LabelScan
{
    /// <summary>Every label's box and pixel count, in order of first appearance in raster order.</summary>
    public LabelBox[] Boxes { get; }
    /// <summary>Row-major dense index image: 0 = background, i + 1 = the label of <see cref="Boxes"/>[i].</summary>
    public int[] DenseImage { get; }
    /// <summary>Frame width (px).</summary>
    public int Width { get; }
    /// <summary>Frame height (px).</summary>
    public int Height { get; }

    private LabelScan(LabelBox[] boxes, int[] dense, int w, int h) { Boxes = boxes; DenseImage = dense; Width = w; Height = h; }

    /// <summary>Scans <paramref name="frame"/> once. Labels are numbered densely in order of first appearance in raster order.
    /// <paramref name="reuse"/>, when given and of the frame's size, becomes the <see cref="DenseImage"/> (every pixel is
    /// written, background ones with 0): the caller hands back the dense image of a scan it no longer reads.</summary>
    public static LabelScan Of(LabelFrame frame, int[]? reuse = null)
    {
        int w = frame.Width, h = frame.Height;
        var labels = frame.Labels;
        int[] dense = reuse is not null && reuse.Length == labels.Length ? reuse : new int[labels.Length];
        var slot = new Dictionary<int, int>();
        // Per label: min x, max x, min y, max y, pixel count, id; plain arrays grown by doubling (the loop below touches
        // them once per run of a label along a row, so no list indexers there).
        var minX = new int[256]; var maxX = new int[256]; var minY = new int[256]; var maxY = new int[256];
        var count = new int[256]; var ids = new int[256];
        int n = 0, lastLabel = 0, lastSlot = -1;
        for (int y = 0; y < h; y++)
        {
            int row = y * w;
            var line = labels.AsSpan(row, w);
            var denseLine = dense.AsSpan(row, w);
            // Run by run: a label's pixels along a row are contiguous runs (vector-wide search for the run's end and fill).
            for (int x = 0; x < line.Length;)
            {
                int l = line[x];
                int end = line[x..].IndexOfAnyExcept(l);
                end = end < 0 ? line.Length : x + end;
                if (l == 0) { denseLine[x..end].Clear(); x = end; continue; }
                int s;
                if (l == lastLabel) s = lastSlot;
                else
                {
                    if (!slot.TryGetValue(l, out s))
                    {
                        if (n == ids.Length)
                        {
                            int size = 2 * n;
                            Array.Resize(ref minX, size); Array.Resize(ref maxX, size); Array.Resize(ref minY, size);
                            Array.Resize(ref maxY, size); Array.Resize(ref count, size); Array.Resize(ref ids, size);
                        }
                        s = n++; slot[l] = s; ids[s] = l;
                        minX[s] = x; maxX[s] = end - 1; minY[s] = y; maxY[s] = y;
                    }
                    lastLabel = l; lastSlot = s;
                }
                denseLine[x..end].Fill(s + 1);
                count[s] += end - x;
                if (x < minX[s]) minX[s] = x;
                if (end - 1 > maxX[s]) maxX[s] = end - 1;
                maxY[s] = y;
                x = end;
            }
        }
        var boxes = new LabelBox[n];
        for (int i = 0; i < boxes.Length; i++) boxes[i] = new LabelBox(ids[i], minX[i], minY[i], maxX[i], maxY[i], count[i]);
        return new LabelScan(boxes, dense, w, h);
    }
}
