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
    /// O(pixels): each direction is one pass over the frame.</summary>
    /// <param name="labels">Row-major label image (0 = background), <paramref name="width"/> x <paramref name="height"/>.</param>
    /// <param name="width">Frame width (px).</param>
    /// <param name="height">Frame height (px).</param>
    /// <param name="maxGapPx">Widest gap that is closed (px, at least 0; 0 = the labelled pixels only).</param>
    public static bool[] Closed(ReadOnlySpan<int> labels, int width, int height, int maxGapPx = MaxGapPx)
    {
        if (width < 0 || height < 0 || labels.Length != width * height)
            throw new ArgumentException($"label image has {labels.Length} pixels, not {width} x {height}", nameof(labels));
        ArgumentOutOfRangeException.ThrowIfNegative(maxGapPx);
        var covered = new bool[labels.Length];
        for (int i = 0; i < labels.Length; i++) covered[i] = labels[i] != 0;
        if (maxGapPx == 0) return covered;
        foreach (var (dx, dy) in Directions)
        {
            // Every line of this direction starts on the left column, or (for the columns and diagonals) on the top or
            // bottom row.
            if (dx == 1)
                for (int y = 0; y < height; y++) FillLine(labels, covered, width, height, 0, y, dx, dy, maxGapPx);
            int startY = dy >= 0 ? 0 : height - 1;
            for (int x = dx == 1 ? 1 : 0; x < width && dy != 0; x++) FillLine(labels, covered, width, height, x, startY, dx, dy, maxGapPx);
        }
        return covered;
    }

    /// <summary>Number of covered pixels of <see cref="Closed"/>.</summary>
    /// <param name="labels">Row-major label image (0 = background).</param>
    /// <param name="width">Frame width (px).</param>
    /// <param name="height">Frame height (px).</param>
    /// <param name="maxGapPx">Widest gap that is closed (px).</param>
    public static int CoveredPixels(ReadOnlySpan<int> labels, int width, int height, int maxGapPx = MaxGapPx)
    {
        var c = Closed(labels, width, height, maxGapPx);
        int n = 0;
        foreach (bool b in c) if (b) n++;
        return n;
    }

    /// <summary>Walks one line from (x, y) in steps (dx, dy); every background run of 1..maxGap pixels between two
    /// labelled pixels of the original image is marked covered.</summary>
    private static void FillLine(ReadOnlySpan<int> labels, bool[] covered, int w, int h, int x, int y, int dx, int dy, int maxGap)
    {
        int lastLabelled = -1, step = 0, lastX = 0, lastY = 0;
        for (; x >= 0 && x < w && y >= 0 && y < h; x += dx, y += dy, step++)
        {
            if (labels[y * w + x] == 0) continue;
            int run = step - lastLabelled - 1;
            if (lastLabelled >= 0 && run > 0 && run <= maxGap)
                for (int k = 1; k <= run; k++) covered[(lastY + k * dy) * w + lastX + k * dx] = true;
            lastLabelled = step; lastX = x; lastY = y;
        }
    }
}
