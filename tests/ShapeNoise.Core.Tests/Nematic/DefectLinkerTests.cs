using ShapeNoise.Nematic;

namespace ShapeNoise.Tests.Nematic;

/// <summary>
/// Defect linking as docs/measures.md#nematic-field-and-defects defines it: same charge only, one-to-one, within one
/// coarse width (the gate), frame to consecutive frame. Trajectories are hand-made; expected tracks worked out by hand.
/// </summary>
public class DefectLinkerTests
{
    private static Defect D(double x, double y, double charge) => new(x, y, charge, charge == 0.5 ? 1 : double.NaN, 0, 0.5);
    private static FrameDefects F(int frame, params Defect[] d) => new(frame, [.. d], new (double, double)[d.Length], []);

    /// <summary>
    /// Frame 0: +1/2 at (10,10), -1/2 at (50,10). Frame 1: both moved by 2 and 1 px, and a new +1/2 at (100,100).
    /// Frame 2: only the first +1/2 (the -1/2 and the newcomer die). Frame 3: a +1/2 at (40,10), 26 px away: beyond the
    /// 5 px gate, so a death and a birth. Tracks by hand: {0,1,2}, {0,1} of the -1/2, {1} and {3}; births 2, deaths 3.
    /// </summary>
    [Fact]
    public void Link_TwoDefectTrajectory_TracksBirthsAndDeathsAsByHand()
    {
        var frames = new[]
        {
            F(0, D(10, 10, 0.5), D(50, 10, -0.5)),
            F(1, D(51, 10, -0.5), D(12, 10, 0.5), D(100, 100, 0.5)),
            F(2, D(14, 10, 0.5)),
            F(3, D(40, 10, 0.5)),
        };
        var l = DefectLinker.Link(frames, gatePx: 5);
        Assert.Equal(4, l.Tracks.Count);
        Assert.Equal([(0, 0), (1, 1), (2, 0)], l.Tracks[0]);
        Assert.Equal([(0, 1), (1, 0)], l.Tracks[1]);
        Assert.Equal([(1, 2)], l.Tracks[2]);
        Assert.Equal([(3, 0)], l.Tracks[3]);
        Assert.Equal(2, l.Births);
        Assert.Equal(3, l.Deaths);
    }

    /// <summary>Two +1/2 at x = 0 and x = 3 compete for one at x = 2: optimal one-to-one gives it to the nearer (cost 1
    /// against 2); the other is a death. A greedy first-come link would take x = 0.</summary>
    [Fact]
    public void Link_TwoCandidatesForOne_OneToOneToNearest()
    {
        var l = DefectLinker.Link([F(0, D(0, 0, 0.5), D(3, 0, 0.5)), F(1, D(2, 0, 0.5))], gatePx: 5);
        Assert.Equal([(0, 0)], l.Tracks[0]);
        Assert.Equal([(0, 1), (1, 0)], l.Tracks[1]);
        Assert.Equal(1, l.Deaths);
        Assert.Equal(0, l.Births);
    }

    [Fact]
    public void Link_OppositeChargeNearby_NotLinked()
    {
        var l = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(1, D(1, 0, -0.5))], gatePx: 5);
        Assert.Equal(2, l.Tracks.Count);
        Assert.Equal(1, l.Births);
        Assert.Equal(1, l.Deaths);
    }

    [Theory]
    [InlineData(4.99, 2)]   // just beyond the gate: two tracks
    [InlineData(5.01, 1)]   // just within: one
    public void Link_DisplacementAroundGate_GateRespected(double gate, int expectedTracks)
    {
        var l = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(1, D(3, 4, 0.5))], gate);   // 3-4-5 triangle: 5 px
        Assert.Equal(expectedTracks, l.Tracks.Count);
    }

    /// <summary>A gap in the frame numbers (frame 1 missing) ends the tracks: no link from frame 0 to frame 2.</summary>
    [Fact]
    public void Link_GapInFrames_NotLinkedAcrossGap()
    {
        var l = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(2, D(0, 0, 0.5))], gatePx: 5);
        Assert.Equal(2, l.Tracks.Count);
        Assert.Equal(1, l.Births);
    }
}
