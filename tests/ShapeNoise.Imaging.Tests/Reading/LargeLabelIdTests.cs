using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

/// <summary>uint32 ids above 2^31 - 1 (what tifffile writes from numpy uint32/int64 label arrays) are stored bit for bit in
/// the int labels (TiffPages); the analysis must treat them as ordinary objects and cells.csv must print them unsigned.</summary>
public class LargeLabelIdTests
{
    [Fact]
    public void Analyze_IdsAbove2p31_SameCellsAndUnsignedLabelColumn()
    {
        var movie = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 9, Frames = 12, Seed = 3 });
        var small = MemoryMovie.Of(movie);
        var frames = new List<int[]>();
        foreach (var f in small.Frames())
        {
            var big = new int[f.Labels.Length];
            for (int i = 0; i < big.Length; i++) big[i] = f.Labels[i] == 0 ? 0 : unchecked((int)(uint.MaxValue - (uint)f.Labels[i]));
            frames.Add(big);
        }
        var opts = new AnalysisOptions { BootstrapResamples = 50 };
        var a = MovieAnalyzer.Run(small, opts);
        var b = MovieAnalyzer.Run(new MemoryMovie(movie.Width, movie.Height, frames), opts);
        Assert.Equal(a.Cells.Count, b.Cells.Count);
        Assert.True(a.Cells.Count > 0);
        using var d = new TempDir();
        Tables.WriteAll(b, d.Path);
        var lines = File.ReadAllLines(d["cells.csv"]);
        int col = Array.IndexOf(lines[0].Split(','), "label");
        var want = a.Cells.Select(c => (uint.MaxValue - (uint)c.Label).ToString()).ToArray();
        var got = lines.Skip(1).Select(l => l.Split(',')[col]).ToArray();
        Assert.Equal(want, got);   // e.g. label 1 becomes 4294967294, printed as such (not -2)
        for (int i = 0; i < a.Cells.Count; i++) Assert.Equal(a.Cells[i].Shape.AreaPx2, b.Cells[i].Shape.AreaPx2, 12);
    }
}
