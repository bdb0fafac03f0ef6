using ShapeNoise.Cli;

namespace ShapeNoise.Tests.Cli;

/// <summary>Property names in option messages become the flags of the command line (the flags as declared in
/// AnalyzeCommand.Settings and listed in README's option table).</summary>
public class OptionNamesTests
{
    [Theory]
    [InlineData("MaxGapFrames must be >= 0 frames (got -1)", "--max-gap must be >= 0 frames (got -1)")]
    [InlineData("LinkOverlapFraction must be in (0, 1] (got 2)", "--link-overlap must be in (0, 1] (got 2)")]
    [InlineData("--velocity flow needs --raw (optical flow runs on the raw movie)", "--velocity flow needs --raw (optical flow runs on the raw movie)")]
    [InlineData("Outline tables need a label column", "Outline tables need a label column")]
    public void ToFlags_Message_NamesTheFlag(string message, string expected) => Assert.Equal(expected, OptionNames.ToFlags(message));

    [Fact]
    public void Analyze_NegativeMaxGap_Exit64NamingTheFlag()
    {
        using var d = new Support.TempDir();
        var r = Support.Cli.Run("analyze", d["none.tif"], "--out", d["o"], "--max-gap", "-1");
        Assert.Equal(64, r.ExitCode);
        Assert.Contains("--max-gap must be >= 0", r.Stderr);
    }

    /// <summary>Every command's --help renders (option descriptions are console markup: a bracket left unescaped made
    /// `synth monolayer --help` fail with exit 1).</summary>
    [Theory]
    [InlineData("analyze")]
    [InlineData("segment")]
    [InlineData("score")]
    [InlineData("compare")]
    [InlineData("plan")]
    [InlineData("synth", "monolayer")]
    [InlineData("synth", "ellipses")]
    public void Help_EveryCommand_ListsItsOptions(params string[] command)
    {
        var r = Support.Cli.Run([.. command, "--help"]);
        Assert.Equal(0, r.ExitCode);
        Assert.Contains("OPTIONS:", r.Stdout);
        Assert.DoesNotContain("unexpected", r.Stderr);
    }
}
