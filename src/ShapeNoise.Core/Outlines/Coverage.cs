namespace ShapeNoise.Outlines;

/// <summary>
/// Field coverage of a label frame with thin gaps between masks closed (docs/defects.md#where-defects-apply): many
/// segmenters leave 1-3 px of background between touching cells, which would make a confluent tissue look sparse.
/// </summary>
/// <remarks>The covered set is the union of the linear closings of the foreground by segments of
/// <see cref="MaxGapPx"/> + 1 pixels along the rows, the columns and the two diagonals. A closing by a structuring element
/// B is the dilation by B followed by the erosion by B (Serra J. (1982), Image Analysis and Mathematical Morphology,
/// Academic Press, ch. 2; Soille P. (2003), Morphological Image Analysis, 2nd ed., Springer, ch. 4, including closings by
/// line segments). A 1-D closing by a segment of n pixels fills exactly the background runs of at most n - 1 pixels with
/// foreground at both ends; runs that reach the image border are never filled. So thin gaps between neighbours close,
/// while the wide background between isolated cells stays background.</remarks>
public static class Coverage
{
    /// <summary>Widest run of background (px, along a row, a column or a diagonal) between labelled pixels that counts
    /// as covered: masks at most this far apart count as touching (docs/defects.md#where-defects-apply).</summary>
    public const int MaxGapPx = 3;

    /// <summary>Steps of the four scan directions: rows, columns, the main diagonal and the anti-diagonal.</summary>
    private static readonly (int Dx, int Dy)[] Directions = [(1, 0), (0, 1), (1, 1), (1, -1)];

    /// <summary>Closed foreground: covered[i] = labels[i] != 0, or pixel i lies in a run of at most
    /// <paramref name="maxGapPx"/> background pixels, along a row, column or diagonal, with labelled pixels at both ends.
    /// O(pixels + background pixels x maxGapPx): only background pixels are examined, each in the four directions.</summary>
    /// <param name="labels">Row-major label image (0 = background), <paramref name="width"/> x <paramref name="height"/>.</param>
    /// <param name="width">Frame width (px).</param>
    /// <param name="height">Frame height (px).</param>
    /// <param name="maxGapPx">Widest gap that is closed (px, at least 0; 0 = the labelled pixels only).</param>
    public static bool[] Closed(ReadOnlySpan<int> labels, int width, int height, int maxGapPx = MaxGapPx)
    {
        Check(labels, width, height, maxGapPx);
        var covered = new bool[labels.Length];
        for (int y = 0, i = 0; y < height; y++)
            for (int x = 0; x < width; x++, i++)
                covered[i] = labels[i] != 0 || InGap(labels, width, height, x, y, maxGapPx);
        return covered;
    }

    /// <summary>Number of covered pixels of <see cref="Closed"/>, without building the mask: a confluent frame has few
    /// background pixels, and only those are examined.</summary>
    /// <param name="labels">Row-major label image (0 = background).</param>
    /// <param name="width">Frame width (px).</param>
    /// <param name="height">Frame height (px).</param>
    /// <param name="maxGapPx">Widest gap that is closed (px).</param>
    public static int CoveredPixels(ReadOnlySpan<int> labels, int width, int height, int maxGapPx = MaxGapPx)
    {
        Check(labels, width, height, maxGapPx);
        int n = 0;
        for (int y = 0; y < height; y++)
        {
            var row = labels.Slice(y * width, width);
            for (int x = row.IndexOf(0); x >= 0; x = NextBackground(row, x + 1))
                if (!InGap(labels, width, height, x, y, maxGapPx)) n++;
        }
        return labels.Length - n;
    }

    private static int NextBackground(ReadOnlySpan<int> row, int from)
    {
        int k = row[from..].IndexOf(0);
        return k < 0 ? -1 : from + k;
    }

    private static void Check(ReadOnlySpan<int> labels, int width, int height, int maxGapPx)
    {
        if (width < 0 || height < 0 || labels.Length != width * height)
            throw new ArgumentException($"label image has {labels.Length} pixels, not {width} x {height}", nameof(labels));
        ArgumentOutOfRangeException.ThrowIfNegative(maxGapPx);
    }

    /// <summary>Whether background pixel (x, y) lies, in one of the four directions, in a background run of at most
    /// <paramref name="maxGap"/> pixels with a labelled pixel at each end: b background pixels behind it and f ahead, the
    /// labelled ends inside the frame, b + f + 1 &lt;= maxGap.</summary>
    private static bool InGap(ReadOnlySpan<int> labels, int w, int h, int x, int y, int maxGap)
    {
        if (labels[y * w + x] != 0 || maxGap == 0) return false;
        foreach (var (dx, dy) in Directions)
        {
            int b = RunTo(labels, w, h, x, y, -dx, -dy, maxGap);
            if (b < 0) continue;
            int f = RunTo(labels, w, h, x, y, dx, dy, maxGap - b);
            if (f >= 0 && b + f + 1 <= maxGap) return true;
        }
        return false;
    }

    /// <summary>Background pixels between (x, y) and the first labelled pixel in direction (dx, dy), if that pixel is inside
    /// the frame within <paramref name="reach"/> steps; -1 otherwise.</summary>
    private static int RunTo(ReadOnlySpan<int> labels, int w, int h, int x, int y, int dx, int dy, int reach)
    {
        for (int k = 1; k <= reach; k++)
        {
            int xx = x + k * dx, yy = y + k * dy;
            if (xx < 0 || xx >= w || yy < 0 || yy >= h) return -1;
            if (labels[yy * w + xx] != 0) return k - 1;
        }
        return -1;
    }
}
