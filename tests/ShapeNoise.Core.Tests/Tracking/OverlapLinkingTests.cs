using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Tracking;

public class OverlapLinkingTests
{
    private static FrameLinks Link(int[] a, int[] b, int w, int h)
    {
        var sa = LabelScan.Of(new LabelFrame(0, w, h, a)); var sb = LabelScan.Of(new LabelFrame(1, w, h, b));
        return OverlapLinking.Link(sa.DenseImage, sa.Boxes.Select(x => x.PixelCount).ToArray(), sb.DenseImage, sb.Boxes.Select(x => x.PixelCount).ToArray());
    }

    private static void Box(int[] img, int w, int x0, int y0, int x1, int y1, int label)
    {
        for (int y = y0; y < y1; y++) for (int x = x0; x < x1; x++) img[y * w + x] = label;
    }

    [Fact]
    public void Link_MovedAndRelabelled_LinksOneToOne()
    {
        int w = 40, h = 20;
        var a = new int[w * h]; var b = new int[w * h];
        Box(a, w, 2, 2, 12, 12, 5); Box(a, w, 20, 2, 30, 12, 9);
        Box(b, w, 3, 3, 13, 13, 900); Box(b, w, 21, 2, 31, 12, 17);   // new ids, shifted by a pixel
        var l = Link(a, b, w, h);
        // Dense indices follow raster order of first appearance: in b, label 17 (top row 2) comes before 900 (row 3).
        Assert.Equal([1, 0], l.Predecessor);
        Assert.Equal(0, l.Divisions); Assert.Equal(0, l.Merges);
    }

    [Fact]
    public void Link_Division_EndsTrackAndCountsIt()
    {
        int w = 30, h = 20;
        var a = new int[w * h]; var b = new int[w * h];
        Box(a, w, 2, 2, 22, 12, 1);
        Box(b, w, 2, 2, 12, 12, 1); Box(b, w, 12, 2, 22, 12, 2);
        var l = Link(a, b, w, h);
        Assert.Equal([-1, -1], l.Predecessor);
        Assert.Equal(1, l.Divisions);
        Assert.True(l.Divided[0]);
    }

    [Fact]
    public void Link_Merge_EndsTracksAndCountsIt()
    {
        int w = 30, h = 20;
        var a = new int[w * h]; var b = new int[w * h];
        Box(a, w, 2, 2, 12, 12, 1); Box(a, w, 12, 2, 22, 12, 2);
        Box(b, w, 2, 2, 22, 12, 3);
        var l = Link(a, b, w, h);
        Assert.Equal([-1], l.Predecessor);
        Assert.Equal(1, l.Merges);
    }

    [Fact]
    public void Analyze_ShuffledLabelIds_EveryLinkRight()
    {
        // Synthetic movie whose label ids are redrawn every frame: each true cell must map to exactly one track that
        // spans the whole movie, and no two cells may share a track.
        var e = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 12, Frames = 30, Seed = 11 });
        var r = MovieAnalyzer.Run(MemoryMovie.Of(e), new AnalysisOptions { BootstrapResamples = 0 });
        var trackOf = new Dictionary<(int Frame, int Label), int>();
        foreach (var c in r.Cells) trackOf[(c.Frame, c.Label)] = c.TrackId;
        var seen = new HashSet<int>();
        for (int i = 0; i < 12; i++)
        {
            int id = trackOf[(0, e.Truth.LabelOfCell[0][i])];
            Assert.True(seen.Add(id));
            for (int t = 1; t < 30; t++) Assert.Equal(id, trackOf[(t, e.Truth.LabelOfCell[t][i])]);
        }
        Assert.Equal(12, r.Counts.Tracks);
    }
}

public class GapClosingTests
{
    [Fact]
    public void Analyze_CellMissingOneFrame_ResumesOnlyWithMaxGap()
    {
        // Three drifting blobs over 14 frames; blob 2 is absent from frame 6 (a segmentation drop-out).
        int w = 120, h = 60, T = 14;
        var frames = new List<int[]>();
        for (int t = 0; t < T; t++)
        {
            var img = new int[w * h];
            for (int c = 0; c < 3; c++)
            {
                if (c == 1 && t == 6) continue;
                Support.Raster.Ellipse(img, w, h, 20 + 40 * c + 0.3 * t, 30, 10, 7, 0.2 * c, 10 * t + c + 1);   // ids change every frame
            }
            frames.Add(img);
        }
        var noGap = ShapeNoise.Pipeline.MovieAnalyzer.Run(new Support.MemoryMovie(w, h, frames), new ShapeNoise.Pipeline.AnalysisOptions { BootstrapResamples = 0, MinTrackFrames = 5, MaxGapFrames = 0 });
        var gap = ShapeNoise.Pipeline.MovieAnalyzer.Run(new Support.MemoryMovie(w, h, frames), new ShapeNoise.Pipeline.AnalysisOptions { BootstrapResamples = 0, MinTrackFrames = 5, MaxGapFrames = 1 });
        Assert.Equal(4, noGap.Counts.Tracks);                  // blob 2 splits into two tracks at the gap
        Assert.Equal(3, gap.Counts.Tracks);                    // with --max-gap 1 it is one track
        var resumed = gap.Tracks.Single(t => t.Frames == T - 1);
        Assert.DoesNotContain(6, resumed.FrameIndex);
        Assert.Contains(5, resumed.FrameIndex); Assert.Contains(7, resumed.FrameIndex);
        Assert.NotNull(resumed.Contour);
    }
}
