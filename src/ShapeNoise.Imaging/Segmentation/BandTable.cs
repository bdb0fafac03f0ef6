using System.Collections.Concurrent;

namespace ShapeNoise.Imaging.Segmentation;

/// <summary>
/// Area of a pixel within half a band width of the cracks around it (docs/segmentation.md#junction-model-fit): for a
/// band of width w ≤ 2 px centred on the pixel edges between different labels, only 12 edges can reach the pixel: its own
/// four and the two further edges that leave each of its corners. The table holds the covered area for each of the 4096
/// sets of those edges, from 32 x 32 sub-samples of the pixel.
/// </summary>
/// <remarks>Bits: 0-3 the left, right, top and bottom edges; then per corner (top-left, top-right, bottom-left,
/// bottom-right) the horizontal edge leaving it outwards, then the vertical one.</remarks>
public static class BandTable
{
    private static readonly ConcurrentDictionary<double, double[]> Cache = new();

    /// <summary>The table for a band of width <paramref name="widthPx"/> (0 &lt; w ≤ 2 px); 0 = the pixel line: every
    /// pixel with a crack on one of its own edges fully covered, no other (a junction drawn as the pixels on either side of
    /// every label change, as label-derived renders often do).</summary>
    public static double[] Of(double widthPx)
    {
        if (widthPx == 0) return PixelLine;
        if (!(widthPx > 0 && widthPx <= 2)) throw new ArgumentOutOfRangeException(nameof(widthPx), "band width must be in (0, 2] px, or 0");
        return Cache.GetOrAdd(widthPx, Build);
    }

    private static readonly double[] PixelLine = Enumerable.Range(0, 4096).Select(b => (b & 15) != 0 ? 1.0 : 0.0).ToArray();

    /// <summary>The 12 segments (x0, y0, x1, y1) in pixel coordinates, pixel centre at the origin.</summary>
    private static readonly double[][] Segments =
    [
        [-0.5, -0.5, -0.5, 0.5], [0.5, -0.5, 0.5, 0.5], [-0.5, -0.5, 0.5, -0.5], [-0.5, 0.5, 0.5, 0.5],
        [-1.5, -0.5, -0.5, -0.5], [-0.5, -1.5, -0.5, -0.5],
        [0.5, -0.5, 1.5, -0.5], [0.5, -1.5, 0.5, -0.5],
        [-1.5, 0.5, -0.5, 0.5], [-0.5, 0.5, -0.5, 1.5],
        [0.5, 0.5, 1.5, 0.5], [0.5, 0.5, 0.5, 1.5],
    ];

    private static double[] Build(double widthPx)
    {
        const int n = 32;
        double half2 = widthPx * widthPx / 4;
        // For each sub-sample, the set of segments within reach; a configuration covers the sample when it shares one.
        var reach = new int[n * n];
        for (int k = 0; k < n * n; k++)
        {
            double px = ((k % n) + 0.5) / n - 0.5, py = ((k / n) + 0.5) / n - 0.5;
            for (int s = 0; s < Segments.Length; s++)
                if (Distance2(px, py, Segments[s]) <= half2) reach[k] |= 1 << s;
        }
        var table = new double[4096];
        for (int bits = 0; bits < 4096; bits++)
        {
            int hit = 0;
            foreach (var r in reach) if ((r & bits) != 0) hit++;
            table[bits] = hit / (double)(n * n);
        }
        return table;
    }

    private static double Distance2(double px, double py, double[] s)
    {
        double vx = s[2] - s[0], vy = s[3] - s[1];
        double t = Math.Clamp(((px - s[0]) * vx + (py - s[1]) * vy) / (vx * vx + vy * vy), 0, 1);
        double dx = px - s[0] - t * vx, dy = py - s[1] - t * vy;
        return dx * dx + dy * dy;
    }
}
