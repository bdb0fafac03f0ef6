using ShapeNoise.Outlines;
using ShapeNoise.Reading;

namespace ShapeNoise.Tests.Outlines;

/// <summary>
/// The one-pass label scan against its definition computed pixel by pixel here: per label, the bounding box (inclusive
/// pixel bounds) and pixel count; labels numbered in order of first appearance in raster order; the dense image holds
/// that number + 1 (0 = background).
/// </summary>
public class LabelScanTests
{
    [Theory]
    [InlineData(1, 0.0)]
    [InlineData(2, 0.3)]
    [InlineData(3, 0.9)]
    public void Of_RandomLabelImage_MatchesBoxesCountsAndOrderByDefinition(int seed, double speckle)
    {
        // Rectangles of random labels painted over each other (runs that end, restart and touch), then a fraction of
        // pixels set to random labels or background (runs of one pixel), on a 53 x 37 frame.
        int w = 53, h = 37; var rng = new Random(seed); var img = new int[w * h];
        for (int r = 0; r < 40; r++)
        {
            int x0 = rng.Next(w), y0 = rng.Next(h), x1 = Math.Min(w, x0 + 1 + rng.Next(15)), y1 = Math.Min(h, y0 + 1 + rng.Next(10)), l = rng.Next(0, 25);
            for (int y = y0; y < y1; y++) for (int x = x0; x < x1; x++) img[y * w + x] = l == 0 ? 0 : 1000 + l;
        }
        for (int i = 0; i < img.Length; i++) if (rng.NextDouble() < speckle * 0.2) img[i] = rng.Next(3) == 0 ? 0 : 1000 + rng.Next(1, 25);

        var scan = LabelScan.Of(new LabelFrame(0, w, h, img));
        var order = new List<int>();
        foreach (int l in img) if (l != 0 && !order.Contains(l)) order.Add(l);
        Assert.Equal(order, scan.Boxes.Select(b => b.Label));
        for (int k = 0; k < order.Count; k++)
        {
            int l = order[k], minX = w, minY = h, maxX = -1, maxY = -1, n = 0;
            for (int y = 0; y < h; y++)
                for (int x = 0; x < w; x++)
                    if (img[y * w + x] == l) { n++; minX = Math.Min(minX, x); maxX = Math.Max(maxX, x); minY = Math.Min(minY, y); maxY = Math.Max(maxY, y); }
            Assert.Equal(new LabelBox(l, minX, minY, maxX, maxY, n), scan.Boxes[k]);
        }
        for (int i = 0; i < img.Length; i++) Assert.Equal(img[i] == 0 ? 0 : order.IndexOf(img[i]) + 1, scan.DenseImage[i]);
        // Scanned into a handed-back dense image full of another frame's values: the same boxes and dense image.
        var again = LabelScan.Of(new LabelFrame(0, w, h, img), Enumerable.Repeat(-7, w * h).ToArray());
        Assert.Equal(scan.Boxes, again.Boxes);
        Assert.Equal(scan.DenseImage, again.DenseImage);
    }
}
