namespace ShapeNoise.Statistics;

/// <summary>
/// Moving-block bootstrap of the mean of several time series pooled sample by sample (docs/statistics.md#time-blocks):
/// each resample rebuilds every series i of length n_i from ceil(n_i / l) blocks of l consecutive samples whose starts are
/// drawn uniformly from 0 .. n_i - l, cut back to n_i, and takes the mean of all rebuilt samples. The block length is
/// l = max(2, minBlock, round(nbar^(1/3))) with nbar the mean series length, and the independent units are the sum_i floor(n_i / l)
/// non-overlapping blocks.
/// </summary>
/// <remarks>Künsch H.R. (1989), "The jackknife and the bootstrap for general stationary observations", Ann. Statist.
/// 17:1217-1241 (moving blocks); Hall P., Horowitz J.L. and Jing B.-Y. (1995), "On blocking rules for the bootstrap with
/// dependent data", Biometrika 82:561-574 (block length of order n^(1/3) for variance and interval estimation).</remarks>
public static class MovingBlockBootstrap
{
    /// <summary>Block length l = max(2, <paramref name="minimum"/>, round(nbar^(1/3))) for series of mean length
    /// <paramref name="meanLength"/>, at most the shortest series. <paramref name="minimum"/> is the span over which the
    /// samples are correlated by construction (e.g. the window of a sliding slope).</summary>
    public static int BlockLength(double meanLength, int shortest, int minimum = 2)
        => Math.Max(1, Math.Min(shortest, Math.Max(Math.Max(2, minimum), (int)Math.Round(Math.Cbrt(meanLength)))));

    /// <summary>The pooled mean of <paramref name="series"/> with its moving-block percentile interval from
    /// <paramref name="resamples"/> seeded resamples; N is the number of non-overlapping blocks ("time blocks").</summary>
    public static Estimate Mean(IReadOnlyList<double[]> series, int resamples, int seed, int minBlock = 2)
    {
        var s = new List<double[]>();
        foreach (var x in series) if (x.Length > 0) s.Add(x);
        if (s.Count == 0) return Estimate.TooFewUnits(0, "time blocks");
        double total = 0, count = 0; int shortest = int.MaxValue;
        foreach (var x in s) { foreach (var v in x) total += v; count += x.Length; shortest = Math.Min(shortest, x.Length); }
        int l = BlockLength(count / s.Count, shortest, minBlock), units = 0;
        foreach (var x in s) units += x.Length / l;
        double value = total / count;
        if (resamples == 0) return new Estimate(value, double.NaN, double.NaN) { N = units, UnitName = "time blocks", Status = EstimateStatus.TooFew };
        var rng = new Random(seed);
        var r = new double[resamples];
        for (int b = 0; b < resamples; b++)
        {
            double sum = 0;
            foreach (var x in s)
            {
                int filled = 0;
                while (filled < x.Length)
                {
                    int start = rng.Next(x.Length - l + 1);
                    for (int k = 0; k < l && filled < x.Length; k++, filled++) sum += x[start + k];
                }
            }
            r[b] = sum / count;
        }
        return Bootstrap.Interval(value, r, units, "time blocks");
    }

    /// <summary>Moving-block resamples of one series of <paramref name="frames"/> samples: each resample lays ceil(n / l)
    /// blocks of <paramref name="blockLength"/> consecutive samples with starts drawn uniformly from 0 .. n - l (cut back to n)
    /// and gives every sample its multiplicity (docs/statistics.md#time-blocks). A statistic made of per-sample sums is then
    /// re-weighted, not recomputed.</summary>
    /// <remarks>Künsch H.R. (1989), Ann. Statist. 17:1217-1241.</remarks>
    public static double[][] FrameWeights(int frames, int blockLength, int resamples, int seed)
    {
        int l = Math.Clamp(blockLength, 1, Math.Max(1, frames));
        var rng = new Random(seed);
        var w = new double[resamples][];
        for (int b = 0; b < resamples; b++)
        {
            w[b] = new double[frames];
            for (int filled = 0; filled < frames;)
            {
                int start = rng.Next(frames - l + 1);
                for (int k = 0; k < l && filled < frames; k++, filled++) w[b][start + k]++;
            }
        }
        return w;
    }
}
