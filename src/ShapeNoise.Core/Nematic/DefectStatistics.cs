using ShapeNoise.Statistics;

namespace ShapeNoise.Nematic;

/// <summary>Why a defect track's lifetime is censored (docs/motion.md#defect-lifetime); flags combine.</summary>
[Flags]
public enum DefectCensoring
{
    /// <summary>Not censored: the track starts and ends inside the movie and the field (its end is an event).</summary>
    None = 0,
    /// <summary>It starts in the first analysed frame, or right after a frame missing from the analysis.</summary>
    NoFrameBefore = 1,
    /// <summary>It ends in the last analysed frame, or right before a frame missing from the analysis.</summary>
    NoFrameAfter = 2,
    /// <summary>Its first position lies within <see cref="DefectStatistics.EdgeCoarseWidths"/> coarse widths of the image edge (it may have come in).</summary>
    StartsNearEdge = 4,
    /// <summary>Its last position lies within <see cref="DefectStatistics.EdgeCoarseWidths"/> coarse widths of the image edge (it may have gone out).</summary>
    EndsNearEdge = 8,
}

/// <summary>Creation (a +1/2 and a -1/2 appearing together) or annihilation (vanishing together).</summary>
public enum DefectEventKind
{
    /// <summary>A +1/2 and a -1/2 track start together.</summary>
    Creation,
    /// <summary>A +1/2 and a -1/2 track end together.</summary>
    Annihilation,
}

/// <summary>One creation or annihilation (px, frames).</summary>
/// <param name="Kind">Creation or annihilation.</param>
/// <param name="Frame">Creation: the earlier of the two first frames; annihilation: the later of the two last frames.</param>
/// <param name="X">Midpoint of the two positions (image coordinates).</param><param name="Y">Midpoint, y.</param>
/// <param name="PlusTrackId">The +1/2 track.</param><param name="MinusTrackId">The -1/2 track.</param>
/// <param name="SeparationPx">Distance of the two positions relative to the tissue.</param>
public readonly record struct DefectEvent(DefectEventKind Kind, int Frame, double X, double Y, int PlusTrackId, int MinusTrackId, double SeparationPx);

/// <summary>One row of the per-track table (defect-tracks.csv): lifetime and censoring of one defect track.</summary>
/// <param name="TrackId">Track id (<see cref="DefectTrack.Id"/>).</param><param name="Charge">+0.5 or -0.5.</param>
/// <param name="FirstFrame">First frame.</param><param name="LastFrame">Last frame.</param>
/// <param name="LifetimeFrames">LastFrame - FirstFrame + 1 (bridged breaks included).</param>
/// <param name="Censoring">Why the lifetime is censored (<see cref="DefectCensoring.None"/> for an event).</param>
/// <param name="CreatedWithTrack">Partner track of its creation, 0 when none.</param>
/// <param name="AnnihilatedWithTrack">Partner track of its annihilation, 0 when none.</param>
public sealed record DefectTrackLifetime(int TrackId, double Charge, int FirstFrame, int LastFrame, int LifetimeFrames, DefectCensoring Censoring,
    int CreatedWithTrack, int AnnihilatedWithTrack)
{
    /// <summary>True when the lifetime is only a lower bound.</summary>
    public bool Censored => Censoring != DefectCensoring.None;

    /// <summary>The censoring reasons in words, joined by "; " (empty when not censored).</summary>
    public string CensoringReason => DefectStatistics.Words(Censoring);
}

/// <summary>Mean-squared displacement of +1/2 defects relative to the tissue at one lag.</summary>
/// <param name="LagFrames">Lag tau.</param><param name="MsdPx2">sum over pairs of |r(t + tau) - r(t)|^2 / pairs.</param>
/// <param name="Pairs">Position pairs at this lag.</param><param name="Tracks">+1/2 tracks holding at least one pair.</param>
public readonly record struct MsdPoint(int LagFrames, double MsdPx2, int Pairs, int Tracks);

/// <summary>Defect densities, lifetimes, creation and annihilation and +1/2 mean-squared displacement (px, frames;
/// docs/motion.md#defect-statistics).</summary>
/// <param name="PlusDensityPerPx2">Mean +1/2 defects per frame per px^2 of tissue searched; moving-block bootstrap over frames.</param>
/// <param name="MinusDensityPerPx2">The same for -1/2 defects.</param>
/// <param name="NetChargePerFrame">Mean over frames of (N+ - N-) / 2, the net topological charge in the field; moving-block bootstrap.</param>
/// <param name="LifetimeFrames">Kaplan-Meier median lifetime of all defect tracks with its Brookmeyer-Crowley interval; n = defect tracks.</param>
/// <param name="Survival">The survival curve of the lifetimes.</param>
/// <param name="CreationRatePerPx2Frame">Creations per px^2 of tissue per frame, with the exact Poisson interval; n = events.</param>
/// <param name="AnnihilationRatePerPx2Frame">Annihilations likewise.</param>
/// <param name="Events">Every creation and annihilation, by frame.</param>
/// <param name="Tracks">Per defect track: lifetime, censoring, partners.</param>
/// <param name="PlusMsd">MSD of +1/2 defects relative to the tissue per lag.</param>
/// <param name="PlusMsdExponent">alpha of MSD ~ tau^alpha fitted on log-log over the first lags; bootstrap over +1/2 tracks.</param>
/// <param name="MsdFitLags">Largest lag of the exponent's fit (0 when no fit).</param>
/// <param name="SearchAreaPx2">Tissue area in which defects are found (density denominator).</param>
/// <param name="EventAreaPx2">Tissue area in which events are counted (rate denominator, per frame interval).</param>
/// <param name="FrameIntervals">Pairs of consecutive analysed frames (rate denominator).</param>
/// <param name="UnpairedStarts">Tracks starting inside the movie and the field with no creation partner.</param>
/// <param name="UnpairedEnds">Tracks ending inside the movie and the field with no annihilation partner.</param>
public sealed record DefectStatisticsResult(Estimate PlusDensityPerPx2, Estimate MinusDensityPerPx2, Estimate NetChargePerFrame,
    Estimate LifetimeFrames, SurvivalCurve Survival, Estimate CreationRatePerPx2Frame, Estimate AnnihilationRatePerPx2Frame,
    IReadOnlyList<DefectEvent> Events, IReadOnlyList<DefectTrackLifetime> Tracks, IReadOnlyList<MsdPoint> PlusMsd, Estimate PlusMsdExponent,
    int MsdFitLags, double SearchAreaPx2, double EventAreaPx2, int FrameIntervals, int UnpairedStarts, int UnpairedEnds)
{
    /// <summary>Creations counted.</summary>
    public int Creations => Count(DefectEventKind.Creation);
    /// <summary>Annihilations counted.</summary>
    public int Annihilations => Count(DefectEventKind.Annihilation);

    private int Count(DefectEventKind kind)
    {
        int n = 0;
        foreach (var e in Events) if (e.Kind == kind) n++;
        return n;
    }

    /// <summary>This result with every estimate <see cref="EstimateStatus.NotApplicable"/> because of <paramref name="reason"/>
    /// (docs/defects.md#where-defects-apply); the tables are kept.</summary>
    public DefectStatisticsResult NotApplicable(string reason)
    {
        static Estimate Na(Estimate e, string r) => Estimate.NotApplicableBecause(r, e.N, e.UnitName);
        return this with
        {
            PlusDensityPerPx2 = Na(PlusDensityPerPx2, reason), MinusDensityPerPx2 = Na(MinusDensityPerPx2, reason),
            NetChargePerFrame = Na(NetChargePerFrame, reason), LifetimeFrames = Na(LifetimeFrames, reason),
            CreationRatePerPx2Frame = Na(CreationRatePerPx2Frame, reason), AnnihilationRatePerPx2Frame = Na(AnnihilationRatePerPx2Frame, reason),
            PlusMsdExponent = Na(PlusMsdExponent, reason),
        };
    }
}

/// <summary>
/// Statistics of the defect tracks (docs/motion.md#defect-statistics), in px and frames:
/// densities N / A_search per frame (A_search = c_cov (W - 2g)(H - 2g), g the coarse width, c_cov the covered fraction of the
/// field); lifetimes T = last - first + 1 frames, right-censored when the track has no analysed frame before or after it
/// or starts or ends within e = <see cref="EdgeCoarseWidths"/> g of the image edge, summarised by the Kaplan-Meier median
/// (<see cref="KaplanMeier"/>); creations (annihilations) = a +1/2 and a -1/2 track whose uncensored starts (ends) lie
/// within <see cref="PairFrames"/> frame and <see cref="PairCoarseWidths"/> g of each other, paired greedily nearest
/// first, each track at most once; rates = events / (A_event x frame intervals), A_event = c_cov (W - 2e)(H - 2e), with
/// the exact Poisson interval (<see cref="PoissonInterval"/>); MSD(tau) of +1/2 positions relative to the tissue,
/// r = x - D(t), pooled over all pairs of members tau frames apart, and alpha the least-squares slope of log MSD on log tau.
/// </summary>
/// <remarks>Kaplan E.L. and Meier P. (1958), J. Am. Stat. Assoc. 53:457-481; Greenwood M. (1926); Brookmeyer R. and
/// Crowley J. (1982), Biometrics 38:29-41; Garwood F. (1936), Biometrika 28:437-442; moving-block bootstrap: Künsch H.R.
/// (1989), Ann. Statist. 17:1217-1241; MSD exponent over the first quarter of the tracks: Saxton M.J. (1997), "Single-particle
/// tracking: the distribution of diffusion coefficients", Biophys. J. 72:1744-1753 (lags beyond a quarter of a track are
/// too noisy to fit). Creation and annihilation of +1/2 / -1/2 pairs in active nematics: Giomi L. et al. (2013), Phys. Rev.
/// Lett. 110:228101; in epithelia: Saw T.B. et al. (2017), Nature 544:212-216.</remarks>
public static class DefectStatistics
{
    /// <summary>A track starting or ending closer than this many coarse widths to the image edge is censored there and not
    /// paired: defects are never found within one coarse width of the edge, so a defect that leaves the field is last seen
    /// just inside that band; the extra half width covers its last step and the core's jitter where the coarse-graining
    /// kernel is cut by the edge (docs/motion.md#defect-lifetime).</summary>
    public const double EdgeCoarseWidths = 1.5;
    /// <summary>Largest difference of the start (end) frames of a created (annihilated) pair.</summary>
    public const int PairFrames = 1;
    /// <summary>Largest distance, in coarse widths, of the start (end) positions of a created (annihilated) pair.</summary>
    public const double PairCoarseWidths = 1;
    /// <summary>The exponent is fitted over lags up to this fraction of the median +1/2 track span.</summary>
    public const double MsdFitFraction = 0.25;

    /// <summary>The statistics of <paramref name="defects"/>, with the analysed frames and the tissue displacement taken from
    /// <see cref="DefectResult.Drift"/> (D = 0 unless <see cref="DefectResult.DriftRemoved"/>).</summary>
    public static DefectStatisticsResult Of(DefectResult defects, int widthPx, int heightPx, double tissueAreaPx2PerFrame, int bootstrapResamples, int seed)
    {
        var frames = new int[defects.Drift.Count];
        for (int i = 0; i < frames.Length; i++) frames[i] = defects.Drift[i].Frame;
        var shift = defects.DriftRemoved && frames.Length > 0 ? TissueDrift.Displacement(defects.Drift) : null;
        return Of(defects, frames, widthPx, heightPx, tissueAreaPx2PerFrame, shift, bootstrapResamples, seed);
    }

    /// <summary>The statistics of <paramref name="defects"/> (see the class summary).</summary>
    /// <param name="defects">The defect stage's result (observations, tracks, coarse width).</param>
    /// <param name="frames">Every analysed frame number, increasing (frames without defects included).</param>
    /// <param name="widthPx">Image width.</param><param name="heightPx">Image height.</param>
    /// <param name="tissueAreaPx2PerFrame">Mean covered (tissue) area per frame; its ratio to W H is the covered fraction c_cov.</param>
    /// <param name="tissueShiftPx">The tissue's displacement D per entry of <paramref name="frames"/>; null = 0 (lab frame).</param>
    /// <param name="bootstrapResamples">Resamples of the density and exponent intervals (0 = none).</param>
    /// <param name="seed">Seed of every resample.</param>
    public static DefectStatisticsResult Of(DefectResult defects, IReadOnlyList<int> frames, int widthPx, int heightPx, double tissueAreaPx2PerFrame,
        IReadOnlyList<(double X, double Y)>? tissueShiftPx, int bootstrapResamples, int seed)
    {
        if (tissueShiftPx is not null && tissueShiftPx.Count != frames.Count)
            throw new ArgumentException($"{nameof(tissueShiftPx)} has {tissueShiftPx.Count} entries for {frames.Count} frames");
        var ctx = new Context(defects, frames, widthPx, heightPx, tissueAreaPx2PerFrame, tissueShiftPx);
        var (plus, minus, net) = Densities(ctx, bootstrapResamples, seed);
        var paths = Paths(ctx);
        var censoring = new Dictionary<int, DefectCensoring>();
        foreach (var t in defects.Tracks) censoring[t.Id] = CensoringOf(ctx, t, paths[t.Id]);
        var events = new List<DefectEvent>();
        var created = Pair(ctx, DefectEventKind.Creation, paths, censoring, events);
        var annihilated = Pair(ctx, DefectEventKind.Annihilation, paths, censoring, events);
        events.Sort((a, b) => a.Frame != b.Frame ? a.Frame.CompareTo(b.Frame) : a.PlusTrackId.CompareTo(b.PlusTrackId));
        var rows = new List<DefectTrackLifetime>(defects.Tracks.Count);
        int unpairedStarts = 0, unpairedEnds = 0;
        foreach (var t in defects.Tracks)
        {
            var c = censoring[t.Id];
            int cw = created.GetValueOrDefault(t.Id), aw = annihilated.GetValueOrDefault(t.Id);
            if ((c & (DefectCensoring.NoFrameBefore | DefectCensoring.StartsNearEdge)) == 0 && cw == 0) unpairedStarts++;
            if ((c & (DefectCensoring.NoFrameAfter | DefectCensoring.EndsNearEdge)) == 0 && aw == 0) unpairedEnds++;
            rows.Add(new DefectTrackLifetime(t.Id, t.Charge, t.FirstFrame, t.LastFrame, t.LastFrame - t.FirstFrame + 1, c, cw, aw));
        }
        var (curve, lifetime) = Lifetime(rows);
        double exposure = ctx.EventAreaPx2 * ctx.FrameIntervals;
        int creations = 0, annihilations = 0;
        foreach (var e in events) if (e.Kind == DefectEventKind.Creation) creations++; else annihilations++;
        var perTrack = MsdPerTrack(ctx, paths);
        var msd = Msd(perTrack);
        var (alpha, fitLags) = MsdExponent(ctx, paths, perTrack, msd, bootstrapResamples, seed);
        var result = new DefectStatisticsResult(plus, minus, net, lifetime, curve, PoissonInterval.Rate(creations, exposure),
            PoissonInterval.Rate(annihilations, exposure), events, rows, msd, alpha, fitLags, ctx.SearchAreaPx2, ctx.EventAreaPx2,
            ctx.FrameIntervals, unpairedStarts, unpairedEnds);
        return defects.NotApplicableReason is { } reason ? result.NotApplicable(reason) : result;
    }

    /// <summary>The reasons of <paramref name="c"/> in words, joined by "; ".</summary>
    public static string Words(DefectCensoring c)
    {
        var w = new List<string>();
        if (c.HasFlag(DefectCensoring.NoFrameBefore)) w.Add("starts in the first analysed frame or after a missing frame");
        if (c.HasFlag(DefectCensoring.NoFrameAfter)) w.Add("ends in the last analysed frame or before a missing frame");
        if (c.HasFlag(DefectCensoring.StartsNearEdge)) w.Add("starts near the image edge");
        if (c.HasFlag(DefectCensoring.EndsNearEdge)) w.Add("ends near the image edge");
        return string.Join("; ", w);
    }

    /// <summary>Inputs shared by the parts: frame lookup, areas, edge margin, tissue shift.</summary>
    private sealed class Context
    {
        public readonly DefectResult Defects;
        public readonly IReadOnlyList<int> Frames;
        public readonly Dictionary<int, int> EntryOf = new();
        public readonly IReadOnlyList<(double X, double Y)>? Shift;
        public readonly double WidthPx, HeightPx, EdgePx, SearchAreaPx2, EventAreaPx2;
        public readonly int FrameIntervals;

        public Context(DefectResult d, IReadOnlyList<int> frames, int widthPx, int heightPx, double tissueAreaPx2, IReadOnlyList<(double X, double Y)>? shift)
        {
            Defects = d; Frames = frames; Shift = shift; WidthPx = widthPx; HeightPx = heightPx;
            for (int i = 0; i < frames.Count; i++)
            {
                if (i > 0 && frames[i] <= frames[i - 1]) throw new ArgumentException($"{nameof(frames)} must increase (frame {frames[i]} after {frames[i - 1]})");
                EntryOf[frames[i]] = i;
                if (i > 0 && frames[i] == frames[i - 1] + 1) FrameIntervals++;
            }
            double g = double.IsFinite(d.CoarsePx) ? d.CoarsePx : 0;
            EdgePx = EdgeCoarseWidths * g;
            double cover = widthPx > 0 && heightPx > 0 ? Math.Clamp(tissueAreaPx2 / ((double)widthPx * heightPx), 0, 1) : 0;
            SearchAreaPx2 = cover * Math.Max(0, widthPx - 2 * g) * Math.Max(0, heightPx - 2 * g);
            EventAreaPx2 = cover * Math.Max(0, widthPx - 2 * EdgePx) * Math.Max(0, heightPx - 2 * EdgePx);
        }

        public bool Analysed(int frame) => EntryOf.ContainsKey(frame);

        public bool NearEdge(double x, double y) => x < EdgePx || y < EdgePx || x > WidthPx - EdgePx || y > HeightPx - EdgePx;

        /// <summary>Position relative to the tissue, x - D(frame).</summary>
        public (double X, double Y) Relative(int frame, double x, double y)
        {
            if (Shift is null || !EntryOf.TryGetValue(frame, out int e)) return (x, y);
            return (x - Shift[e].X, y - Shift[e].Y);
        }
    }

    /// <summary>One member of a track: frame and lab position.</summary>
    private readonly record struct Member(int Frame, double X, double Y);

    /// <summary>Each track's members in frame order (from the observations).</summary>
    private static Dictionary<int, List<Member>> Paths(Context ctx)
    {
        var paths = new Dictionary<int, List<Member>>();
        foreach (var t in ctx.Defects.Tracks) paths[t.Id] = [];
        foreach (var o in ctx.Defects.Observations)
            if (paths.TryGetValue(o.TrackId, out var list)) list.Add(new Member(o.Frame, o.Defect.X, o.Defect.Y));
        foreach (var list in paths.Values) list.Sort((a, b) => a.Frame.CompareTo(b.Frame));
        return paths;
    }

    private static DefectCensoring CensoringOf(Context ctx, DefectTrack t, List<Member> path)
    {
        var c = DefectCensoring.None;
        if (!ctx.Analysed(t.FirstFrame - 1)) c |= DefectCensoring.NoFrameBefore;
        if (!ctx.Analysed(t.LastFrame + 1)) c |= DefectCensoring.NoFrameAfter;
        if (path.Count > 0 && ctx.NearEdge(path[0].X, path[0].Y)) c |= DefectCensoring.StartsNearEdge;
        if (path.Count > 0 && ctx.NearEdge(path[^1].X, path[^1].Y)) c |= DefectCensoring.EndsNearEdge;
        return c;
    }

    /// <summary>Per-frame densities N / A_search of each charge and the net charge (N+ - N-) / 2, each with a moving-block
    /// bootstrap over the frames whose blocks are at least the mean track span long (a defect seen in neighbouring frames is
    /// the same defect, so blocks shorter than a lifetime would treat one defect as many independent counts).</summary>
    private static (Estimate Plus, Estimate Minus, Estimate Net) Densities(Context ctx, int resamples, int seed)
    {
        int n = ctx.Frames.Count;
        if (n == 0 || !(ctx.SearchAreaPx2 > 0))
        {
            var none = Estimate.TooFewUnits(0, "time blocks", n == 0 ? "no frames" : "no tissue area in which defects are searched");
            return (none, none, none);
        }
        var plus = new double[n]; var minus = new double[n];
        foreach (var o in ctx.Defects.Observations)
        {
            if (!ctx.EntryOf.TryGetValue(o.Frame, out int e)) continue;
            if (o.Defect.Charge == 0.5) plus[e]++; else if (o.Defect.Charge == -0.5) minus[e]++;
        }
        var net = new double[n];
        for (int i = 0; i < n; i++) { net[i] = (plus[i] - minus[i]) / 2; plus[i] /= ctx.SearchAreaPx2; minus[i] /= ctx.SearchAreaPx2; }
        double span = 0;
        foreach (var t in ctx.Defects.Tracks) span += t.LastFrame - t.FirstFrame + 1;
        int block = ctx.Defects.Tracks.Count > 0 ? Math.Max(2, (int)Math.Round(span / ctx.Defects.Tracks.Count)) : 2;
        return (Density(plus, 0.5, ctx, resamples, seed, block), Density(minus, -0.5, ctx, resamples, seed, block),
            MovingBlockBootstrap.Mean([net], resamples, seed, block));
    }

    /// <summary>
    /// The mean density with its moving-block interval over frames; when the movie holds fewer than
    /// <see cref="Estimate.MinUnits"/> time blocks (defects that live about as long as the movie), the interval treats the
    /// distinct defect tracks of that charge as a spatial Poisson sample of the tissue: density x Garwood(K) / K with K the
    /// tracks (docs/motion.md#defect-density); n = defect tracks.
    /// </summary>
    /// <remarks>Garwood F. (1936), Biometrika 28:437-442. Defects created in +-1/2 pairs are not independent, so this
    /// interval is, if anything, too narrow by up to sqrt(2) for a tissue of pairs (stated in the docs).</remarks>
    private static Estimate Density(double[] perFrame, double charge, Context ctx, int resamples, int seed, int block)
    {
        var e = MovingBlockBootstrap.Mean([perFrame], resamples, seed, block);
        if (e.N >= Estimate.MinUnits || resamples == 0) return e;
        int k = 0;
        foreach (var t in ctx.Defects.Tracks) if (t.Charge == charge) k++;
        if (k == 0) return e;
        var (lo, hi) = PoissonInterval.Garwood(k);
        return Estimate.Judged(e.Value, e.Value * lo / k, e.Value * hi / k, k, "defect tracks");
    }

    /// <summary>Kaplan-Meier curve of the lifetimes and the median as an estimate (docs/motion.md#defect-lifetime).</summary>
    private static (SurvivalCurve Curve, Estimate Median) Lifetime(List<DefectTrackLifetime> rows)
    {
        var times = new double[rows.Count]; var observed = new bool[rows.Count];
        for (int i = 0; i < rows.Count; i++) { times[i] = rows[i].LifetimeFrames; observed[i] = !rows[i].Censored; }
        var curve = KaplanMeier.Of(times, observed);
        var m = KaplanMeier.Median(curve);
        int n = rows.Count;
        const string unit = "defect tracks";
        if (n < Estimate.MinUnits)
            return (curve, Estimate.TooFewUnits(n, unit, $"n = {n} defect tracks, fewer than {Estimate.MinUnits}") with { Value = m.Median });
        if (!m.Reached)
            return (curve, new Estimate(double.NaN, Finite(m.Low), double.NaN)
            {
                N = n, UnitName = unit, Status = EstimateStatus.AtBound, Bound = BoundSide.Upper, BoundValue = m.LongestTime,
                Reason = $"median not reached: survival stays above 1/2 up to {m.LongestTime:0} frames ({curve.Events} of {n} tracks end inside the movie and the field)",
            });
        if (!double.IsFinite(m.High))
            return (curve, new Estimate(m.Median, m.Low, double.NaN)
            {
                N = n, UnitName = unit, Status = EstimateStatus.AtBound, Bound = BoundSide.Upper, BoundValue = m.LongestTime,
                Reason = $"the interval's upper end lies beyond the longest track ({m.LongestTime:0} frames)",
            });
        return (curve, Estimate.Judged(m.Median, m.Low, m.High, n, unit));
    }

    private static double Finite(double x) => double.IsFinite(x) ? x : double.NaN;

    /// <summary>Pairs uncensored +1/2 and -1/2 starts (creation) or ends (annihilation) within <see cref="PairFrames"/> and
    /// <see cref="PairCoarseWidths"/> coarse widths (relative to the tissue), greedily nearest first (ties: smaller frame
    /// difference, then smaller ids), each track at most once; appends the events and returns each paired track's partner.</summary>
    private static Dictionary<int, int> Pair(Context ctx, DefectEventKind kind, Dictionary<int, List<Member>> paths,
        Dictionary<int, DefectCensoring> censoring, List<DefectEvent> events)
    {
        bool start = kind == DefectEventKind.Creation;
        var blocked = start ? DefectCensoring.NoFrameBefore | DefectCensoring.StartsNearEdge : DefectCensoring.NoFrameAfter | DefectCensoring.EndsNearEdge;
        var plus = new List<(int Id, Member M)>(); var minus = new List<(int Id, Member M)>();
        foreach (var t in ctx.Defects.Tracks)
        {
            var path = paths[t.Id];
            if ((censoring[t.Id] & blocked) != 0 || path.Count == 0) continue;
            var m = start ? path[0] : path[^1];
            if (t.Charge == 0.5) plus.Add((t.Id, m)); else if (t.Charge == -0.5) minus.Add((t.Id, m));
        }
        double gate = PairCoarseWidths * ctx.Defects.CoarsePx;
        var candidates = new List<(double D, int Df, int P, int M)>();
        for (int i = 0; i < plus.Count; i++)
            for (int j = 0; j < minus.Count; j++)
            {
                var (a, b) = (plus[i].M, minus[j].M);
                int df = Math.Abs(a.Frame - b.Frame);
                if (df > PairFrames) continue;
                var (ax, ay) = ctx.Relative(a.Frame, a.X, a.Y); var (bx, by) = ctx.Relative(b.Frame, b.X, b.Y);
                double d = Math.Sqrt((ax - bx) * (ax - bx) + (ay - by) * (ay - by));
                if (d <= gate) candidates.Add((d, df, i, j));
            }
        candidates.Sort((x, y) => x.D != y.D ? x.D.CompareTo(y.D) : x.Df != y.Df ? x.Df.CompareTo(y.Df)
            : plus[x.P].Id != plus[y.P].Id ? plus[x.P].Id.CompareTo(plus[y.P].Id) : minus[x.M].Id.CompareTo(minus[y.M].Id));
        var partner = new Dictionary<int, int>();
        foreach (var (d, _, i, j) in candidates)
        {
            int p = plus[i].Id, q = minus[j].Id;
            if (partner.ContainsKey(p) || partner.ContainsKey(q)) continue;
            partner[p] = q; partner[q] = p;
            var (a, b) = (plus[i].M, minus[j].M);
            int frame = start ? Math.Min(a.Frame, b.Frame) : Math.Max(a.Frame, b.Frame);
            events.Add(new DefectEvent(kind, frame, (a.X + b.X) / 2, (a.Y + b.Y) / 2, p, q, d));
        }
        return partner;
    }

    /// <summary>Per +1/2 track with at least two members (in track order): for each lag the sum of squared displacements relative to the
    /// tissue and the number of pairs.</summary>
    private static List<(Dictionary<int, double> Sum, Dictionary<int, int> Pairs)> MsdPerTrack(Context ctx, Dictionary<int, List<Member>> paths)
    {
        var perTrack = new List<(Dictionary<int, double>, Dictionary<int, int>)>();
        foreach (var t in ctx.Defects.Tracks)
        {
            var path = paths[t.Id];
            if (t.Charge != 0.5 || path.Count < 2) continue;
            var r = new (double X, double Y)[path.Count];
            for (int i = 0; i < path.Count; i++) r[i] = ctx.Relative(path[i].Frame, path[i].X, path[i].Y);
            var sum = new Dictionary<int, double>(); var pairs = new Dictionary<int, int>();
            for (int i = 0; i < path.Count; i++)
                for (int j = i + 1; j < path.Count; j++)
                {
                    int lag = path[j].Frame - path[i].Frame;
                    double dx = r[j].X - r[i].X, dy = r[j].Y - r[i].Y;
                    sum[lag] = sum.GetValueOrDefault(lag) + dx * dx + dy * dy;
                    pairs[lag] = pairs.GetValueOrDefault(lag) + 1;
                }
            perTrack.Add((sum, pairs));
        }
        return perTrack;
    }

    /// <summary>MSD(tau) = sum over every +1/2 track and pair of members tau frames apart of |r_j - r_i|^2 / pairs.</summary>
    private static List<MsdPoint> Msd(List<(Dictionary<int, double> Sum, Dictionary<int, int> Pairs)> perTrack)
    {
        var sum = new SortedDictionary<int, (double S, int P, int T)>();
        foreach (var (s, p) in perTrack)
            foreach (var (lag, count) in p)
            {
                var cur = sum.GetValueOrDefault(lag);
                sum[lag] = (cur.S + s[lag], cur.P + count, cur.T + 1);
            }
        var points = new List<MsdPoint>(sum.Count);
        foreach (var (lag, v) in sum) points.Add(new MsdPoint(lag, v.S / v.P, v.P, v.T));
        return points;
    }

    /// <summary>alpha = least-squares slope of log MSD on log tau over tau = 1..L, L = min(floor(<see cref="MsdFitFraction"/>
    /// x median +1/2 track span), largest lag held by at least <see cref="Estimate.MinUnits"/> tracks), at least 2 lags;
    /// percentile bootstrap over +1/2 tracks (each resample recomputes the pooled MSD at the same lags).</summary>
    private static (Estimate Alpha, int Lags) MsdExponent(Context ctx, Dictionary<int, List<Member>> paths,
        List<(Dictionary<int, double> Sum, Dictionary<int, int> Pairs)> perTrack, List<MsdPoint> msd, int resamples, int seed)
    {
        int k = perTrack.Count;
        const string unit = "defect tracks";
        if (k == 0) return (Estimate.TooFewUnits(0, unit, "no +1/2 defect track followed for two frames"), 0);
        var spans = new double[k]; int s = 0;
        foreach (var t in ctx.Defects.Tracks)
            if (t.Charge == 0.5 && paths[t.Id].Count >= 2) spans[s++] = t.LastFrame - t.FirstFrame + 1;
        int byLength = (int)Math.Floor(MsdFitFraction * Descriptive.Median(spans)), bySupport = 0;
        foreach (var p in msd) if (p.Tracks >= Estimate.MinUnits) bySupport = Math.Max(bySupport, p.LagFrames);
        int lags = Math.Min(byLength, bySupport);
        if (lags < 2)
            return (Estimate.TooFewUnits(k, unit, $"fewer than 2 lags to fit (a quarter of the median +1/2 track span is {byLength} frames; {bySupport} lags are held by {Estimate.MinUnits} tracks)"), 0);
        double Statistic(int[] c)
        {
            var x = new List<double>(lags); var y = new List<double>(lags);
            for (int lag = 1; lag <= lags; lag++)
            {
                double sum = 0; long pairs = 0;
                for (int i = 0; i < k; i++)
                    if (c[i] > 0 && perTrack[i].Pairs.TryGetValue(lag, out int n)) { sum += c[i] * perTrack[i].Sum[lag]; pairs += (long)c[i] * n; }
                if (pairs > 0 && sum > 0) { x.Add(Math.Log(lag)); y.Add(Math.Log(sum / pairs)); }
            }
            return x.Count >= 2 ? Slope(x, y) : double.NaN;
        }
        return (Bootstrap.Percentile(k, Statistic, resamples, seed, unit), lags);
    }

    /// <summary>Ordinary least-squares slope sum (x - xbar)(y - ybar) / sum (x - xbar)^2.</summary>
    private static double Slope(List<double> x, List<double> y)
    {
        double mx = 0, my = 0;
        for (int i = 0; i < x.Count; i++) { mx += x[i]; my += y[i]; }
        mx /= x.Count; my /= x.Count;
        double sxy = 0, sxx = 0;
        for (int i = 0; i < x.Count; i++) { sxy += (x[i] - mx) * (y[i] - my); sxx += (x[i] - mx) * (x[i] - mx); }
        return sxx > 0 ? sxy / sxx : double.NaN;
    }
}
