using System.Collections.Concurrent;
using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Nematic;

/// <summary>
/// Stage drift (docs/defects.md#drift): the tissue velocity u(t) = component-wise median of the cell velocities, the
/// Theil-Sen slope of the core position relative to the tissue, and defect tracks bridged across short breaks. Unit
/// checks against hand computations; recovery on our own confluent monolayer (a +1/2 / -1/2 pair, the +1/2 moving at a
/// prescribed speed toward its head or its tail) filmed through a window that moves by whole pixels each frame, so the
/// whole tissue drifts at a known rate.
/// </summary>
public class DriftTests(ITestOutputHelper log)
{
    // ---------------------------------------------------------------- estimators (hand computations)

    /// <summary>Median of {3, 1, 2} = 2 (odd count: the middle of 1, 2, 3); of {4, 1, 3, 2} = (2 + 3) / 2 = 2.5 (even
    /// count: mean of the two middle values, the textbook definition, common practice); NaN is ignored; none finite = NaN.</summary>
    [Fact]
    public void Median_OddEvenAndNaN_AsByHand()
    {
        Assert.Equal(2.0, TissueDrift.Median([3, 1, 2]));
        Assert.Equal(2.5, TissueDrift.Median([4, 1, 3, 2]));
        Assert.Equal(2.5, TissueDrift.Median([4, double.NaN, 1, 3, 2]));
        Assert.True(double.IsNaN(TissueDrift.Median([double.NaN])));
    }

    /// <summary>Four cells, one of them fast: u_x = median(1, 2, 100, 3) = 2.5 and u_y = median(10, -5, 0, 1) = 0.5 by hand
    /// (the fast cell does not pull the estimate, unlike the mean u_x = 26.5); a cell with a NaN component is left out.</summary>
    [Fact]
    public void TissueDriftOf_FourCellsOneFast_ComponentWiseMedian()
    {
        CellSample C(double vx, double vy) => new(0, 0, 0, 0, vx, vy);
        var (ux, uy, n) = TissueDrift.Of([C(1, 10), C(2, -5), C(100, 0), C(3, 1), C(double.NaN, 7)]);
        Assert.Equal(2.5, ux);
        Assert.Equal(0.5, uy);
        Assert.Equal(4, n);
    }

    /// <summary>Frames 0, 1, 3 with u_x = 1, 3, 5: trapezoid rule D(0) = 0, D(1) = (1 + 3) / 2 = 2, D(3) = 2 + 2 (3 + 5) / 2
    /// = 10 (hand computation); a NaN u takes the other end's value: frames 0, 1 with u = 4, NaN give D(1) = 4.</summary>
    [Fact]
    public void Displacement_ThreeFramesWithGap_TrapezoidAsByHand()
    {
        var d = TissueDrift.Displacement([new(0, 1, -1, 5), new(1, 3, -1, 5), new(3, 5, -1, 5)]);
        Assert.Equal([(0.0, 0.0), (2.0, -1.0), (10.0, -3.0)], d);
        var n = TissueDrift.Displacement([new(0, 4, 0, 5), new(1, double.NaN, double.NaN, 0)]);
        Assert.Equal((4.0, 0.0), n[1]);
    }

    /// <summary>
    /// Line y = 2 t + 1 at t = 0..4 with the last point moved from 9 to 30. Pairwise slopes by hand: the six pairs among
    /// t = 0..3 give 2; the pairs with t = 4 give 29/4, 27/3, 25/2, 23. Sorted, the 5th and 6th of the ten are both 2, so
    /// the Theil-Sen slope is 2 (Sen 1968, J. Am. Stat. Assoc. 63:1379: median of pairwise slopes), whereas least squares
    /// gives sum (t - 2)(y - 9.2) / sum (t - 2)^2 = 62 / 10 = 6.2.
    /// </summary>
    [Fact]
    public void TheilSen_LineWithOneOutlier_SlopeOfTheCleanPoints()
    {
        Assert.Equal(2.0, RobustSlope.TheilSen([0, 1, 2, 3, 4], [1, 3, 5, 7, 30]), 12);
        // Three points (0,0), (1,1), (3,2): slopes 1, 2/3, 1/2 -> median 2/3 (hand computation).
        Assert.Equal(2.0 / 3, RobustSlope.TheilSen([0, 1, 3], [0, 1, 2]), 12);
        Assert.True(double.IsNaN(RobustSlope.TheilSen([1, 1], [0, 5])));   // no two distinct t
    }

    /// <summary>Two +1/2 observations: defect velocities (3, 4) and (0, 1) (|v| 5 and 1), core flows (0, 3) and (0, 0)
    /// (|v_flow| 3 and 0): rho = (3 + 0) / (5 + 1) = 0.5 by hand; a -1/2 observation and one without a velocity are left out.</summary>
    [Fact]
    public void CoreFlowRatio_TwoObservations_RatioOfMeanSpeeds()
    {
        DefectObservation O(double charge, double vx, double vy, double fx, double fy) => new(0, 1, D(0, 0, charge), vx, vy, double.NaN, fx, fy, double.NaN);
        double rho = HeadwardStatistics.CoreFlowRatio([O(0.5, 3, 4, 0, 3), O(0.5, 0, 1, 0, 0), O(-0.5, 1, 0, 100, 0), O(0.5, double.NaN, 0, 100, 0)]);
        Assert.Equal(0.5, rho, 12);
    }

    /// <summary>The warning rule (docs/defects.md#drift): a core-flow ratio above 0.5 warns, naming the local flow; 0.5 and
    /// NaN (not checked) do not.</summary>
    [Theory]
    [InlineData(0.51, true)]
    [InlineData(0.5, false)]
    [InlineData(double.NaN, false)]
    public void AnalysisWarnings_CoreFlowRatio_WarnsAboveHalf(double ratio, bool warns)
    {
        var x = new AnalysisWarnings.Inputs(new AnalysisCounts(Frames: 20, Objects: 400, Outlines: 380, ExcludedBorder: 20, ExcludedSmall: 0, NonStarShaped: 0,
            Tracks: 25, TracksUsed: 20, TracksBelowFloor: 0, Divisions: 0, Merges: 0),
            MinTrackFrames: 10, SokalWindowReached: true, MaxLag: 30, Coverage: 0.9, DefectTracks: 4, PlusTracksUsed: 4, HypothesisDefectTracks: 4) { CoreFlowRatio = ratio };
        Assert.Equal(warns, AnalysisWarnings.Of(x).Any(w => w.Contains("carried by the local flow")));
    }

    // ---------------------------------------------------------------- linking across breaks (hand-made trajectories)

    private static Defect D(double x, double y, double charge) => new(x, y, charge, charge == 0.5 ? 1 : double.NaN, 0, 0.5);
    private static FrameDefects F(int frame, params Defect[] d) => new(frame, [.. d], new (double, double)[d.Length], []);

    /// <summary>
    /// A +1/2 at x = 0 (frame 0), lost in frames 1 and 2, found at x = 12 in frame 3: with gate 5 the bridged gate is 3 x 5
    /// = 15 > 12, so one track {0, 3} and no birth or death (docs/defects.md#drift). Found at x = 16 instead (beyond 15):
    /// two tracks, one death (frame 1 follows the first track's end) and one birth. Lost for 3 frames (found in frame 4 at
    /// x = 1): beyond the longest break, two tracks.
    /// </summary>
    [Fact]
    public void Link_DefectLostUpToTwoFrames_BridgedWithinGateTimesGap()
    {
        var bridged = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(1), F(2), F(3, D(12, 0, 0.5))], gatePx: 5);
        Assert.Single(bridged.Tracks);
        Assert.Equal([(0, 0), (3, 0)], bridged.Tracks[0]);
        Assert.Equal(0, bridged.Births);
        Assert.Equal(0, bridged.Deaths);

        var far = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(1), F(2), F(3, D(16, 0, 0.5))], gatePx: 5);
        Assert.Equal(2, far.Tracks.Count);
        Assert.Equal(1, far.Births);
        Assert.Equal(1, far.Deaths);

        var tooLong = DefectLinker.Link([F(0, D(0, 0, 0.5)), F(1), F(2), F(3), F(4, D(1, 0, 0.5))], gatePx: 5);
        Assert.Equal(2, tooLong.Tracks.Count);
    }

    /// <summary>
    /// Frame 0: +1/2 at x = 0 and x = 40; frame 1: only the one at x = 41 (the other is lost); frame 2: x = 2 and x = 42.
    /// The frame-to-frame link comes first (40 -> 41 -> 42), then the lost one is bridged (0 -> 2, within 2 x 5): two
    /// tracks of frames {0, 2} and {0, 1, 2}. A -1/2 at x = 1 in frame 2 would be nearer but has the other charge.
    /// </summary>
    [Fact]
    public void Link_OneOfTwoLost_ConsecutiveFirstThenBridge()
    {
        var l = DefectLinker.Link([F(0, D(0, 0, 0.5), D(40, 0, 0.5)), F(1, D(41, 0, 0.5)), F(2, D(1, 0, -0.5), D(2, 0, 0.5), D(42, 0, 0.5))], gatePx: 5);
        Assert.Equal(3, l.Tracks.Count);
        Assert.Equal([(0, 0), (2, 1)], l.Tracks[0]);
        Assert.Equal([(0, 1), (1, 0), (2, 2)], l.Tracks[1]);
        Assert.Equal([(2, 0)], l.Tracks[2]);
    }

    /// <summary>Relative to the tissue: a +1/2 fixed in the tissue while the tissue moves by 10 px per frame is 10 px away
    /// in the lab (beyond a 5 px gate) but 0 px away after subtracting the tissue's displacement D = (0, 10): one track.</summary>
    [Fact]
    public void Link_TissueShiftGiven_DistancesRelativeToTissue()
    {
        var frames = new[] { F(0, D(0, 0, 0.5)), F(1, D(10, 0, 0.5)) };
        Assert.Equal(2, DefectLinker.Link(frames, 5).Tracks.Count);
        Assert.Single(DefectLinker.Link(frames, 5, [(0, 0), (10, 0)]).Tracks);
    }

    /// <summary>
    /// A +1/2 (head +x) at x = 0.5 t in the tissue while the tissue moves by D(t) = 2 t, t = 0..8: lab positions 2.5 t, with
    /// frame 4 off by +20 px (a one-frame error of the finder). Relative to the tissue the Theil-Sen slope over +-3 frames
    /// is 0.5 at every frame: the windows of frames 0 and 8 miss the outlier, every other window has at least 5 points and
    /// one outlier, so the clean pairs are the majority and the median of pairwise slopes is 0.5 (hand reasoning as in
    /// <see cref="TheilSen_LineWithOneOutlier_SlopeOfTheCleanPoints"/>). In the lab frame (no shift) the slope is 2.5.
    /// </summary>
    [Fact]
    public void Observe_DriftingTissueAndOneOutlier_RobustSlopeRelativeToTissue()
    {
        var frames = new FrameDefects[9];
        var shift = new (double X, double Y)[9];
        for (int t = 0; t < 9; t++) { frames[t] = F(t, D(2.5 * t + (t == 4 ? 20 : 0), 0, 0.5)); shift[t] = (2 * t, 0); }
        var links = DefectLinker.Link(frames, 30, shift);
        Assert.Single(links.Tracks);
        var (obs, tracks) = HeadwardStatistics.Observe(frames, links, shift);
        foreach (var o in obs) Assert.Equal(0.5, o.HeadwardSpeed, 9);
        Assert.Equal(9, tracks[0].SpeedSamples);
        var (lab, _) = HeadwardStatistics.Observe(frames, links);
        foreach (var o in lab) Assert.Equal(2.5, o.HeadwardSpeed, 9);
    }

    // ---------------------------------------------------------------- recovery on a drifting synthetic monolayer

    private const int WindowW = 280, Margin = 40, HeightPx = 240, Frames = 30;
    private static readonly ConcurrentDictionary<DefectMotion, (MonolayerMovie Movie, List<int[]> Frames)> Canvas = new();
    private static readonly ConcurrentDictionary<DefectMotion, (double Headward, double Ux, double Uy)> Undrifted = new();

    /// <summary>The scenario on a canvas 40 px wider than the window (300 cells at the default 250 px^2 per cell).</summary>
    private static (MonolayerMovie Movie, List<int[]> Frames) CanvasOf(DefectMotion motion) => Canvas.GetOrAdd(motion, mo =>
    {
        var m = MonolayerMovie.Generate(new MonolayerMovieOptions
        { Motion = mo, Cells = (WindowW + Margin) * HeightPx / 250, Frames = Frames, Width = WindowW + Margin, Height = HeightPx });
        return (m, m.Frames().ToList());
    });

    /// <summary>The canvas filmed through a window whose origin moves by -uPx per frame in whole pixels (the fraction
    /// accumulated, the window shifted by its integer part), so every cell moves by +uPx per frame on average in the window.
    /// Returns the frames and the rate actually imposed, s(T-1) / (T-1) with s(t) = trunc(uPx t).</summary>
    private static (List<int[]> Frames, double ImposedPx) Drifted(List<int[]> canvas, double uPx)
    {
        int cw = WindowW + Margin, o0 = uPx > 0 ? Margin : uPx < 0 ? 0 : Margin / 2;
        var frames = new List<int[]>(canvas.Count);
        int s = 0;
        for (int t = 0; t < canvas.Count; t++)
        {
            s = (int)Math.Truncate(uPx * t);
            int origin = o0 - s;
            var img = new int[WindowW * HeightPx];
            for (int y = 0; y < HeightPx; y++) Array.Copy(canvas[t], y * cw + origin, img, y * WindowW, WindowW);
            frames.Add(img);
        }
        return (frames, s / (double)(canvas.Count - 1));
    }

    private static AnalysisResult Analyze(List<int[]> frames, bool keepDrift = false)
        => MovieAnalyzer.Run(new MemoryMovie(WindowW, HeightPx, frames), new AnalysisOptions { BootstrapResamples = 100, KeepDrift = keepDrift });

    /// <summary>The headward speed and mean tissue velocity of the undrifted window (origin fixed). The headward speed must
    /// have the prescribed sign and size within 40 % (the truth is the generator's prescribed motion; on this short, small
    /// movie the found core lags the prescribed one, 0.30 against 0.40 px/frame headward, so the drift cases compare with
    /// this run, not with the truth). The generator's own cells move a little (Lloyd relaxation), so the undrifted u is
    /// not exactly 0 and is the baseline of the imposed drift.</summary>
    private (double Headward, double Ux, double Uy) UndriftedRun(DefectMotion motion) => Undrifted.GetOrAdd(motion, mo =>
    {
        var (m, canvas) = CanvasOf(mo);
        var r = Analyze(Drifted(canvas, 0).Frames);
        double v = r.Defects.HeadwardSpeed.Value;
        var (ux, uy) = MeanDrift(r);
        log.WriteLine($"{mo} undrifted: headward {v:F3} px/frame (truth {m.Truth.DefectHeadwardSpeedPx:F3}), mean u ({ux:F3}, {uy:F3}), |u| {r.Defects.DriftSpeedPx:F3}");
        Assert.InRange(v / m.Truth.DefectHeadwardSpeedPx, 0.6, 1.4);
        return (v, ux, uy);
    });

    private static (double Ux, double Uy) MeanDrift(AnalysisResult r)
        => (r.Defects.Drift.Where(f => double.IsFinite(f.Ux)).Average(f => f.Ux), r.Defects.Drift.Where(f => double.IsFinite(f.Uy)).Average(f => f.Uy));

    /// <summary>
    /// The +1/2 moves at 0.4 px/frame toward its head (head along -x) or its tail; the whole tissue drifts at 0.5 or 1.2
    /// px/frame along (-x) or against (+x) the head. Expectations: the headward speed is a speed relative to the tissue, so
    /// (Galilean invariance) it equals the undrifted run's within 15 % with the prescribed sign; the reported drift
    /// (mean u over frames, less the undrifted run's) equals the rate imposed by the moving window within 5 % along x and
    /// within 5 % of it across.
    /// </summary>
    [Theory]
    [InlineData(DefectMotion.Headward, -0.5)]
    [InlineData(DefectMotion.Headward, 0.5)]
    [InlineData(DefectMotion.Headward, -1.2)]
    [InlineData(DefectMotion.Headward, 1.2)]
    [InlineData(DefectMotion.Tailward, -0.5)]
    [InlineData(DefectMotion.Tailward, 0.5)]
    [InlineData(DefectMotion.Tailward, -1.2)]
    [InlineData(DefectMotion.Tailward, 1.2)]
    public void Analyze_DriftingMonolayer_HeadwardSpeedAsUndriftedAndDriftRecovered(DefectMotion motion, double driftXPx)
    {
        var (reference, ux0, uy0) = UndriftedRun(motion);
        var (m, canvas) = CanvasOf(motion);
        var (frames, imposed) = Drifted(canvas, driftXPx);
        var r = Analyze(frames);
        var d = r.Defects;
        var (ux, uy) = MeanDrift(r);
        log.WriteLine($"{motion}, drift {driftXPx:+0.0;-0.0} px/frame along x (head -x): headward {d.HeadwardSpeed.Value:F3} (undrifted {reference:F3}, " +
                      $"ratio {d.HeadwardSpeed.Value / reference:F3}), +1/2 tracks {d.PlusTracksUsed}; mean u = ({ux:F3}, {uy:F3}) vs imposed {imposed:F3}; " +
                      $"|u| {d.DriftSpeedPx:F3}; core-flow ratio {d.CoreFlowRatio:F2}; warnings: {string.Join(" | ", r.Warnings.Where(w => w.Contains("cores")))}");
        Assert.True(d.DriftRemoved);
        Assert.Equal(Math.Sign(m.Truth.DefectHeadwardSpeedPx), Math.Sign(d.HeadwardSpeed.Value));
        Assert.InRange(d.HeadwardSpeed.Value / reference, 0.85, 1.15);
        Assert.InRange((ux - ux0) / imposed, 0.95, 1.05);
        Assert.InRange(Math.Abs(uy - uy0), 0, 0.05 * Math.Abs(imposed));
    }

    /// <summary>With --keep-drift the same movie (drift 1.2 px/frame along the head) reports the lab-frame speed: by
    /// velocity addition, the undrifted run's headward speed plus the drift's component along the head, u . e_head (within
    /// 15 %), about 0.3 + 1.17 px/frame; drift_removed is false and the drift is still measured.</summary>
    [Fact]
    public void Analyze_DriftAlongHeadKept_LabFrameSpeedIsOwnPlusDrift()
    {
        var (reference, _, _) = UndriftedRun(DefectMotion.Headward);
        var (m, canvas) = CanvasOf(DefectMotion.Headward);
        var (frames, imposed) = Drifted(canvas, -1.2);
        var r = Analyze(frames, keepDrift: true);
        double expected = reference + imposed * m.Truth.HeadX;   // u . e_head with u = (imposed, 0)
        log.WriteLine($"keep-drift: headward {r.Defects.HeadwardSpeed.Value:F3} px/frame (expected {expected:F3}); |u| {r.Defects.DriftSpeedPx:F3}");
        Assert.False(r.Defects.DriftRemoved);
        Assert.InRange(r.Defects.HeadwardSpeed.Value / expected, 0.85, 1.15);
        Assert.InRange(r.Defects.DriftSpeedPx / Math.Abs(imposed), 0.95, 1.1);
    }
}
