using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Core.Tests.Nematic;

public class CoarseSweepTests
{
    [Fact]
    public void Parse_ListOfWidths_InOrder()
    {
        var w = CoarseSweep.Parse(" 1R0, 2.5R0 ,12", "--coarse-sweep");
        Assert.Equal([new LengthSpec(1, true), new LengthSpec(2.5, true), new LengthSpec(12, false)], w);
        Assert.Throws<ArgumentException>(() => CoarseSweep.Parse("2R0,-1", "--coarse-sweep"));
        Assert.Throws<ArgumentException>(() => CoarseSweep.Parse(",", "--coarse-sweep"));
    }

    [Fact]
    public void Run_PairCloserThanTheWidth_VanishesAtLargeWidth()
    {
        // A +1/2 / -1/2 pair has total winding 0: smoothed over a width much larger than its separation d the director
        // field around both cores is uniform and neither is found (common practice in active-nematics analysis; the
        // coarse-grained exact pair vanished below d = 2.3 g in DefectStatisticsTests). Separation 0.2 of a 387 px canvas
        // (77 px); R0 = 8.9 px: at 2 R0 (18 px) the pair is found, at 5 R0 (45 px, d < 2.3 g) it is not.
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions { Cells = 600, Frames = 10, Separation = 0.2, Motion = DefectMotion.None });
        var r = MovieAnalyzer.Run(new MemoryMovie(m.Width, m.Height, m.Frames().ToList()),
            new AnalysisOptions { BootstrapResamples = 50, MinTrackFrames = 5, CoarseSweep = "2R0,5R0" });
        Assert.Equal(2, r.CoarseSweep.Count);
        Assert.InRange(r.CoarseSweep[0].PlusPerFrame, 0.9, 1.1);
        Assert.InRange(r.CoarseSweep[0].MinusPerFrame, 0.9, 1.1);
        Assert.Equal(0, r.CoarseSweep[1].PlusPerFrame);
        Assert.Equal(0, r.CoarseSweep[1].MinusPerFrame);
        // The sweep's entry at the analysis's own width (2R0) is the main defect stage.
        Assert.Equal(r.Defects.PlusPerFrame, r.CoarseSweep[0].PlusPerFrame);
    }
}
