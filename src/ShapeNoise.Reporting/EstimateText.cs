using ShapeNoise.Statistics;

namespace ShapeNoise.Reporting;

/// <summary>
/// Words for an estimate, generated from its status and interval (docs/statistics.md#sentences): a number with its
/// interval and units only when the status is ok; otherwise "not enough data (n = 1 defect tracks)", "longer than this
/// movie can resolve (&gt; 6000 min)", or "not applicable: cells cover 14 % of the field". A direction or a difference
/// is worded only when the interval excludes the null value.
/// </summary>
public static class EstimateText
{
    /// <summary>"n = 57 tracks" (the unit name when known).</summary>
    public static string Units(Estimate e) => $"n = {e.N}{(e.UnitName is { } u ? " " + u : "")}";

    /// <summary>The number, or the status phrase when there is no number: what a table's value cell shows.</summary>
    public static string Value(Estimate e, string unit = "") => e.IsOk ? HtmlReport.Round(e.Value) + Suffix(unit) : Phrase(e, unit);

    /// <summary>"95% CI lo–hi, n = …" when ok, else the status phrase.</summary>
    public static string Interval(Estimate e) => e.IsOk ? $"95% CI {HtmlReport.Round(e.Low)}–{HtmlReport.Round(e.High)}, {Units(e)}" : Phrase(e, "");

    /// <summary>The phrase that replaces a number that may not be stated.</summary>
    public static string Phrase(Estimate e, string unit) => e.Status switch
    {
        EstimateStatus.Ok => $"{HtmlReport.Round(e.Value)}{Suffix(unit)}",
        EstimateStatus.AtBound when e.Bound == BoundSide.Upper => $"longer than this movie can resolve (> {HtmlReport.Round(e.BoundValue)}{Suffix(unit)}; {Units(e)})",
        EstimateStatus.AtBound => $"shorter than the sampling can resolve (< {HtmlReport.Round(e.BoundValue)}{Suffix(unit)}; {Units(e)})",
        EstimateStatus.NotApplicable => $"not applicable: {e.Reason ?? "these data do not allow it"}",
        _ => $"not enough data ({Units(e)}{(e.Reason is { } r && !r.StartsWith("n = ", StringComparison.Ordinal) ? "; " + r : "")})",
    };

    /// <summary>A ratio against 1, in words: "3.1× more … than …" or "0.8× (less) …" when the interval excludes 1;
    /// "no difference shown (which is not evidence of none)" when it includes 1; the status phrase otherwise.</summary>
    /// <param name="e">The ratio.</param><param name="more">Words for a ratio above 1 ("fluctuates more in length than in width").</param>
    /// <param name="less">Words for a ratio below 1.</param><param name="alike">Words when no difference is shown ("length and width fluctuations").</param>
    public static string Ratio(Estimate e, string more, string less, string alike)
    {
        if (!e.IsOk) return $"{alike}: {Phrase(e, "")}";
        if (e.Low > 1) return $"{more} ({HtmlReport.Round(e.Value)}×, {Interval(e)})";
        if (e.High < 1) return $"{less} ({HtmlReport.Round(e.Value)}×, {Interval(e)})";
        return $"{alike}: no difference shown, which is not evidence of none ({HtmlReport.Round(e.Value)}×, {Interval(e)})";
    }

    /// <summary>A signed quantity against 0: <paramref name="positive"/> or <paramref name="negative"/> only when the
    /// interval excludes 0; "no net direction shown" when it includes 0; the status phrase otherwise.</summary>
    public static string Direction(Estimate e, string unit, string positive, string negative, string subject)
    {
        if (!e.IsOk) return $"{subject}: {Phrase(e, unit)}";
        string num = $"{HtmlReport.Round(e.Value)}{Suffix(unit)}, {Interval(e)}";
        if (e.Low > 0) return $"{subject} {positive} ({num})";
        if (e.High < 0) return $"{subject} {negative} ({num})";
        return $"{subject}: no net direction shown, which is not evidence of none ({num})";
    }

    /// <summary>The shape-noise test in words (docs/measures.md#shape-noise-hypothesis): an association is stated only when
    /// the permutation p and the random-position p are both below 0.05 and the interval of rho excludes 0; otherwise "no
    /// association shown"; the status phrase when the test did not run.</summary>
    public static string Hypothesis(Nematic.HypothesisResult h, string? notApplicableReason)
    {
        const string subject = "Shape-noise test (local anisotropy vs headward speed of +1/2 defects)";
        if (h.Status == EstimateStatus.NotApplicable || notApplicableReason is not null)
            return $"{subject}: not applicable: {notApplicableReason ?? "no defects analysed"}.";
        if (h.Status != EstimateStatus.Ok)
            return $"{subject}: not enough data (n = {h.DefectTracks} defect tracks followed for at least {Nematic.ShapeNoiseHypothesis.MinSpeedSamples} frames; at least {Nematic.ShapeNoiseHypothesis.MinDefectTracks} needed).";
        string ci = h.Rho95.IsOk ? $"95% CI {HtmlReport.Round(h.Rho95.Low)}–{HtmlReport.Round(h.Rho95.High)}, " : "";
        string nums = $"Spearman ρ = {HtmlReport.Round(h.SpearmanRho)}, {ci}permutation p = {HtmlReport.Round(h.PValue)}, random-position p = {HtmlReport.Round(h.RandomPositionP)}, n = {h.DefectTracks} defect tracks";
        bool shown = h.PValue < 0.05 && h.RandomPositionP < 0.05 && h.Rho95.IsOk && (h.Rho95.Low > 0 || h.Rho95.High < 0);
        if (!shown) return $"{subject}: no association shown, which is not evidence of none ({nums}).";
        return h.SpearmanRho > 0
            ? $"Where the local shape noise is more anisotropic, +1/2 defects move more toward their head, as the shape-noise hypothesis predicts ({nums})."
            : $"Where the local shape noise is more anisotropic, +1/2 defects move less toward their head, against the shape-noise hypothesis ({nums}).";
    }

    static string Suffix(string unit) => unit.Length == 0 ? "" : " " + unit;
}
