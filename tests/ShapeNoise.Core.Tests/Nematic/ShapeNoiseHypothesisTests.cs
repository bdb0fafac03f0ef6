using ShapeNoise.Fluctuations;
using ShapeNoise.Tracking;
using ShapeNoise.Nematic;
using ShapeNoise.Pipeline;
using ShapeNoise.Shape;
using ShapeNoise.Statistics;

namespace ShapeNoise.Tests.Nematic;

public class ShapeNoiseHypothesisTests
{
    /// <summary>
    /// Five +1/2 defect tracks far apart; around defect k the cells' length alternates by +-a_k about its track mean and
    /// the width by +-1, so the local anisotropy is exactly a_k^2 (hand computation). Headward speeds increase with a_k,
    /// so Spearman's rho is +1; a far-away cell must not count.
    /// </summary>
    [Fact]
    public void Test_LocalAnisotropyRisesWithHeadwardSpeed_RhoIsOneAndLocalValuesExact()
    {
        double[] a = [1.0, 1.5, 2.0, 3.0, 4.0], speed = [-0.3, -0.1, 0.05, 0.2, 0.4];
        const int frames = 8; const double coarse = 10;
        var cells = new List<CellRecord>(); var tracks = new List<TrackRecord>(); var obs = new List<DefectObservation>(); var dtracks = new List<DefectTrack>();
        int trackId = 0;
        for (int k = 0; k < a.Length; k++)
        {
            double x0 = 200 * k + 100, y0 = 100;
            for (int c = 0; c < 3; c++)
            {
                trackId++;
                var fr = Enumerable.Range(0, frames).ToArray();
                var L = fr.Select(t => 30 + (t % 2 == 0 ? a[k] : -a[k])).ToArray();
                var W = fr.Select(t => 15 + (t % 2 == 0 ? 1.0 : -1.0)).ToArray();
                var cx = fr.Select(_ => x0 + 5 * c).ToArray(); var cy = fr.Select(_ => y0).ToArray();
                tracks.Add(new TrackRecord(trackId, 0, frames - 1, TrackEnd.MovieEnd, fr, L, W, new double[frames], new double[frames], new double[frames], cx, cy, null, 0, 0, true));
                for (int t = 0; t < frames; t++)
                    cells.Add(new CellRecord(t, trackId, trackId, new ShapeMeasures(100, cx[t], cy[t], 40, 0, 0, 0, L[t], W[t], 2, 0.3), 0, true, 10, 1, 40));
            }
            for (int t = 0; t < frames; t++)
                obs.Add(new DefectObservation(t, k + 1, new Defect(x0, y0, 0.5, 1, 0, 0.2), 0, 0, speed[k], 0, 0, 0));
            dtracks.Add(new DefectTrack(k + 1, 0.5, 0, frames - 1, frames, speed[k], 0));
        }
        // A cell far from every core, with a huge length fluctuation: must be ignored.
        trackId++;
        var far = Enumerable.Range(0, frames).ToArray();
        tracks.Add(new TrackRecord(trackId, 0, frames - 1, TrackEnd.MovieEnd, far, far.Select(t => 30.0 + 50 * (t % 2)).ToArray(), far.Select(_ => 15.0).ToArray(),
            new double[frames], new double[frames], new double[frames], far.Select(_ => 5000.0).ToArray(), far.Select(_ => 5000.0).ToArray(), null, 0, 0, true));
        cells.Sort((p, q) => p.Frame.CompareTo(q.Frame));
        var defects = new DefectResult(coarse, 5, obs, dtracks, 1, 0, Estimate.NaN, Estimate.NaN, 1, 5, 0, 0, new EnsembleFlow(0.5, 6, [], [], [], [], []));
        var r = ShapeNoiseHypothesis.Test(cells, tracks, defects, new AnalysisOptions { BootstrapResamples = 200 }.ToDefectOptions());
        Assert.Equal(5, r.DefectTracks);
        for (int k = 0; k < a.Length; k++) Assert.Equal(a[k] * a[k], r.LocalAnisotropy[k], 9);
        Assert.Equal(1.0, r.SpearmanRho, 12);
        // Two-sided exact permutation p for n = 5 and rho = 1 is 2/5! = 0.0167; 9999 permutations estimate it (+-0.003).
        Assert.InRange(r.PValue, 0.008, 0.026);
    }
}
