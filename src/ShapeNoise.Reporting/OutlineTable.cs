using System.Globalization;
using CsvHelper;
using CsvHelper.Configuration;
using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Shape;
using ShapeNoise.Tracking;

namespace ShapeNoise.Reading;

/// <summary>
/// Cell outlines given as a table (long format, docs/inputs.md): columns <c>frame,cell,x,y</c>, one row per vertex, the
/// vertices of one cell in one frame on consecutive rows in order around the outline; x, y in px with the image
/// convention (x = column, y = row, pixel centres at +0.5). Analysed exactly like label masks from the outline stage
/// on. Cells are linked between consecutive frames by their ids (<c>--ids-are-tracks</c>) or else by an optimal
/// one-to-one assignment of centroids within a maximum displacement (Hungarian algorithm).
/// </summary>
public sealed class OutlineTable
{
    /// <summary>The table file.</summary>
    public string Path { get; }
    /// <summary>Frames in ascending order, each with its outlines (Label = the cell id of the table; text ids numbered 1, 2, … in order of first appearance).</summary>
    public IReadOnlyList<(int Frame, Outline[] Outlines)> Frames { get; }
    /// <summary>Cells skipped because they had fewer than 3 vertices (counted, never silently lost).</summary>
    public int SkippedFewVertices { get; }
    /// <summary>Size, frame count and units of the table as a movie.</summary>
    public MovieInfo Info { get; }
    /// <summary>What the analysis must report about the table (skipped cells, frames missing between others).</summary>
    public IReadOnlyList<string> Warnings { get; }

    private OutlineTable(string path, List<(int, Outline[])> frames, int skipped, MovieInfo info, List<string> warnings)
    { Path = path; Frames = frames; SkippedFewVertices = skipped; Info = info; Warnings = warnings; }

    /// <summary>
    /// Reads a table. Every malformed row (too few or too many fields, a frame that is not an integer ≥ 0, an empty cell
    /// id, a coordinate that is not a finite number) is an <see cref="InputException"/> naming the file and the row's
    /// line number (1-based, the header is line 1). Cell ids that are all positive integers are kept; otherwise (text, 0 or negative ids) every id is
    /// numbered 1, 2, … in order of first appearance in the file (deterministic; the text ids themselves are not kept).
    /// </summary>
    public static OutlineTable Read(string path, double? pixelSizeUm, double? frameIntervalMin)
    {
        if (!File.Exists(path)) throw new InputException(path, "no such file");
        var ci = CultureInfo.InvariantCulture;
        var byFrame = new SortedDictionary<int, List<(string Id, Point2[] Vertices)>>();
        var idsInFrame = new Dictionary<int, HashSet<string>>();
        var firstSeen = new Dictionary<string, int>(StringComparer.Ordinal);
        bool allInteger = true;
        int skipped = 0;
        double maxX = 0, maxY = 0;
        using (var reader = new StreamReader(path))
        using (var csv = new CsvReader(reader, new CsvConfiguration(ci)))
        {
            if (!csv.Read() || !csv.ReadHeader()) throw new InputException(path, "is empty (no header)");
            var header = csv.HeaderRecord!;
            foreach (var col in new[] { "frame", "cell", "x", "y" })
            {
                if (!header.Contains(col)) throw new InputException(path, $"has no column '{col}' (an outline table needs frame,cell,x,y)");
                if (Array.IndexOf(header, col) != Array.LastIndexOf(header, col)) throw new InputException(path, $"has the column '{col}' twice");
            }
            int fi = Array.IndexOf(header, "frame"), cI = Array.IndexOf(header, "cell"), xi = Array.IndexOf(header, "x"), yi = Array.IndexOf(header, "y");
            var pts = new List<Point2>();
            int curFrame = int.MinValue; string? curCell = null; long curLine = 0;
            void Flush()
            {
                if (curCell is null) return;
                if (pts.Count < 3) { skipped++; pts.Clear(); return; }
                if (!idsInFrame.TryGetValue(curFrame, out var ids)) idsInFrame[curFrame] = ids = new HashSet<string>(StringComparer.Ordinal);
                if (!ids.Add(curCell)) throw new InputException(path, $"row {curLine}: cell {curCell} appears twice in frame {curFrame} (its vertices must be on consecutive rows)");
                if (!byFrame.TryGetValue(curFrame, out var list)) byFrame[curFrame] = list = [];
                list.Add((curCell, pts.ToArray()));
                pts.Clear();
            }
            while (csv.Read())
            {
                long line = csv.Parser.RawRow;
                if (csv.Parser.Count != header.Length)
                    throw new InputException(path, $"row {line}: {csv.Parser.Count} field(s), the header has {header.Length} ({string.Join(',', header)})");
                string fs = csv.GetField(fi) ?? "", cs = (csv.GetField(cI) ?? "").Trim(), xs = csv.GetField(xi) ?? "", ys = csv.GetField(yi) ?? "";
                if (!int.TryParse(fs, NumberStyles.Integer, ci, out int frame) || frame < 0) throw new InputException(path, $"row {line}: frame '{fs}' is not a non-negative integer");
                if (cs.Length == 0) throw new InputException(path, $"row {line}: the cell id is empty");
                if (!double.TryParse(xs, NumberStyles.Float, ci, out double x) || !double.TryParse(ys, NumberStyles.Float, ci, out double y) || !double.IsFinite(x) || !double.IsFinite(y))
                    throw new InputException(path, $"row {line}: coordinate ({xs}, {ys}) is not a finite number");
                if (frame != curFrame || cs != curCell) { Flush(); curFrame = frame; curCell = cs; curLine = line; }
                if (!firstSeen.ContainsKey(cs)) { firstSeen[cs] = firstSeen.Count + 1; allInteger &= int.TryParse(cs, NumberStyles.Integer, ci, out int idValue) && idValue > 0; }
                pts.Add(new Point2(x, y));
                maxX = Math.Max(maxX, x); maxY = Math.Max(maxY, y);
            }
            Flush();
        }
        return Assemble(path, byFrame, firstSeen, allInteger, skipped, maxX, maxY, pixelSizeUm, frameIntervalMin);
    }

    /// <summary>The parsed cells as outlines per frame (ids kept or numbered by first appearance), with the warnings for
    /// skipped outlines and frames missing between others.</summary>
    private static OutlineTable Assemble(string path, SortedDictionary<int, List<(string Id, Point2[] Vertices)>> byFrame, Dictionary<string, int> firstSeen,
        bool allInteger, int skipped, double maxX, double maxY, double? pixelSizeUm, double? frameIntervalMin)
    {
        var ci = CultureInfo.InvariantCulture;
        if (byFrame.Count == 0) throw new InputException(path, "holds no outline with 3 or more vertices");
        var frames = new List<(int, Outline[])>(byFrame.Count);
        foreach (var (frame, cells) in byFrame)
        {
            var outlines = new Outline[cells.Count];
            for (int i = 0; i < cells.Count; i++)
                outlines[i] = new Outline(allInteger ? int.Parse(cells[i].Id, NumberStyles.Integer, ci) : firstSeen[cells[i].Id], OutlineStatus.Ok, cells[i].Vertices, 0);
            frames.Add((frame, outlines));
        }
        var warnings = new List<string>();
        if (skipped > 0) warnings.Add($"{skipped} outline(s) with fewer than 3 vertices were skipped");
        var missing = new List<int>();
        for (int k = 1; k < frames.Count; k++)
            for (int f = frames[k - 1].Item1 + 1; f < frames[k].Item1; f++) missing.Add(f);
        if (missing.Count > 0)
            warnings.Add($"{System.IO.Path.GetFileName(path)}: frame{(missing.Count > 1 ? "s" : "")} {string.Join(", ", missing.Take(10))}{(missing.Count > 10 ? ", …" : "")} "
                         + $"({missing.Count} in all) missing between frames {frames[0].Item1} and {frames[^1].Item1}: tracks end there (Lost) unless --max-gap bridges the gap");
        var info = new MovieInfo(path, (int)Math.Ceiling(maxX) + 1, (int)Math.Ceiling(maxY) + 1, frames.Count, pixelSizeUm, frameIntervalMin, "outline table (CSV)");
        return new OutlineTable(path, frames, skipped, info, warnings);
    }

    /// <summary>The frames as linked outlines for <see cref="MovieAnalyzer.RunFrames"/>; objects below --min-area are marked small.</summary>
    public IEnumerable<MovieAnalyzer.FrameOutlines> Linked(AnalysisOptions o, bool idsAreTracks, double? maxDisplacementPx)
    {
        Outline[]? prev = null; Point2[]? prevC = null; int prevFrame = int.MinValue;
        double gate = maxDisplacementPx ?? DefaultGate();
        foreach (var (frame, raw) in Frames)
        {
            var outlines = raw.Select(x => Polygon.Area(x.Vertices) < o.MinAreaPx ? x with { Status = OutlineStatus.Small } : x).ToArray();
            var cen = outlines.Select(x => Polygon.Centroid(x.Vertices)).ToArray();
            FrameLinks? links = null;
            if (prev is not null && frame == prevFrame + 1)
            {
                var pred = new int[outlines.Length]; Array.Fill(pred, -1);
                var succ = new int[prev.Length]; Array.Fill(succ, -1);
                if (idsAreTracks)
                {
                    var at = new Dictionary<int, int>();
                    for (int a = 0; a < prev.Length; a++) at[prev[a].Label] = a;
                    for (int b = 0; b < outlines.Length; b++) if (at.TryGetValue(outlines[b].Label, out var a)) { pred[b] = a; succ[a] = b; }
                }
                else
                {
                    var match = Assignment.ByDistance(prevC, cen, gate);
                    for (int a = 0; a < prev.Length; a++) if (match[a] >= 0) { pred[match[a]] = a; succ[a] = match[a]; }
                }
                links = new FrameLinks(pred, new bool[prev.Length], new bool[outlines.Length], succ);
            }
            yield return new MovieAnalyzer.FrameOutlines(frame, outlines, links, 0, 0);
            prev = outlines; prevC = cen; prevFrame = frame;
        }
    }

    /// <summary>Default maximum displacement between frames: the mean cell radius sqrt(mean area / pi) of the first frame.</summary>
    private double DefaultGate()
    {
        var first = Frames[0].Outlines;
        return Math.Sqrt(first.Average(x => Polygon.Area(x.Vertices)) / Math.PI);
    }
}
