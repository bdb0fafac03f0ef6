using ShapeNoise.Shape;
using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Tracking;

/// <summary>Assignment by Euclidean distance with a gate; optimal pairs worked out by hand.</summary>
public class AssignmentByDistanceTests
{
    /// <summary>a = {(0,0), (3,0)}, b = {(2,0), (-1,0)}: pairings cost 2 + 4 = 6 or 1 + 1 = 2; the optimum is a0-b1, a1-b0.</summary>
    [Fact]
    public void ByDistance_TwoByTwo_MinimumTotalDistance()
    {
        Point2[] a = [new(0, 0), new(3, 0)], b = [new(2, 0), new(-1, 0)];
        Assert.Equal([1, 0], Assignment.ByDistance(a, b, 10));
    }

    /// <summary>A 3-4-5 triangle: distance 5, linked with gate 5 (the gate is inclusive), not with 4.9.</summary>
    [Fact]
    public void ByDistance_PairAtGate_GateInclusive()
    {
        Point2[] a = [new(0, 0)], b = [new(3, 4)];
        Assert.Equal([0], Assignment.ByDistance(a, b, 5));
        Assert.Equal([-1], Assignment.ByDistance(a, b, 4.9));
    }

    [Fact]
    public void ByDistance_EmptySide_AllUnassigned()
    {
        Assert.Equal([-1, -1], Assignment.ByDistance([new(0, 0), new(1, 1)], [], 5));
        Assert.Empty(Assignment.ByDistance([], [new Point2(0, 0)], 5));
    }
}
