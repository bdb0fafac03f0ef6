using ShapeNoise.Nematic;

namespace ShapeNoise.Tests.Nematic;

/// <summary>Length options as docs/inputs.md and docs/measures.md#nematic-field-and-defects define them: "2R0" = 2 x R0,
/// a plain number = a length in the run's unit (um with a known pixel size, so px = um / (um/px)).</summary>
public class LengthSpecTests
{
    [Theory]
    [InlineData("2R0", 2.0, 14.0)]      // 2 x R0 = 2 x 7 px
    [InlineData(" 0.5r0 ", 0.5, 3.5)]   // suffix case-insensitive, whitespace trimmed
    [InlineData("12.5", 12.5, 25.0)]    // 12.5 um / 0.5 um/px
    [InlineData("1e1", 10.0, 20.0)]     // invariant-culture float syntax
    public void Parse_ValidText_ValueAndPxAsDefined(string text, double value, double px)
    {
        var s = LengthSpec.Parse(text, "--coarse");
        Assert.Equal(value, s.Value);
        Assert.Equal(px, s.ToPx(r0Px: 7, pixelSizeUm: 0.5), 12);
    }

    [Fact]
    public void Parse_MultipleOfR0_IgnoresPixelSize()
    {
        var s = LengthSpec.Parse("3R0", "--grid");
        Assert.True(s.TimesR0);
        Assert.Equal(s.ToPx(4, 1), s.ToPx(4, 0.25));
    }

    [Theory]
    [InlineData("")]
    [InlineData("R0")]
    [InlineData("0R0")]
    [InlineData("-2R0")]
    [InlineData("0")]
    [InlineData("-1.5")]
    [InlineData("abc")]
    [InlineData("2,5")]
    [InlineData("NaN")]
    [InlineData("Infinity")]
    public void Parse_BadText_ThrowsNamingOptionAndText(string text)
    {
        var e = Assert.Throws<ArgumentException>(() => LengthSpec.Parse(text, "--grid"));
        Assert.Contains("--grid", e.Message);
        Assert.Contains($"'{text}'", e.Message);
    }

    [Theory]
    [InlineData("2R0")]
    [InlineData("0.5R0")]
    [InlineData("12.5")]
    public void ToString_ParsedText_ParsesBackToSameValue(string text)
    {
        var s = LengthSpec.Parse(text, "--coarse");
        Assert.Equal(s, LengthSpec.Parse(s.ToString(), "--coarse"));
    }
}

/// <summary>DefectOptions validates itself; messages name the parameter (nameof).</summary>
public class DefectOptionsTests
{
    [Fact]
    public void Constructor_NegativeResamples_ThrowsNamingParameter()
    {
        var e = Assert.Throws<ArgumentException>(() => new DefectOptions(new LengthSpec(2, true), new LengthSpec(0.5, true), bootstrapResamples: -1));
        Assert.Contains("bootstrapResamples", e.Message);
    }

    [Fact]
    public void Constructor_ZeroLength_ThrowsNamingParameter()
    {
        var e = Assert.Throws<ArgumentException>(() => new DefectOptions(new LengthSpec(2, true), default));
        Assert.Contains("gridSpacing", e.Message);
    }

    [Fact]
    public void Constructor_BadEnsembleGrid_ThrowsNamingParameter()
    {
        var e = Assert.Throws<ArgumentException>(() => new DefectOptions(new LengthSpec(2, true), new LengthSpec(0.5, true), ensemble: new EnsembleFlowGrid(0)));
        Assert.Contains(nameof(EnsembleFlowGrid.HalfSteps), e.Message);
    }

    /// <summary>The spec's defaults (docs/measures.md#nematic-field-and-defects: coarse 2 R0, grid R0/2, ensemble +-3 coarse widths).</summary>
    [Fact]
    public void AnalysisOptions_Defaults_BuildSpecDefaults()
    {
        var o = new ShapeNoise.Pipeline.AnalysisOptions().ToDefectOptions();
        Assert.Equal(new LengthSpec(2, true), o.CoarseWidth);
        Assert.Equal(new LengthSpec(0.5, true), o.GridSpacing);
        Assert.Equal(3.0, o.Ensemble.HalfSteps * o.Ensemble.StepCoarseWidths);
    }

    [Fact]
    public void AnalysisOptionsValidated_BadCoarse_ThrowsNamingOption()
    {
        var e = Assert.Throws<ArgumentException>(() => new ShapeNoise.Pipeline.AnalysisOptions { CoarseWidth = "two" }.Validated());
        Assert.Contains("--coarse", e.Message);
    }
}
