using System.Globalization;
using System.Net;
using System.Text;
using System.Text.Json.Nodes;
using ShapeNoise.Pipeline;
using ShapeNoise.Statistics;
using Figure = ShapeNoise.Pipeline.Figure;

namespace ShapeNoise.Reporting;

/// <summary>
/// report.html: one self-contained page (figures embedded as PNG data, no external resource) with the run's headline
/// numbers in plain language, every figure with a caption saying how to read it, the noise floor, warnings, options and
/// provenance. Well-formed (XHTML-compatible) HTML5.
/// </summary>
public static class HtmlReport
{
    static readonly CultureInfo Ci = CultureInfo.InvariantCulture;

    /// <summary>The rounding every headline number uses, in the report and wherever it is checked: 3 significant digits
/// (whole numbers from 1000 up).</summary>
    public static string Round(double v) => !double.IsFinite(v) ? "n/a" : Math.Abs(v) >= 1000 ? v.ToString("F0", Ci) : v.ToString("G3", Ci);

    static string E(string s) => WebUtility.HtmlEncode(s);

    /// <summary>Plain-language headline sentences, each generated from its estimate's status and interval (<see cref="EstimateText"/>).</summary>
    public static List<string> Headlines(AnalysisResult r)
    {
        var u = UnitScale.Of(r.Units); var p = r.Pooled; var d = r.Dynamics; var df = r.Defects;
        // docs/measures.md#temporal-noise-model: what was removed depends on the noise model.
        string removed = p.NoiseModel == ShapeNoise.Fluctuations.NoiseModel.Temporal ? "After removing the white measurement noise" : "After removing the noise floor";
        var h = new List<string>
        {
            EstimateText.Ratio(p.Anisotropy, "Length fluctuates more than width", "Length fluctuates less than width", "Length vs width fluctuation") + ".",
            EstimateText.Ratio(p.AnisotropyContour, $"{removed}, the outline fluctuates more at the poles than at the flanks",
                $"{removed}, the outline fluctuates less at the poles than at the flanks", "Pole vs flank fluctuation of the outline") + ".",
            $"Elongation stays correlated for τ_q: {Timed(u.Time(d.TauQFrames), u)}; orientation for τ_θ: {Timed(u.Time(d.TauThetaFrames), u)}.",
        };
        var hs = u.Speed(df.HeadwardSpeed);
        // With 2-4 defect tracks the interval is over time blocks of these few defects (docs/defects.md#headward-speed): say so.
        bool few = hs.UnitName == "time blocks";
        string subject = hs.Status == EstimateStatus.NotApplicable ? "+1/2 defects (not analysed)"
            : few ? $"The {df.PlusTracksUsed} +1/2 defects followed ({Round(df.PlusPerFrame)} per frame)"
            : $"+1/2 defects ({Round(df.PlusPerFrame)} per frame, {df.PlusTracksUsed} followed)";
        h.Add(EstimateText.Direction(hs, u.SpeedLabel, "move toward their head (extensile-like)", "move toward their tail (contractile-like)", subject)
              + (few && hs.IsOk ? $"; blocks in time along {df.PlusTracksUsed} defect tracks, so this describes these defects, not the tissue's" : "") + ".");
        h.Add(EstimateText.Hypothesis(r.Hypothesis, df.NotApplicableReason));
        // Stage drift (docs/defects.md#drift): what was measured and whether the defect kinematics are relative to the tissue.
        if (double.IsFinite(df.DriftSpeedPx))
            h.Add($"The tissue drifts at {Round(u.Speed(df.DriftSpeedPx))} {u.SpeedLabel} on average (median cell velocity); "
                  + (df.DriftRemoved ? "defect speeds and cell flows are relative to the tissue." : "the drift is kept in defect speeds and cell flows (--keep-drift)."));
        if (df.NotApplicableReason is null) h.Add(DefectStatisticsReport.Sentence(r));
        h.Add(MotionReport.Sentence(r));
        return h;
    }

    static string Timed(Estimate e, UnitScale u) => e.IsOk ? $"{Round(e.Value)} {u.TimeName} ({EstimateText.Interval(e)})" : EstimateText.Phrase(e, u.TimeName);

    /// <summary>A self-contained page from a short Markdown summary (headings, bullets, paragraphs, **bold**) and PNG figures with captions.</summary>
    public static string FromMarkdown(string title, string markdown, IEnumerable<Figure> figures)
    {
        var sb = new StringBuilder("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\" /><title>");
        sb.Append(E(title)).Append("</title>\n<style>body{font-family:sans-serif;max-width:1000px;margin:2em auto;color:#222;line-height:1.45}")
          .Append("figure{margin:1.5em 0}figure img{max-width:100%;border:1px solid #ddd}figcaption{color:#555;font-size:0.92em}</style></head>\n<body>\n");
        bool inList = false;
        string Inline(string t)
        {
            var parts = E(t).Split("**");
            var o = new StringBuilder();
            for (int i = 0; i < parts.Length; i++) o.Append(i % 2 == 1 ? $"<strong>{parts[i]}</strong>" : parts[i]);
            return o.ToString();
        }
        foreach (var raw in markdown.Split('\n'))
        {
            string line = raw.TrimEnd();
            if (!line.StartsWith("- ") && inList) { sb.Append("</ul>\n"); inList = false; }
            if (line.StartsWith("## ")) sb.Append("<h2>").Append(Inline(line[3..])).Append("</h2>\n");
            else if (line.StartsWith("# ")) sb.Append("<h1>").Append(Inline(line[2..])).Append("</h1>\n");
            else if (line.StartsWith("- ")) { if (!inList) { sb.Append("<ul>\n"); inList = true; } sb.Append("<li>").Append(Inline(line[2..])).Append("</li>\n"); }
            else if (line.Length > 0) sb.Append("<p>").Append(Inline(line)).Append("</p>\n");
        }
        if (inList) sb.Append("</ul>\n");
        foreach (var f in figures) AppendFigure(sb, f);
        sb.Append("<p><em>").Append(E("A research tool: no clinical or diagnostic claim; results are only as good as the segmentation they start from.")).Append("</em></p>\n")
          .Append(LoadCheck).Append("</body></html>\n");
        return sb.ToString();
    }

    /// <summary>One figure: the embedded image (its own bytes, base64) and its caption.</summary>
    static void AppendFigure(StringBuilder sb, Figure f)
        => sb.Append("<figure>").Append(Img(f)).Append("<figcaption>").Append(E(f.Caption)).Append("</figcaption></figure>\n");

    static string Img(Figure f) => $"<img alt=\"{E(f.FileName)}\" src=\"data:image/png;base64,{Convert.ToBase64String(f.Png)}\" />";

    /// <summary>Frame figures as strips: consecutive figures with the same caption share one figure element.</summary>
    static void AppendStrips(StringBuilder sb, IReadOnlyList<Figure> frames)
    {
        for (int i = 0; i < frames.Count;)
        {
            sb.Append("<figure class=\"strip\">");
            int j = i;
            for (; j < frames.Count && frames[j].Caption == frames[i].Caption; j++) sb.Append(Img(frames[j]));
            sb.Append("<figcaption>").Append(E(frames[i].Caption)).Append("</figcaption></figure>\n");
            i = j;
        }
    }

    /// <summary>report.html of an analysis: headline, warnings, noise floor, <paramref name="figures"/> (each embedded
    /// once from its bytes), <paramref name="frameFigures"/> as strips, options and provenance.</summary>
    public static string Build(AnalysisResult r, IReadOnlyList<Figure> figures, IReadOnlyList<Figure> frameFigures, JsonObject provenance)
    {
        var u = UnitScale.Of(r.Units); var p = r.Pooled;
        var sb = new StringBuilder();
        sb.Append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\" /><title>ShapeNoise report — ")
          .Append(E(Path.GetFileName(r.Movie.Path.TrimEnd('/')))).Append("</title>\n<style>")
          .Append("body{font-family:sans-serif;max-width:1000px;margin:2em auto;color:#222;line-height:1.45}")
          .Append("figure{margin:1.5em 0}figure img{max-width:100%;border:1px solid #ddd}figcaption{color:#555;font-size:0.92em}")
          .Append("table{border-collapse:collapse;font-size:0.9em}td,th{border:1px solid #ccc;padding:2px 8px;text-align:left}")
          .Append(".warn{background:#fff4e0;border-left:4px solid #e0a000;padding:0.5em 1em}.strip img{width:32%;margin-right:1%}")
          .Append("</style></head>\n<body>\n");
        sb.Append("<h1>Cell-shape fluctuations of ").Append(E(Path.GetFileName(r.Movie.Path.TrimEnd('/')))).Append("</h1>\n");
        sb.Append("<p>").Append(r.Counts.Frames).Append(" frames, ").Append(r.Counts.Outlines).Append(" outlines, ")
          .Append(r.Counts.TracksUsed).Append(" of ").Append(r.Counts.Tracks).Append(" tracks in the statistics (")
          .Append(r.Counts.Fragments).Append(" fragments; ").Append(r.Counts.Divisions).Append(" divisions and ").Append(r.Counts.Merges)
          .Append(" merges of analysed cells; one-frame errors bridged: ").Append(r.Counts.Outliers).Append(" outlier outlines, ")
          .Append(r.Counts.BridgedMerges).Append(" merges, ").Append(r.Counts.BridgedSplits).Append(" splits, --max-gap ")
          .Append(r.Options.MaxGapFrames).Append("); units: ")
          .Append(E(u.LengthName)).Append(", ").Append(E(u.TimeName)).Append(". Intervals are 95% bootstrap intervals (seed ")
          .Append(r.Options.Seed).Append("); the shape statistics resample ").Append(E(r.ResamplingUnit))
          .Append(", the collective-motion measures blocks of frames, and every estimate names its unit and count.</p>\n<h2>Headline</h2>\n<ul>\n");
        foreach (var h in Headlines(r)) sb.Append("<li>").Append(E(h)).Append("</li>\n");
        sb.Append("</ul>\n");
        if (r.Warnings.Count > 0)
        {
            sb.Append("<div class=\"warn\"><strong>Warnings</strong><ul>\n");
            foreach (var w in r.Warnings) sb.Append("<li>").Append(E(w)).Append("</li>\n");
            sb.Append("</ul></div>\n");
        }
        // Collective motion (docs/motion.md): every estimate with its n and status.
        sb.Append("<h2>Collective motion and defect statistics</h2>\n<p>").Append(E($"Intervals over {r.Motion.BlockFrames}-frame time blocks (moving-block bootstrap); speeds and the velocity autocorrelation from the cells' velocities, correlations and enstrophy from the coarse-grained field on a {Round(u.Length(r.Motion.CorrelationSpacingPx))} {u.LengthName} grid."
            + (r.Motion.FieldNotApplicableReason is { } why ? $" Field measures not applicable: {why}." : ""))).Append("</p>\n").Append(MotionReport.HtmlTable(r));
        double fa = p.VarAlongRaw > 0 ? p.FloorAlong / p.VarAlongRaw : double.NaN, fc = p.VarAcrossRaw > 0 ? p.FloorAcross / p.VarAcrossRaw : double.NaN;
        sb.Append("<h2>Noise floor</h2>\n<p>").Append(E(p.NoiseModel == ShapeNoise.Fluctuations.NoiseModel.Temporal ? TemporalSentence(r)
            : r.FloorReference is null
            ? $"Estimated from the high Fourier modes of each track (white-noise model): it is {Round(100 * fa)}% of the raw contour variance in the pole sector and {Round(100 * fc)}% in the flank sector. Length and width fluctuations integrate over the whole outline and carry little pixelation noise."
            : $"Taken from a fixed-cell movie (--floor-from): {Round(100 * fa)}% of the raw contour variance in the pole sector, {Round(100 * fc)}% in the flank sector; its length and width fluctuations were subtracted too."))
          .Append("</p>\n");
        sb.Append("<h2>Figures</h2>\n");
        foreach (var f in figures) AppendFigure(sb, f);
        AppendStrips(sb, frameFigures);
        sb.Append("<h2>Options</h2>\n<table>\n");
        if (provenance["options"] is JsonObject opts)
            foreach (var (k, v) in opts) sb.Append("<tr><th>").Append(E(k)).Append("</th><td>").Append(E(v?.ToJsonString() ?? "null")).Append("</td></tr>\n");
        sb.Append("</table>\n<h2>Provenance</h2>\n<p>").Append(E($"ShapeNoise {provenance["version"]}, {provenance["runtime"]}, {provenance["os"]}, finished {provenance["finished_utc"]}.")).Append("</p>\n<table>\n<tr><th>input</th><th>bytes</th><th>SHA-256</th></tr>\n");
        if (provenance["inputs"] is JsonArray inputs)
            foreach (var i in inputs) sb.Append("<tr><td>").Append(E(i?["name"]?.ToString() ?? "")).Append("</td><td>").Append(E(i?["bytes"]?.ToString() ?? "")).Append("</td><td>").Append(E(i?["sha256"]?.ToString() ?? "")).Append("</td></tr>\n");
        sb.Append("</table>\n<p><em>").Append(E("A research tool: no clinical or diagnostic claim; results are only as good as the segmentation they start from.")).Append("</em></p>\n")
          .Append(LoadCheck).Append("</body></html>\n");
        return sb.ToString();
    }

    /// <summary>The noise paragraph under the temporal model (docs/measures.md#temporal-noise-model): the share of the raw
    /// variance of L, W and the two contour sectors that the fit assigns to white measurement noise.</summary>
    public static string TemporalSentence(AnalysisResult r)
    {
        var p = r.Pooled;
        string Share(double raw, Estimate e2) => raw > 0 && double.IsFinite(e2.Value) ? $"{Round(100 * e2.Value / raw)}%" : "n/a";
        return "Temporal noise model (default): each coordinate is an Ornstein-Uhlenbeck signal plus white measurement noise, fitted to the pooled "
            + "autocovariance of the mean-subtracted tracks; the headline variances are the signal variances. White noise is "
            + $"{Share(p.VarLRaw, p.NoiseVarL)} of the raw variance of L, {Share(p.VarWRaw, p.NoiseVarW)} of W, {Share(p.VarAlongRaw, p.NoiseVarAlong)} in the pole sector "
            + $"and {Share(p.VarAcrossRaw, p.NoiseVarAcross)} in the flank sector (the high-mode floor would be {Round(100 * (p.VarAlongRaw > 0 ? p.FloorAlong / p.VarAlongRaw : double.NaN))}% "
            + $"and {Round(100 * (p.VarAcrossRaw > 0 ? p.FloorAcross / p.VarAcrossRaw : double.NaN))}%; --noise-model modes uses it).";
    }

    /// <summary>Inline, self-contained: once the page has loaded, records every image's decoded size on the body
    /// (data-image-sizes), so a headless browser can confirm that every embedded figure decoded.</summary>
    public const string LoadCheck = "<script>window.addEventListener('load',function(){document.body.setAttribute('data-image-sizes',Array.prototype.map.call(document.images,function(i){return i.naturalWidth+'x'+i.naturalHeight;}).join(','));});</script>\n";
}
