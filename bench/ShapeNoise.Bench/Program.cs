using ShapeNoise.Cli.Jobs;
// ShapeNoise benchmark: speed and memory of `analyze` on a large synthetic monolayer, measured in one run.
// Usage: dotnet run --project bench/ShapeNoise.Bench -c Release -- [--quick] [--guard]
//   (end to end it measures the command published by scripts/publish.sh into bench/out/command; --guard: the built one)
//   default : 1024 x 1024 px, ~2500 cells, 100 and 200 frames (movies generated once into bench/data)
//   --quick : 512 x 512 px, ~625 cells, 30 and 60 frames
//   --phases: decode and the in-process phases only (with --quick for the small movie)
//   --scale : also 2048 x 2048 px, ~10 000 cells, 200 frames end to end, against 4 x 2 x the 1024 x 1024, 100-frame time
//   --micro : per-call cost of the kernels every bootstrap and leave-one-out fit runs (pooling, one OU fit, one orientation
//             fit), of one motion correlation, and of tracing one frame's outlines
//   --guard : quick run that fails (exit 1) when the analysis time over a fixed calibration workload (a BCL sort, not
//             project code) exceeds 3x the ratio recorded in bench/baseline.json
using System.Diagnostics;
using System.Text.Json;
using System.Text.Json.Nodes;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Imaging.Writing;
using ShapeNoise.Outlines;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;
using ShapeNoise.Shape;
using ShapeNoise.Synthesis;

if (args.Contains("--micro")) return Micro();
bool quick = args.Contains("--quick") || args.Contains("--guard");
bool guard = args.Contains("--guard");
bool phasesOnly = args.Contains("--phases");
bool scale = args.Contains("--scale");       // also the 2048 x 2048 px, 200-frame, ~10 000-cell movie end to end (issue 16)   // decode and the in-process phases only (for iterating on one change)
string root = FindRoot();
string data = Path.Combine(root, "bench", "data");
int side = quick ? 512 : 1024, cells = quick ? 625 : 2500, frames = quick ? 30 : 100;
var movieLong = Ensure(Path.Combine(data, $"monolayer-{side}-{2 * frames}"), side, cells, 2 * frames);
var movieShort = Path.Combine(data, $"monolayer-{side}-{frames}.tif");
if (!File.Exists(movieShort)) FirstPages(movieLong, movieShort, frames);

var rows = new List<(string Name, double Seconds, string Note)>();
var json = new JsonObject { ["machine"] = $"{Environment.ProcessorCount} cores, {GC.GetGCMemoryInfo().TotalAvailableMemoryBytes / (1 << 30)} GiB, {System.Runtime.InteropServices.RuntimeInformation.OSDescription}", ["runtime"] = Environment.Version.ToString(), ["movie"] = Path.GetFileName(movieShort), ["frames"] = frames, ["side_px"] = side };

// 1. Decode only: read every page, nothing else (one warm-up pass, then best of five, so JIT and a cold file cache do not
// count: 30 small frames decode in about 0.04 s, so a single cold pass swung the guard's ratio two- to threefold).
Decode(movieShort);
double decode = Enumerable.Range(0, 5).Min(_ => Decode(movieShort));
rows.Add(("decode only", decode, "read and decompress every page"));
// The guard's yardstick: a fixed CPU workload that no project change can speed up or slow down (decode was the yardstick
// until 2026-12-04, but a faster decoder then tripled analysis/decode and failed the guard on a faster analysis).
Calibrate();
double calibration = Enumerable.Range(0, 5).Min(_ => Calibrate());
rows.Add(("calibration", calibration, "Array.Sort of 2^21 seeded random doubles, best of 5"));

// End to end through the command (process start to report written), with peak memory; 1x and 2x frames, and the
// 2048 x 2048 px movie with --scale. Outside the CI guard the command measured is the published one (scripts/publish.sh:
// the native executable, compiled ahead of time). Run before the in-process phases: after them this process's leftover
// work slowed the command by 20-25 % (bench/README.md, "Eighth pass").
string command = phasesOnly ? "" : guard ? BuiltCommand(root) : Published(root);
var (e2e, peak) = phasesOnly ? (double.NaN, 0L) : EndToEnd(movieShort, command);
var (e2eLong, peakLong) = guard || phasesOnly ? (double.NaN, 0L) : EndToEnd(movieLong, command);
var (e2eBig, peakBig) = scale && !quick && !phasesOnly ? EndToEnd(Ensure(Path.Combine(data, "monolayer-2048-200"), 2048, 10000, 200), command) : (double.NaN, 0L);

// 2. In-process analysis, phase by phase: one warm-up run (JIT), then the measured run.
using (var warm = LabelMovies.Open(movieShort)) MovieAnalyzer.Run(warm, new AnalysisOptions(), null, null, new PhaseTimes());
var times = new PhaseTimes();
AnalysisResult result;
var (gc0, gc1, gc2, pause0, alloc0) = (GC.CollectionCount(0), GC.CollectionCount(1), GC.CollectionCount(2), GC.GetTotalPauseDuration(), GC.GetTotalAllocatedBytes());
using (var m = LabelMovies.Open(movieShort)) result = MovieAnalyzer.Run(m, new AnalysisOptions(), null, null, times);
string measuredGc = $"garbage collections (the measured analysis alone): gen0 {GC.CollectionCount(0) - gc0}, gen1 {GC.CollectionCount(1) - gc1}, gen2 {GC.CollectionCount(2) - gc2}; pause {(GC.GetTotalPauseDuration() - pause0).TotalSeconds:F2} s; allocated {(GC.GetTotalAllocatedBytes() - alloc0) / 1e9:F1} GB";
foreach (var (phase, sec) in times.Phases) rows.Add((phase, sec, phase == "decode" ? "inside the analysis" : ""));
string tmpOut = Path.Combine(Path.GetTempPath(), $"shapenoise-bench-{Environment.ProcessId}");
var sw = Stopwatch.StartNew();
ResultWriter.Write(result, tmpOut, Provenance.Describe("analyze", [movieShort], new JsonObject()), () => new ShapeNoise.Imaging.Drawing.DefectOverlays().Draw(result, () => LabelMovies.Open(movieShort)));
rows.Add(("report", sw.Elapsed.TotalSeconds, "tables, JSON, figures, overlays"));
Directory.Delete(tmpOut, true);
double analysisTotal = times.Phases.Sum(p => p.Seconds);
if (phasesOnly)
{
    foreach (var (name, sec, _) in rows) Console.WriteLine($"{name,-28}{sec,10:F3}");
    Console.WriteLine($"{"analysis total",-28}{analysisTotal,10:F3}  ({analysisTotal / decode:F1} x decode)");
    Console.WriteLine(measuredGc);
    Console.WriteLine($"garbage collections (whole process): gen0 {GC.CollectionCount(0)}, gen1 {GC.CollectionCount(1)}, gen2 {GC.CollectionCount(2)}; pause {GC.GetTotalPauseDuration().TotalSeconds:F2} s; allocated {GC.GetTotalAllocatedBytes() / 1e9:F1} GB");
    return 0;
}
// Gap closing (docs/measures.md#one-frame-errors): the default --max-gap 2 against 0, same movie, in-process, best of 2.
double RunWithGap(int g) => Enumerable.Range(0, 2).Min(_ =>
{
    var t = Stopwatch.StartNew();
    using (var m = LabelMovies.Open(movieShort)) MovieAnalyzer.Run(m, new AnalysisOptions { MaxGapFrames = g });
    return t.Elapsed.TotalSeconds;
});
double gap0 = RunWithGap(0), gap2 = RunWithGap(2);
rows.Add(("analysis, --max-gap 0", gap0, "in-process, best of 2"));
rows.Add(("analysis, --max-gap 2", gap2, "the default"));
int outlines = result.Counts.Outlines;

// 3. Naive C#: per-label full-frame mask and per-label contour search, on the first frames.
int naiveFrames = quick ? 3 : 1;
var (naive, ours) = NaiveVsOurs(movieShort, naiveFrames);


double defectsPerFrame = times.Phases.First(p => p.Phase == "defects").Seconds / frames;
double outlinesPerFrame = times.Phases.First(p => p.Phase == "outlines").Seconds / frames;
Console.WriteLine($"ShapeNoise benchmark — {json["machine"]}, .NET {Environment.Version}");
Console.WriteLine($"movie: {side} x {side} px, {frames} frames, {outlines / frames} analysed outlines per frame ({cells} cells generated)");
Console.WriteLine();
Console.WriteLine($"{"phase",-28}{"seconds",10}  note");
foreach (var (name, sec, note) in rows) Console.WriteLine($"{name,-28}{sec,10:F3}  {note}");
Console.WriteLine();
var ratios = new JsonObject
{
    ["end_to_end_s"] = e2e,
    ["frames_per_s"] = frames / e2e,
    ["outlines_per_s"] = outlines / e2e,
    ["end_to_end_over_decode"] = e2e / decode,
    ["analysis_over_decode"] = analysisTotal / decode,
    ["analysis_over_calibration"] = gap2 / calibration,
    ["naive_over_ours_outlines_per_frame"] = naive / ours,
    ["defects_over_outlines_per_frame"] = defectsPerFrame / outlinesPerFrame,
    ["peak_memory_mb"] = peak / 1048576.0,
    ["max_gap_2_over_0"] = gap2 / gap0,
};
if (scale && !quick)
{
    // 4 x the cells and 2 x the frames: linear work predicts 8 x the 1024 x 1024, 100-frame time.
    ratios["scale_2048_200_s"] = e2eBig;
    ratios["scale_2048_200_over_8x"] = e2eBig / (8 * e2e);
    ratios["scale_2048_200_peak_mb"] = peakBig / 1048576.0;
}
if (!guard)
{
    ratios["end_to_end_2x_frames_s"] = e2eLong;
    ratios["time_2x_over_1x"] = e2eLong / e2e;
    ratios["peak_memory_2x_frames_mb"] = peakLong / 1048576.0;
}
foreach (var (k, v) in ratios) Console.WriteLine($"{k,-36}{v!.GetValue<double>(),12:G4}");
Console.WriteLine($"(naive C#: {naive:F3} s per frame vs {ours:F3} s per frame for the same outlines and shape measures, over {naiveFrames} frame(s))");
json["phases"] = new JsonObject(rows.Select(r => KeyValuePair.Create(r.Name, (JsonNode?)JsonValue.Create(r.Seconds))));
json["ratios"] = ratios;
string results = Path.Combine(root, "bench", "results");
Directory.CreateDirectory(results);
File.WriteAllText(Path.Combine(results, quick ? "latest-quick.json" : "latest.json"), json.ToJsonString(new JsonSerializerOptions { WriteIndented = true }));

if (guard)
{
    var baseline = JsonNode.Parse(File.ReadAllText(Path.Combine(root, "bench", "baseline.json")))!;
    double recorded = baseline["quick_analysis_over_calibration"]!.GetValue<double>();
    double now = gap2 / calibration;
    Console.WriteLine($"guard: analysis/calibration {now:F1} (recorded {recorded:F1}, limit {3 * recorded:F1})");
    if (now > 3 * recorded) { Console.WriteLine("guard: FAILED — gross slowdown"); return 1; }
    Console.WriteLine("guard: ok");
}
return 0;

static string FindRoot()
{
    var d = new DirectoryInfo(AppContext.BaseDirectory);
    while (d is not null && !File.Exists(Path.Combine(d.FullName, "ShapeNoise.sln"))) d = d.Parent;
    return d?.FullName ?? throw new InvalidOperationException("ShapeNoise.sln not found above the benchmark");
}

static string Ensure(string dir, int side, int cells, int n)
{
    string tif = Path.Combine(dir, "labels.tif");
    if (File.Exists(tif)) return tif;
    Console.WriteLine($"generating {tif} ({side} px, {cells} cells, {n} frames) ...");
    SynthJob.Monolayer(new MonolayerMovieOptions { Cells = cells, CellAreaPx2 = side * (double)side / cells, Frames = n, Width = side, Height = side }, dir);
    return tif;
}

static void FirstPages(string src, string dst, int n)
{
    using var t = new TiffPages(src);
    var p0 = t.Pages[0];
    TiffWriter.Write(dst, p0.Width, p0.Height, Enumerable.Range(0, n).Select(t.ReadLabels), TiffWriter.PixelType.UInt16, p0.Description?.Replace($"SizeT=\"{t.Pages.Count}\"", $"SizeT=\"{n}\"").Replace($"PlaneCount=\"{t.Pages.Count}\"", $"PlaneCount=\"{n}\""));
}

// A fixed single-threaded workload of the base library: sort a copy of 2^21 doubles drawn with seed 1 (about 0.2 s).
static double Calibrate()
{
    var rnd = new Random(1);
    var v = new double[1 << 21];
    for (int i = 0; i < v.Length; i++) v[i] = rnd.NextDouble();
    var sw = Stopwatch.StartNew();
    Array.Sort(v);
    return sw.Elapsed.TotalSeconds;
}

static double Decode(string movie)
{
    var sw = Stopwatch.StartNew();
    long sum = 0;
    using (var m = LabelMovies.Open(movie)) foreach (var f in m.Frames()) sum += f.Labels[f.Labels.Length / 2];
    GC.KeepAlive(sum);
    return sw.Elapsed.TotalSeconds;
}

static (double Naive, double Ours) NaiveVsOurs(string movie, int frames)
{
    double naive = 0, ours = 0;
    using var m = LabelMovies.Open(movie);
    var rho = new double[64];
    foreach (var f in m.Frames().Take(frames))
    {
        // Ours: one scan, boxes, parallel tracing inside each box, then shape and rays.
        var sw = Stopwatch.StartNew();
        var scan = LabelScan.Of(f);
        var outl = new Outline[scan.Boxes.Length];
        Parallel.For(0, outl.Length, i => outl[i] = OutlineTracer.Trace(scan.DenseImage, f.Width, f.Height, scan.Boxes[i], i + 1, OutlineMethod.Midpoint, 1, 30));
        foreach (var o in outl) if (o.Status == OutlineStatus.Ok) { var s = ShapeMeasures.Of(o.Vertices); RadialFunction.Sample(o.Vertices, new Point2(s.CentroidX, s.CentroidY), s.ThetaRad, rho); }
        ours += sw.Elapsed.TotalSeconds;
        // Naive: for every label, a full-frame mask, a full-frame component search and tracing, single-threaded.
        sw.Restart();
        var labels = new HashSet<int>(f.Labels); labels.Remove(0);
        var full = new int[f.Labels.Length];
        foreach (var l in labels)
        {
            for (int i = 0; i < full.Length; i++) full[i] = f.Labels[i] == l ? 1 : 0;
            var box = new LabelBox(l, 0, 0, f.Width - 1, f.Height - 1, 0);
            var o = OutlineTracer.Trace(full, f.Width, f.Height, box, 1, OutlineMethod.Midpoint, 0, 30);
            if (o.Status == OutlineStatus.Ok) { var s = ShapeMeasures.Of(o.Vertices); RadialFunction.Sample(o.Vertices, new Point2(s.CentroidX, s.CentroidY), s.ThetaRad, rho); }
        }
        naive += sw.Elapsed.TotalSeconds;
    }
    return (naive / frames, ours / frames);
}

// The command as built by `dotnet build -c Release` (the bench's own copy when that is missing).
static string BuiltCommand(string root)
{
    string dll = Path.Combine(root, "src", "ShapeNoise.Cli", "bin", "Release", "net10.0", "shapenoise.dll");
    return File.Exists(dll) ? dll : typeof(ShapeNoise.Cli.ExitCodes).Assembly.Location;
}

// Publishes the command with scripts/publish.sh (compiled ahead of time) into bench/out/command and returns its executable.
static string Published(string root)
{
    string outDir = Path.Combine(root, "bench", "out", "command");
    var psi = new ProcessStartInfo("bash") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false, WorkingDirectory = root };
    psi.ArgumentList.Add(Path.Combine(root, "scripts", "publish.sh")); psi.ArgumentList.Add(outDir);
    using var p = Process.Start(psi)!;
    var err = p.StandardError.ReadToEndAsync();
    p.StandardOutput.ReadToEnd();
    p.WaitForExit();
    if (p.ExitCode != 0) throw new InvalidOperationException($"scripts/publish.sh failed: {err.Result}");
    return Path.Combine(outDir, "shapenoise");
}

// The command is a dll run by dotnet (the built one) or a native executable (the published one).
static (double Seconds, long PeakBytes) EndToEnd(string movie, string command)
{
    string outDir = Path.Combine(Path.GetTempPath(), $"shapenoise-bench-e2e-{Environment.ProcessId}");
    Thread.Sleep(2000);   // the publish's or the previous run's writes settle first
    bool dll = command.EndsWith(".dll", StringComparison.Ordinal);
    var psi = new ProcessStartInfo(dll ? "dotnet" : command) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
    if (dll) psi.ArgumentList.Add(command);
    foreach (var a in new[] { "analyze", movie, "--out", outDir, "--quiet", "--overwrite" }) psi.ArgumentList.Add(a);
    var sw = Stopwatch.StartNew();
    using var p = Process.Start(psi)!;
    long peak = 0;
    var err = p.StandardError.ReadToEndAsync();
    while (!p.WaitForExit(20))
    {
        try
        {
            foreach (var line in File.ReadLines($"/proc/{p.Id}/status"))
                if (line.StartsWith("VmHWM:")) peak = Math.Max(peak, 1024 * long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1]));
        }
        catch (IOException) { }
    }
    double s = sw.Elapsed.TotalSeconds;
    if (p.ExitCode != 0) throw new InvalidOperationException($"analyze failed: {err.Result}");
    Directory.Delete(outDir, true);
    return (s, peak);
}

// Per-call cost of the pooled autocovariance and of one Ornstein-Uhlenbeck fit on 2300 tracks of 93-100 frames (the
// benchmark movie's shape), single-threaded, after a warm-up: what 20 000 refits a run multiply (bench/README.md).
static int Micro()
{
    var rnd = new Random(1);
    var frames = Enumerable.Range(0, 2300).Select(i => Enumerable.Range(i % 7, 100 - i % 7).ToArray()).ToArray();
    var tracks = frames.Select(f => ShapeNoise.TimeSeries.PooledAutocovariance.Of(new ShapeNoise.TimeSeries.TrackSeries(f, f.Select(_ => rnd.NextDouble()).ToArray()), 40)).ToList();
    var w = Enumerable.Range(0, 2300).Select(_ => rnd.Next(3)).ToArray();
    double Time(int n, Func<int, double> call)
    {
        for (int i = 0; i < n / 10; i++) call(i);
        var sw = Stopwatch.StartNew();
        double acc = 0;
        for (int i = 0; i < n; i++) acc += call(i);
        GC.KeepAlive(acc);
        return sw.Elapsed.TotalMilliseconds * 1000 / n;
    }
    Console.WriteLine($"pool, 2300 tracks x 41 lags: {Time(10000, i => ShapeNoise.TimeSeries.PooledAutocovariance.Pool(tracks, w, out _, 41)[1]),8:F1} us per call");
    var ones = Enumerable.Repeat(1, 2300).ToArray();
    Console.WriteLine($"OU fit, leave one out, 34 lags: {Time(2000, i => { ones[i] = 0; double t = ShapeNoise.TimeSeries.OrnsteinUhlenbeckFit.Fit(tracks, frames, ones, 33).TauFrames; ones[i] = 1; return t; }),8:F1} us per call");
    // The same fits with the tracks in 400 spatial blocks (the benchmark movie's plan): per-unit sums (bench/README.md).
    var plan = ShapeNoise.Statistics.ResamplingPlan.OverGroups("spatial blocks", Enumerable.Range(0, 2300).Select(i => i % 400).ToArray(), 400, 200, 1, 100);
    var units = ShapeNoise.Statistics.UnitSplit.Of(plan);
    Console.WriteLine($"pool of a block draw, by units: {Time(10000, i => ShapeNoise.TimeSeries.PooledAutocovariance.Pool(tracks, plan.Draws[i % 200], out _, 41, units.Split(plan.Draws[i % 200]))[1]),8:F1} us per call");
    Console.WriteLine($"pool of a block draw, by tracks: {Time(10000, i => ShapeNoise.TimeSeries.PooledAutocovariance.Pool(tracks, plan.Draws[i % 200], out _, 41)[1]),8:F1} us per call");
    Console.WriteLine($"OU fit, leave one out, by units: {Time(2000, i => { ones[i] = 0; double t = ShapeNoise.TimeSeries.OrnsteinUhlenbeckFit.Fit(tracks, frames, ones, 33, 0, units.Split(ones)).TauFrames; ones[i] = 1; return t; }),8:F1} us per call");
    Console.WriteLine($"OU fit, block draw, by units: {Time(2000, i => ShapeNoise.TimeSeries.OrnsteinUhlenbeckFit.Fit(tracks, frames, plan.Draws[i % 200], 33, 0, units.Split(plan.Draws[i % 200])).TauFrames),8:F1} us per call");
    Console.WriteLine($"OU fit, block draw, by tracks: {Time(2000, i => ShapeNoise.TimeSeries.OrnsteinUhlenbeckFit.Fit(tracks, frames, plan.Draws[i % 200], 33).TauFrames),8:F1} us per call");
    // One orientation-correlation fit of a block draw (the correlation-time bootstrap's per-resample work): pooling, the
    // pooled curve's covariance over the tracks, the generalized chi^2 fits (30 lags).
    Console.WriteLine($"orientation fit, block draw, 30 lags: {Time(1000, i => ShapeNoise.Dynamics.OrientationCorrelation.FitTracks(tracks, plan.Draws[i % 200], 30, 1000, units.Split(plan.Draws[i % 200])).TauFrames),8:F1} us per call");
    // One spatial correlation of the motion stage (an 87 x 87-node vector field, 43 bins: the benchmark movie's grid).
    var fa = Enumerable.Range(0, 87 * 87).Select(_ => rnd.NextDouble() - 0.5).ToArray();
    var fb = Enumerable.Range(0, 87 * 87).Select(_ => rnd.NextDouble() - 0.5).ToArray();
    var fk = Enumerable.Repeat(1.0, 87 * 87).ToArray();
    Console.WriteLine($"field correlation, 87 x 87 nodes, 43 bins: {Time(100, i => ShapeNoise.Motion.FieldCorrelation.Of(87, 87, 12, fa, fb, fk, 43).Sum[1]),8:F1} us per call");
    // Tracing every outline of one frame of the benchmark movie (about 2400 labels), one thread, when the movie is there.
    string benchMovie = Path.Combine(FindRoot(), "bench", "data", "monolayer-1024-100.tif");
    if (File.Exists(benchMovie))
    {
        using var lm = LabelMovies.Open(benchMovie);
        var scan = LabelScan.Of(lm.Frames().First());
        Console.WriteLine($"trace one frame's {scan.Boxes.Length} outlines: {Time(20, i => { double v = 0; for (int b = 0; b < scan.Boxes.Length; b++) v += OutlineTracer.Trace(scan.DenseImage, scan.Width, scan.Height, scan.Boxes[b], b + 1, OutlineMethod.Midpoint, 1, 30).ComponentPixels; return v; }),8:F1} us per call");
    }
    // One track's contour fluctuations (100 frames, 64 rays, lags to 30): the per-track work of the fluctuation stage.
    var rhoTrack = Enumerable.Range(0, 100 * 64).Select(j => 20 + 5 * Math.Cos(2 * Math.PI * (j % 64) / 64) + rnd.NextDouble()).ToArray();
    Console.WriteLine($"contour of one track, 100 frames x 64 rays: {Time(2000, i => ShapeNoise.Fluctuations.ContourFluctuations.Of(rhoTrack, 100, 64).VarAlongRaw),8:F1} us per call");
    return 0;
}
