namespace ShapeNoise.Imaging.Segmentation;

/// <summary>What <see cref="JunctionModelFit.Refine"/> did: the junction width and gain it fitted and the pixels it moved.</summary>
/// <param name="SigmaPx">Width σ_m (px) of the fitted junction model, last round.</param>
/// <param name="BandPx">Band width (px) of the fitted junction model.</param>
/// <param name="Gain">Fitted junction amplitude a (flattened units per unit of line coverage), last round.</param>
/// <param name="Moves">Pixels that changed label, all rounds (and the posterior-marginal step, when on).</param>
/// <param name="Merges">Cells merged into a neighbour, all rounds.</param>
/// <param name="Sweeps">Sweeps over the boundary pixels, all rounds.</param>
public readonly record struct ModelFitResult(double SigmaPx, double BandPx, double Gain, int Moves, int Merges, int Sweeps);

/// <summary>
/// Boundary refinement by fitting a forward model of the junction image (docs/segmentation.md#junction-model-fit).
/// The model of the flattened frame F given labels L is F(x) ≈ ℓ(x) + a M_L(x), with M_L = G_σ * C_L: C_L(p) the area
/// of pixel p within w/2 of a crack of L (a pixel edge between different labels: a junction band of width w centred on
/// the contact, <see cref="BandTable"/>), G_σ a normalised sampled Gaussian, and ℓ = G_σ * (Σ_k ℓ_k 1_k) the blurred
/// per-cell levels (background, haze and cytoplasm). w (1, 1.5, 2 px or the pixel line) and σ are chosen by least squared
/// residual (σ by golden-section search), a and the ℓ_k by joint least squares; then a boundary pixel changes to a neighbouring label when that lowers
/// Σ_x (F − ℓ − a M_L)² / (2 σ_n²) + β Λ(L) (σ_n the noise sd, <see cref="EnergyNoiseSd"/>), one pixel at a time (iterated conditional modes), keeping
/// every cell locally connected; fit and sweeps are repeated for a few rounds. Λ is the boundary length by the
/// Cauchy–Crofton formula on the 8-neighbour pairs: Λ = w_a N_a + w_d N_d, N_a (N_d) the axial (diagonal) neighbour pairs
/// with different labels, w_a = 1 / (1 + √2), w_d = w_a / √2, so that an axis-parallel boundary costs 1 per px and a
/// straight boundary of any direction between 1 and 1.082 per px of its Euclidean length (the crack count, the
/// 4-neighbour Potts prior, costs |cos θ| + |sin θ|: up to 1.414 at 45°, which favours staircases along the axes).
/// </summary>
/// <remarks>Iterated conditional modes for the labels of a blurred, noisy image with a Potts prior: Besag J. (1986),
/// "On the statistical analysis of dirty pictures", J. R. Statist. Soc. B 48:259-302. A junction wider than 2 px is
/// absorbed by σ (a band of width w adds about w²/12 to σ²; docs/segmentation.md#junction-model-fit).
/// Golden-section search: Kiefer J. (1953), Proc. AMS 4:502-506. Cauchy–Crofton edge weights on a grid: Boykov Y. and
/// Kolmogorov V. (2003), "Computing geodesics and minimal surfaces via graph cuts", Proc. IEEE ICCV 2003, 26-33
/// (w_k = δ² Δφ_k / (2 |e_k|), Δφ = π/4 for each of the 8-neighbourhood's four directions; here scaled by 8 / (π (1 + √2))).</remarks>
public static class JunctionModelFit
{
    /// <summary>Refines <paramref name="labels"/> (row-major, 0 = no cell, changed in place) against the flattened frame
    /// <paramref name="flat"/> with noise sd <paramref name="noiseSd"/> and prior strength <paramref name="beta"/>; σ is
    /// searched in [<paramref name="minSigmaPx"/>, <paramref name="maxSigmaPx"/>] on the central crop of at most 256 x 256 px
    /// (later rounds: within 0.3 px of the previous round's σ). With <paramref name="sampleSweeps"/> &gt; 0 the fitted labels
    /// are then replaced by posterior-marginal labels: that many heat-bath sweeps at <paramref name="temperature"/>, the
    /// stream seeded by <paramref name="seed"/> (docs/segmentation.md#posterior-marginal-labels).</summary>
    /// <remarks>Gibbs sampler: Geman S. and Geman D. (1984), IEEE TPAMI 6:721-741. Maximiser of the posterior marginals:
    /// Marroquin J., Mitter S. and Poggio T. (1987), "Probabilistic solution of ill-posed problems in computational
    /// vision", J. Am. Stat. Assoc. 82:76-89.</remarks>
    public static ModelFitResult Refine(float[] flat, int[] labels, int w, int h, double noiseSd, double beta,
        double minSigmaPx, double maxSigmaPx, double mergeMargin, int rounds = 3, int maxSweeps = 10, int sampleSweeps = 0, double temperature = 1, int seed = 1)
    {
        double sigma = minSigmaPx, gain = 0, band = 1;
        int moves = 0, sweeps = 0, merged = 0;
        for (int round = 0; round < rounds; round++)
        {
            // The band width (1, 1.5 or 2 px, or the pixel line) with the least squared residual in the first round, each at its best σ; later
            // rounds keep it and search σ within 0.3 px of the previous one (the labels changed little).
            if (round == 0)
            {
                double best = double.MaxValue;
                foreach (var b in BandWidthsPx)
                {
                    var (s, rss) = FitSigma(flat, labels, w, h, minSigmaPx, maxSigmaPx, b);
                    if (rss < best) { best = rss; sigma = s; band = b; }
                }
            }
            else sigma = FitSigma(flat, labels, w, h, Math.Max(minSigmaPx, sigma - 0.3), Math.Min(maxSigmaPx, sigma + 0.3), band).Sigma;
            var state = new State(flat, labels, w, h, sigma, band);
            (double fitRss, gain) = state.Initialise();
            if (!(gain > 0)) break;
            state.SetNoise(EnergyNoiseSd(noiseSd, fitRss, w * h), beta);
            state.MergeMargin = mergeMargin;
            int roundMoves = 0;
            for (int k = 0; k < maxSweeps; k++)
            {
                sweeps++;
                int m = state.Sweep();
                roundMoves += m;
                if (m == 0) break;
            }
            moves += roundMoves;
            int merges = 0;
            // The sweep state is current (labels, coverage and residual updated move by move; gain and levels held).
            if (mergeMargin >= 0) merges = state.MergePass();
            merged += merges;
            if (roundMoves == 0 && merges == 0) break;
        }
        if (sampleSweeps > 0 && gain > 0)
        {
            // Gain and levels refitted on the final labels (the last round's merges changed them).
            var st = new State(flat, labels, w, h, sigma, band);
            var (rss, g) = st.Initialise();
            if (g > 0)
            {
                st.SetNoise(EnergyNoiseSd(noiseSd, rss, w * h), beta);
                moves += st.Marginals(sampleSweeps, temperature, new Random(seed));
            }
        }
        return new ModelFitResult(sigma, band, gain, moves, merged, sweeps);
    }

    /// <summary>The noise sd σ_n of the energy: the larger of the measured noise sd and the rms residual √(RSS / N) of the
    /// model fitted to the current labels (the maximum-likelihood error sd given the model), so that where the model's own
    /// misfit exceeds the noise (very clean movies) a boundary needs correspondingly more evidence
    /// (docs/segmentation.md#junction-model-fit).</summary>
    internal static double EnergyNoiseSd(double measuredSd, double rss, int pixels) => Math.Max(measuredSd, Math.Sqrt(rss / pixels));

    /// <summary>Band widths (px) the fit chooses from: the junction's physical width before the blur; 0 = the pixel line
    /// (<see cref="BandTable.Of"/>).</summary>
    private static readonly double[] BandWidthsPx = [1, 1.5, 2, 0];

    /// <summary>For tests: the change of the squared residual predicted for moving pixel (x, y) to label b (gain and
    /// levels held), and the same change recomputed from scratch on the whole frame.</summary>
    internal static (double Predicted, double Recomputed) FlipCheck(float[] flat, int[] labels, int w, int h, double sigmaPx, int x, int y, int b)
    {
        var st = new State(flat, labels, w, h, sigmaPx);
        var (rss, _) = st.Initialise();
        double predicted = st.PredictedChange(x, y, labels[y * w + x], b);
        var moved = (int[])labels.Clone();
        moved[y * w + x] = b;
        return (predicted, st.RssWith(moved) - rss);
    }

    /// <summary>For tests: the heat-bath distribution of pixel (x, y) as the sampler computes it, and the same
    /// probabilities from energies recomputed on the whole frame (squared residual afresh plus 2σ_n² β Λ, the boundary
    /// length counted afresh), gain and levels held.</summary>
    internal static (int[] Labels, double[] Sampler, double[] Recomputed) SiteCheck(float[] flat, int[] labels, int w, int h,
        double sigmaPx, double noiseSd, double beta, double temperature, int x, int y)
    {
        var st = new State(flat, labels, w, h, sigmaPx);
        st.Initialise();
        st.SetNoise(noiseSd, beta);
        Span<int> cand = stackalloc int[5];
        Span<double> prob = stackalloc double[5];
        int nc = st.SiteDistribution(x, y, temperature, cand, prob);
        var e = new double[nc];
        for (int j = 0; j < nc; j++)
        {
            var moved = (int[])labels.Clone();
            moved[y * w + x] = cand[j];
            e[j] = (st.RssWith(moved) + st.Penalty * BoundaryLength(moved, w, h)) / (2 * st.NoiseVar * temperature);
        }
        double tot = 0, e0 = e[0];
        for (int j = 0; j < nc; j++) { e[j] = Math.Exp(e0 - e[j]); tot += e[j]; }
        for (int j = 0; j < nc; j++) e[j] /= tot;
        return (cand[..nc].ToArray(), prob[..nc].ToArray(), e);
    }

    /// <summary>Weight of an axial neighbour pair in the boundary length Λ: 1 / (1 + √2) (see <see cref="JunctionModelFit"/>).</summary>
    internal static readonly double AxialWeight = 1 / (1 + Math.Sqrt(2));
    /// <summary>Weight of a diagonal neighbour pair in Λ: <see cref="AxialWeight"/> / √2.</summary>
    internal static readonly double DiagonalWeight = AxialWeight / Math.Sqrt(2);

    /// <summary>The boundary length Λ(L) = w_a N_a + w_d N_d of the labels (see <see cref="JunctionModelFit"/>), counted afresh.</summary>
    internal static double BoundaryLength(int[] l, int w, int h)
    {
        int na = 0, nd = 0;
        for (int y = 0; y < h; y++)
            for (int x = 0; x < w; x++)
            {
                int i = y * w + x;
                if (x + 1 < w && l[i] != l[i + 1]) na++;
                if (y + 1 < h && l[i] != l[i + w]) na++;
                if (x + 1 < w && y + 1 < h && l[i] != l[i + w + 1]) nd++;
                if (x > 0 && y + 1 < h && l[i] != l[i + w - 1]) nd++;
            }
        return AxialWeight * na + DiagonalWeight * nd;
    }

    /// <summary>C_L: the area of each pixel within <paramref name="bandPx"/> / 2 of a crack of <paramref name="labels"/> (row-major; <see cref="BandTable"/>).</summary>
    public static double[] Coverage(int[] labels, int w, int h, double bandPx = 1)
    {
        var st = new State(new float[labels.Length], labels, w, h, 1, bandPx);
        var c = new double[labels.Length];
        for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) c[y * w + x] = st.Coverage(x, y);
        return c;
    }

    /// <summary>σ of least squared residual in [lo, hi] by golden-section search (0.02 px) on the central crop of at most 256 x 256 px.</summary>
    private static (double Sigma, double Rss) FitSigma(float[] flat, int[] labels, int w, int h, double lo, double hi, double bandPx)
    {
        int cw = Math.Min(w, 256), ch = Math.Min(h, 256), x0 = (w - cw) / 2, y0 = (h - ch) / 2;
        var f = new float[cw * ch]; var l = new int[cw * ch];
        for (int y = 0; y < ch; y++)
        {
            Array.Copy(flat, (y + y0) * w + x0, f, y * cw, cw);
            Array.Copy(labels, (y + y0) * w + x0, l, y * cw, cw);
        }
        double Rss(double s) => new State(f, l, cw, ch, s, bandPx).Initialise().Rss;
        double g = (Math.Sqrt(5) - 1) / 2, a = lo, b = hi;
        double c = b - g * (b - a), d = a + g * (b - a), fc = Rss(c), fd = Rss(d);
        while (b - a > 0.02)
        {
            if (fc < fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = Rss(c); }
            else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = Rss(d); }
        }
        return (0.5 * (a + b), Math.Min(fc, fd));
    }

    private sealed class State
    {
        private readonly double bandPx;
        private readonly float[] flat;
        private readonly int[] lab;
        private readonly int w, h, r;
        private readonly double[] g;     // normalised sampled Gaussian of σ_m, taps −r..r
        private readonly double[] k2;    // its 2-D outer product, (2r+1)²
        private double[] cover = [], level = [], resid = [], interior = [];
        private double gain;
        private readonly double[] dc = new double[9];
        private readonly double[] table;
        private bool[]? dirty;
        /// <summary>Cost, in squared-residual units, of a unit of boundary length Λ (2σ_n² β).</summary>
        public double Penalty { get; set; }

        public State(float[] flat, int[] labels, int w, int h, double sigma, double bandPx = 1)
        {
            this.flat = flat; lab = labels; this.w = w; this.h = h;
            table = BandTable.Of(bandPx);
            this.bandPx = bandPx;
            g = SampledGaussian.Kernel(sigma);
            r = g.Length / 2;
            k2 = new double[g.Length * g.Length];
            for (int a = 0; a < g.Length; a++) for (int b = 0; b < g.Length; b++) k2[a * g.Length + b] = g[a] * g[b];
        }

        private int from = -1, to = -1;
        private int L(int i) => lab[i] == from ? to : lab[i];
        private bool Crack(int i, int j) => L(i) != L(j);

        /// <summary>Area of pixel (x, y) within half the band width of a crack: the 12 pixel edges that can reach it looked up
        /// in the band's <see cref="BandTable"/>.</summary>
        public double Coverage(int x, int y)
        {
            int i = y * w + x, bits = 0;
            bool left = x > 0, right = x + 1 < w, top = y > 0, bottom = y + 1 < h;
            if (left && Crack(i, i - 1)) bits |= 1;
            if (right && Crack(i, i + 1)) bits |= 2;
            if (top && Crack(i, i - w)) bits |= 4;
            if (bottom && Crack(i, i + w)) bits |= 8;
            if (left && top) { if (Crack(i - 1, i - w - 1)) bits |= 16; if (Crack(i - w, i - w - 1)) bits |= 32; }
            if (right && top) { if (Crack(i + 1, i - w + 1)) bits |= 64; if (Crack(i - w, i - w + 1)) bits |= 128; }
            if (left && bottom) { if (Crack(i - 1, i + w - 1)) bits |= 256; if (Crack(i + w, i + w - 1)) bits |= 512; }
            if (right && bottom) { if (Crack(i + 1, i + w + 1)) bits |= 1024; if (Crack(i + w, i + w + 1)) bits |= 2048; }
            return table[bits];
        }

        /// <summary>Blur by the model's sampled Gaussian, edges replicated (<see cref="SampledGaussian"/>, as the renderer's PSF).</summary>
        private double[] Blur(double[] f) => SampledGaussian.Blur(f, w, h, g);

        public (double Rss, double Gain) Initialise()
        {
            int n = w * h, max = 0;
            foreach (var l in lab) if (l > max) max = l;
            cover = new double[n];
            for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) cover[y * w + x] = Coverage(x, y);
            var model = Blur(cover);
            // Joint least squares of the gain and the cells' levels (the levels unblurred while fitting): with cell means
            // F̄_k and M̄_k, a = Σ (F − F̄)(M − M̄) / Σ (M − M̄)², ℓ_k = F̄_k − a M̄_k.
            interior = new double[max + 1];
            var sf = new double[max + 1]; var sm = new double[max + 1]; var cnt = new int[max + 1];
            for (int i = 0; i < n; i++) { sf[lab[i]] += flat[i]; sm[lab[i]] += model[i]; cnt[lab[i]]++; }
            for (int k = 0; k <= max; k++) if (cnt[k] > 0) { sf[k] /= cnt[k]; sm[k] /= cnt[k]; }
            double sfm = 0, smm = 0;
            for (int i = 0; i < n; i++) { double mc = model[i] - sm[lab[i]]; sfm += (flat[i] - sf[lab[i]]) * mc; smm += mc * mc; }
            gain = smm > 0 ? sfm / smm : 0;
            for (int k = 0; k <= max; k++) interior[k] = sf[k] - gain * sm[k];
            var pc = new double[n];
            for (int i = 0; i < n; i++) pc[i] = interior[lab[i]];
            level = Blur(pc);
            resid = new double[n];
            double rss = 0;
            for (int i = 0; i < n; i++) { resid[i] = flat[i] - level[i] - gain * model[i]; rss += resid[i] * resid[i]; }
            return (rss, gain);
        }

        /// <summary>Change of the squared residual for moving pixel (x, y) from a to b, without the prior and without moving it.</summary>
        public double PredictedChange(int x, int y, int a, int b)
        {
            double p = Penalty;
            Penalty = 0;
            double c = Change(x, y, a, b, apply: false);
            Penalty = p;
            return c;
        }

        /// <summary>Squared residual of the labels <paramref name="other"/> under this state's σ, gain and levels, computed afresh.</summary>
        public double RssWith(int[] other)
        {
            var st = new State(flat, other, w, h, 1, bandPx);
            var cov = new double[w * h];
            for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) cov[y * w + x] = st.Coverage(x, y);
            var model = Blur(cov);
            var pc = new double[w * h];
            for (int i = 0; i < pc.Length; i++) pc[i] = interior[other[i]];
            var lev = Blur(pc);
            double rss = 0;
            for (int i = 0; i < pc.Length; i++) { double r = flat[i] - lev[i] - gain * model[i]; rss += r * r; }
            return rss;
        }

        /// <summary>Merges neighbouring cells when removing their shared crack from the model raises the log-likelihood
        /// by more than <see cref="MergeMargin"/>: −ΔRSS / (2σ_n²) &gt; margin (a boundary the junction signal does not
        /// support); best first, each cell at most once per pass. Returns the merges.</summary>
        public int MergePass()
        {
            // Shared boundaries: for each pair of neighbouring cells, the pixels on either side of their crack.
            var pairs = new Dictionary<long, List<int>>();
            for (int y = 1; y < h - 1; y++)
                for (int x = 1; x < w - 1; x++)
                {
                    int i = y * w + x, a = lab[i];
                    if (a <= 0) continue;
                    Add(i, i + 1); Add(i, i + w);
                    void Add(int p, int q)
                    {
                        int b = lab[q];
                        if (b <= 0 || b == a) return;
                        long key = a < b ? (long)a << 32 | (uint)b : (long)b << 32 | (uint)a;
                        if (!pairs.TryGetValue(key, out var list)) pairs[key] = list = [];
                        list.Add(p); list.Add(q);
                    }
                }
            var count = new int[interior.Length];
            foreach (var l in lab) count[l]++;
            var candidates = new List<(double E, int A, int B)>();
            foreach (var (key, pix) in pairs)
            {
                int a = (int)(key >> 32), b = (int)(key & 0xffffffff);
                double e = MergeChange(a, b, pix, count) / (2 * NoiseVar) + MergeMargin;
                if (e < 0) candidates.Add((e, a, b));
            }
            candidates.Sort();
            // Each cell takes part in at most one merge, so the merges of a pass are a map b -> a applied in one pass over the frame.
            var into = new int[interior.Length];
            int merges = 0;
            foreach (var (_, a, b) in candidates)
            {
                if (into[a] != 0 || into[b] != 0) continue;
                into[a] = a; into[b] = a;
                merges++;
            }
            if (merges > 0)
                for (int i = 0; i < lab.Length; i++) if (lab[i] > 0 && into[lab[i]] != 0) lab[i] = into[lab[i]];
            return merges;
        }

        /// <summary>Sets <see cref="NoiseVar"/> = σ_n² and the prior's cost per unit of boundary length, <see cref="Penalty"/> = 2σ_n² β.</summary>
        public void SetNoise(double noiseSd, double beta)
        {
            NoiseVar = noiseSd * noiseSd;
            Penalty = beta * 2 * NoiseVar;
        }

        /// <summary>Noise variance σ_n² of the flattened frame.</summary>
        public double NoiseVar { get; set; } = 1;
        /// <summary>Least log-likelihood gain for a merge (see <see cref="Refine"/>).</summary>
        public double MergeMargin { get; set; }

        /// <summary>Change of the squared residual when cell b joins cell a: the coverage around their shared crack
        /// (<paramref name="pix"/>) changes, and both cells take their pooled level.</summary>
        private double MergeChange(int a, int b, List<int> pix, int[] count)
        {
            int minX = int.MaxValue, minY = int.MaxValue, maxX = -1, maxY = -1;
            foreach (var p in pix) { int x = p % w, y = p / w; minX = Math.Min(minX, x); maxX = Math.Max(maxX, x); minY = Math.Min(minY, y); maxY = Math.Max(maxY, y); }
            int m = r + 2;
            int x0 = Math.Max(0, minX - m), x1 = Math.Min(w - 1, maxX + m), y0 = Math.Max(0, minY - m), y1 = Math.Min(h - 1, maxY + m);
            int bw = x1 - x0 + 1, bh = y1 - y0 + 1;
            var dcov = new double[bw * bh];
            from = b; to = a;
            foreach (var p in pix)
            {
                int px = p % w, py = p / w;
                for (int dy = -1; dy <= 1; dy++)
                    for (int dx = -1; dx <= 1; dx++)
                    {
                        int x = px + dx, y = py + dy;
                        if (x < 1 || y < 1 || x >= w - 1 || y >= h - 1) continue;
                        int k = (y - y0) * bw + x - x0;
                        dcov[k] = gain * (Coverage(x, y) - cover[y * w + x]);
                    }
            }
            from = to = -1;
            double pooled = (count[a] * interior[a] + count[b] * interior[b]) / Math.Max(1, count[a] + count[b]);
            // The model change over the box: the blurred coverage change, plus the level change inside both cells
            // (unblurred: the pooled level is itself a fit).
            var dm = new double[bw * bh];
            int kw = 2 * r + 1;
            for (int k = 0; k < dcov.Length; k++)
            {
                if (dcov[k] == 0) continue;
                int cx = k % bw, cy = k / bw;
                for (int dy = -r; dy <= r; dy++)
                {
                    int yy = cy + dy;
                    if (yy < 0 || yy >= bh) continue;
                    for (int dx = -r; dx <= r; dx++)
                    {
                        int xx = cx + dx;
                        if (xx < 0 || xx >= bw) continue;
                        dm[yy * bw + xx] += dcov[k] * k2[(dy + r) * kw + dx + r];
                    }
                }
            }
            double change = 0;
            for (int y = y0; y <= y1; y++)
                for (int x = x0; x <= x1; x++)
                {
                    int i = y * w + x, k = (y - y0) * bw + x - x0;
                    double d = dm[k] + (lab[i] == a ? pooled - interior[a] : lab[i] == b ? pooled - interior[b] : 0);
                    change += d * d - 2 * resid[i] * d;
                }
            // Level change on the parts of the cells outside the box.
            double ca = pooled - interior[a], cb = pooled - interior[b];
            int outA = count[a], outB = count[b];
            for (int y = y0; y <= y1; y++)
                for (int x = x0; x <= x1; x++) { int l = lab[y * w + x]; if (l == a) outA--; else if (l == b) outB--; }
            change += outA * ca * ca + outB * cb * cb;   // residuals there sum to about zero (least-squares levels)
            return change;
        }

        /// <summary>The heat-bath distribution of pixel (x, y) (label a): its own label and each distinct positive
        /// 4-neighbour label b (only when a stays locally connected without it), with probability
        /// ∝ exp(−ΔE_b / T), ΔE_b = (ΔRSS_b + 2σ_n² β ΔΛ_b) / (2σ_n²) and ΔE_a = 0. Fills
        /// <paramref name="cand"/> and <paramref name="prob"/> (length ≥ 5) and returns how many candidates there are.</summary>
        public int SiteDistribution(int x, int y, double temperature, Span<int> cand, Span<double> prob)
        {
            int i = y * w + x, a = lab[i], nc = 0;
            cand[nc] = a; prob[nc++] = 0;
            if (a <= 0) return nc;
            int n0 = lab[i - 1], n1 = lab[i + 1], n2 = lab[i - w], n3 = lab[i + w];
            if (n0 == a && n1 == a && n2 == a && n3 == a || !Simple(x, y, a)) { prob[0] = 1; return nc; }
            double scale = 1 / (2 * NoiseVar * temperature);
            for (int k = 0; k < 4; k++)
            {
                int b = k == 0 ? n0 : k == 1 ? n1 : k == 2 ? n2 : n3;
                if (b <= 0 || b == a) continue;
                bool seen = false;
                for (int j = 1; j < nc; j++) if (cand[j] == b) seen = true;
                if (seen) continue;
                cand[nc] = b; prob[nc++] = Change(x, y, a, b, apply: false) * scale;
            }
            double min = 0, tot = 0;
            for (int j = 0; j < nc; j++) min = Math.Min(min, prob[j]);
            for (int j = 0; j < nc; j++) { prob[j] = Math.Exp(min - prob[j]); tot += prob[j]; }
            for (int j = 0; j < nc; j++) prob[j] /= tot;
            return nc;
        }

        /// <summary>Posterior-marginal labels (docs/segmentation.md#posterior-marginal-labels): <paramref name="sweepCount"/>
        /// raster sweeps of heat-bath updates (<see cref="SiteDistribution"/>) at <paramref name="temperature"/>, the first
        /// third discarded as burn-in; then every pixel takes the label it held most often (first seen wins a tie), and
        /// pieces of a cell cut off from its largest piece join a neighbouring cell. Returns the pixels whose label changed.</summary>
        public int Marginals(int sweepCount, double temperature, Random rng)
        {
            int n = w * h, burn = sweepCount / 3;
            var start = (int[])lab.Clone();
            var slotL = new int[4 * n]; var slotC = new int[4 * n];   // up to 4 labels per pixel with their counts
            Span<int> cand = stackalloc int[5];
            Span<double> prob = stackalloc double[5];
            for (int s = 0; s < sweepCount; s++)
                for (int y = 2; y < h - 2; y++)
                    for (int x = 2; x < w - 2; x++)
                    {
                        int i = y * w + x, a = lab[i];
                        if (a <= 0) continue;
                        int nc = SiteDistribution(x, y, temperature, cand, prob);
                        if (nc > 1)
                        {
                            double u = rng.NextDouble();
                            int pick = nc - 1;
                            for (int j = 0; j < nc; j++) { u -= prob[j]; if (u < 0) { pick = j; break; } }
                            if (pick > 0) Change(x, y, a, cand[pick], apply: true);
                        }
                        if (s >= burn) Count(slotL, slotC, i, lab[i]);
                    }
            for (int i = 0; i < n; i++)
            {
                if (slotC[4 * i] == 0) { lab[i] = start[i]; continue; }
                int best = 0;
                for (int k = 1; k < 4; k++) if (slotC[4 * i + k] > slotC[4 * i + best]) best = k;
                lab[i] = slotL[4 * i + best];
            }
            Regions.KeepLargestPieces(lab, w, h);
            int changed = 0;
            for (int i = 0; i < n; i++) if (lab[i] != start[i]) changed++;
            return changed;
        }

        private static void Count(int[] slotL, int[] slotC, int i, int l)
        {
            for (int k = 4 * i; k < 4 * i + 4; k++)
            {
                if (slotC[k] == 0) { slotL[k] = l; slotC[k] = 1; return; }
                if (slotL[k] == l) { slotC[k]++; return; }
            }
        }

        /// <summary>One raster sweep over the pixels with a 4-neighbour of another cell (only those near an earlier move
        /// after the first sweep); returns the moves.</summary>
        public int Sweep()
        {
            int moves = 0;
            dirty ??= Enumerable.Repeat(true, w * h).ToArray();
            var next = new bool[w * h];
            Span<int> nb = stackalloc int[4];
            for (int y = 2; y < h - 2; y++)
                for (int x = 2; x < w - 2; x++)
                {
                    int i = y * w + x, a = lab[i];
                    if (a <= 0 || !dirty[i]) continue;
                    int bestB = 0; double best = -1e-12;
                    nb[0] = lab[i - 1]; nb[1] = lab[i + 1]; nb[2] = lab[i - w]; nb[3] = lab[i + w];
                    for (int k = 0; k < 4; k++)
                    {
                        int b = nb[k];
                        if (b <= 0 || b == a) continue;
                        bool seen = false;
                        for (int j = 0; j < k; j++) if (nb[j] == b) seen = true;
                        if (seen) continue;
                        double d = Change(x, y, a, b, apply: false);
                        if (d < best) { best = d; bestB = b; }
                    }
                    if (bestB == 0 || !Simple(x, y, a)) continue;
                    Change(x, y, a, bestB, apply: true);
                    moves++;
                    // The residual changed within r + 1 px and the coverage within 1 px: neighbours there are looked at again.
                    int o = r + 2;
                    for (int yy = Math.Max(0, y - o); yy <= Math.Min(h - 1, y + o); yy++)
                        for (int xx = Math.Max(0, x - o); xx <= Math.Min(w - 1, x + o); xx++) next[yy * w + xx] = true;
                }
            dirty = next;
            return moves;
        }

        /// <summary>Change of the squared residual when pixel (x, y) goes from label a to b: the coverage of the 3 x 3
        /// pixels around it changes (its edges toggle), and its level by ℓ_b − ℓ_a; with apply, the label, coverage and
        /// residual are updated.</summary>
        private double Change(int x, int y, int a, int b, bool apply)
        {
            int i = y * w + x;
            lab[i] = b;
            Span<double> fresh = stackalloc double[9];
            if (x >= 2 && y >= 2 && x < w - 2 && y < h - 2) Coverage3x3(i, fresh);
            else
                for (int dy = -1; dy <= 1; dy++)
                    for (int dx = -1; dx <= 1; dx++) fresh[(dy + 1) * 3 + dx + 1] = Coverage(x + dx, y + dy);
            for (int dy = -1; dy <= 1; dy++)
                for (int dx = -1; dx <= 1; dx++)
                    dc[(dy + 1) * 3 + dx + 1] = gain * (fresh[(dy + 1) * 3 + dx + 1] - cover[i + dy * w + dx]);
            // Change of the boundary pairs: a neighbour of label l gains a boundary pair when l != b and loses one when l != a.
            int axial = Cut(lab[i - 1], a, b) + Cut(lab[i + 1], a, b) + Cut(lab[i - w], a, b) + Cut(lab[i + w], a, b);
            int diagonal = Cut(lab[i - w - 1], a, b) + Cut(lab[i - w + 1], a, b) + Cut(lab[i + w - 1], a, b) + Cut(lab[i + w + 1], a, b);
            if (!apply) lab[i] = a;
            dc[4] += interior[b] - interior[a];
            double change = Penalty * (AxialWeight * axial + DiagonalWeight * diagonal);
            // The blurred change, separably: t_qy(ex) = Σ_qx ΔC(qx, qy) g(ex − qx), then ΔM(ex, ey) = Σ_qy g(ey − qy) t_qy(ex).
            int o = r + 1, span = 2 * o + 1;
            Span<double> t = stackalloc double[3 * span];
            for (int qy = 0; qy < 3; qy++)
                for (int ex = -o; ex <= o; ex++)
                {
                    double v = 0;
                    for (int qx = 0; qx < 3; qx++)
                    {
                        double d = dc[qy * 3 + qx];
                        int k = ex - (qx - 1);
                        if (d != 0 && k >= -r && k <= r) v += d * g[k + r];
                    }
                    t[qy * span + ex + o] = v;
                }
            int x0 = Math.Max(-o, -x), x1 = Math.Min(o, w - 1 - x);   // columns inside the frame
            for (int ey = -o; ey <= o; ey++)
            {
                int yy = y + ey;
                if (yy < 0 || yy >= h) continue;
                int k0 = ey + 1, k1 = ey, k2i = ey - 1;   // ey − qy for qy = −1, 0, 1
                double g0 = k0 >= -r && k0 <= r ? g[k0 + r] : 0, g1 = k1 >= -r && k1 <= r ? g[k1 + r] : 0, g2 = k2i >= -r && k2i <= r ? g[k2i + r] : 0;
                int row = yy * w + x;
                for (int ex = x0; ex <= x1; ex++)
                {
                    int c = ex + o;
                    double dm = g0 * t[c] + g1 * t[span + c] + g2 * t[2 * span + c];
                    if (dm == 0) continue;
                    int j = row + ex;
                    change += dm * dm - 2 * resid[j] * dm;
                    if (apply) resid[j] -= dm;
                }
            }
            if (apply)
                for (int dy = -1; dy <= 1; dy++)
                    for (int dx = -1; dx <= 1; dx++) cover[i + dy * w + dx] = fresh[(dy + 1) * 3 + dx + 1];
            return change;
        }

        /// <summary>Change in boundary pairs between a pixel and its neighbour of label <paramref name="l"/> when the pixel goes from a to b.</summary>
        private static int Cut(int l, int a, int b) => (l != b ? 1 : 0) - (l != a ? 1 : 0);

        /// <summary><see cref="Coverage"/> of the 3 x 3 pixels around pixel <paramref name="i"/>, at least 2 px from every
        /// edge, from one read of the 5 x 5 labels around it (the same 12 crack bits per pixel).</summary>
        private void Coverage3x3(int i, Span<double> into)
        {
            Span<int> p = stackalloc int[25];
            for (int dy = -2; dy <= 2; dy++)
            {
                int row = i + dy * w;
                for (int dx = -2; dx <= 2; dx++) p[(dy + 2) * 5 + dx + 2] = L(row + dx);
            }
            for (int cy = 1; cy <= 3; cy++)
                for (int cx = 1; cx <= 3; cx++)
                {
                    int c = cy * 5 + cx, v = p[c], le = p[c - 1], ri = p[c + 1], up = p[c - 5], dn = p[c + 5];
                    int bits = (v != le ? 1 : 0) | (v != ri ? 2 : 0) | (v != up ? 4 : 0) | (v != dn ? 8 : 0)
                        | (le != p[c - 6] ? 16 : 0) | (up != p[c - 6] ? 32 : 0)
                        | (ri != p[c - 4] ? 64 : 0) | (up != p[c - 4] ? 128 : 0)
                        | (le != p[c + 4] ? 256 : 0) | (dn != p[c + 4] ? 512 : 0)
                        | (ri != p[c + 6] ? 1024 : 0) | (dn != p[c + 6] ? 2048 : 0);
                    into[(cy - 1) * 3 + cx - 1] = table[bits];
                }
        }

        /// <summary>Whether removing (x, y) from label <paramref name="a"/> keeps a's pixels around it in one 4-connected
        /// run of the 8-ring (consecutive ring pixels are 4-adjacent), so the cell stays locally connected.</summary>
        private bool Simple(int x, int y, int a)
        {
            int i = y * w + x;
            Span<int> ring = [i - w, i - w + 1, i + 1, i + w + 1, i + w, i + w - 1, i - 1, i - w - 1];
            int runs = 0, count = 0;
            for (int k = 0; k < 8; k++)
            {
                bool cur = lab[ring[k]] == a, prev = lab[ring[(k + 7) % 8]] == a;
                if (cur) count++;
                if (cur && !prev) runs++;
            }
            return count > 0 && runs <= 1;
        }
    }
}
