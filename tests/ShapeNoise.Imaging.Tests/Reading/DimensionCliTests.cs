using System.Text.Json.Nodes;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

/// <summary>The plane and scale options through the real command, on corpus files written by tifffile
/// (Corpus/dimensions/README.md gives each file's layout as the writer documents it).</summary>
public class DimensionCliTests
{
    private static string Corpus(string name) => Path.Combine(DimensionTests.CorpusDir(), name);

    [Fact]
    public void Cli_AnalyzeTwoChannelHyperstackWithoutChannel_Exits2NamingChannel()
    {
        using var d = new TempDir();
        var r = Support.Cli.Run("analyze", Corpus("ij_tzcyx_c2.tif"), "--out", d["out"], "--quiet");
        Assert.Equal(2, r.ExitCode);
        Assert.Contains("give --channel 0 or --channel 1", r.Stderr + r.Stdout);
        Assert.False(Directory.Exists(d["out"]));
    }

    [Fact]
    public void Cli_AnalyzeTwoChannelHyperstackChannel1_AnalysesThatPlane()
    {
        // make_corpus.py: channel 1 holds two rectangles per frame (10x6 and 8x8 px), channel 0 one (8x6): 3 frames x 2 = 6 objects.
        using var d = new TempDir();
        var r = Support.Cli.Run("analyze", Corpus("ij_tzcyx_c2.tif"), "--channel", "1", "--out", d["out"], "--quiet",
            "--min-track", "3", "--bootstrap", "10", "--pixel-size", "0.4");
        Assert.True(r.ExitCode == 0, r.Stderr);
        Assert.Equal("", r.Stdout);   // --quiet prints only errors
        var summary = JsonNode.Parse(File.ReadAllText(Path.Combine(d["out"], "summary.json")))!;
        Assert.Equal(6, (int)summary["objects"]!);
        Assert.Equal(3, (int)summary["frames"]!);
        Assert.Equal("option", (string)summary["pixel_size_source"]!);
        var movie = JsonNode.Parse(File.ReadAllText(Path.Combine(d["out"], "run.json")))!["movie"]!;
        Assert.Contains("channel 1 of 2", (string)movie["plane"]!);
        Assert.Equal(0.4, (double)movie["pixel_size_um"]!);
        Assert.Equal("option", (string)movie["pixel_size_source"]!);
    }

    [Fact]
    public void Cli_AnalyzeNonSquareOmeTiff_ResamplesAndRecordsIt()
    {
        // ome_nonsquare.tif: PhysicalSizeX 0.5 um, PhysicalSizeY 0.65 um (OME-XML) -> 31 rows of 0.5 um.
        using var d = new TempDir();
        var r = Support.Cli.Run("analyze", Corpus("ome_nonsquare.tif"), "--out", d["out"], "--min-track", "3", "--bootstrap", "10");
        Assert.True(r.ExitCode == 0, r.Stderr);
        Assert.Contains("non-square pixels", r.Stdout);
        Assert.Contains("(OME-XML)", r.Stdout);
        var movie = JsonNode.Parse(File.ReadAllText(Path.Combine(d["out"], "run.json")))!["movie"]!;
        Assert.Equal(31, (int)movie["height_px"]!);
        Assert.Equal(0.5, (double)movie["pixel_size_um"]!, 9);
        Assert.Equal("OME-XML", (string)movie["pixel_size_source"]!);
        Assert.Contains("24 -> 31", (string)movie["resampling"]!);
    }

    [Fact]
    public void Cli_AnalyzeChannelOutOfRange_Exits2NamingRange()
    {
        using var d = new TempDir();
        var r = Support.Cli.Run("analyze", Corpus("ome_two_series.tif"), "--series", "2", "--out", d["out"], "--quiet");
        Assert.Equal(2, r.ExitCode);
        Assert.Contains("--series 2 is out of range", r.Stderr + r.Stdout);
        Assert.Contains("valid: 0 to 1", r.Stderr + r.Stdout);
    }

    [Fact]
    public void Cli_AnalyzeNegativeChannel_Exits64()
    {
        using var d = new TempDir();
        var r = Support.Cli.Run("analyze", Corpus("ij_tzcyx_c2.tif"), "--channel", "-1", "--out", d["out"], "--quiet");
        Assert.Equal(64, r.ExitCode);
    }

    [Fact]
    public void Cli_SegmentTwoChannelHyperstackWithoutChannel_Exits2NamingChannel()
    {
        using var d = new TempDir();
        var r = Support.Cli.Run("segment", Corpus("ij_tzcyx_c2.tif"), "--out", d["out"]);
        Assert.Equal(2, r.ExitCode);
        Assert.Contains("--channel", r.Stderr + r.Stdout);
    }
}
