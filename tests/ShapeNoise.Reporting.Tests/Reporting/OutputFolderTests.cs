using System.Text.Json.Nodes;
using ShapeNoise.Reading;
using ShapeNoise.Reporting;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reporting;

/// <summary>The output-folder rules of docs/inputs.md#output-folders, in-process: a user's files are never deleted or
/// overwritten, only an earlier ShapeNoise output is replaced (with --overwrite), and nothing hidden is left behind.</summary>
public class OutputFolderTests
{
    private static void WriteRun(string dir, string content = "x")
    {
        File.WriteAllText(Path.Combine(dir, "summary.json"), content);
        File.WriteAllText(Path.Combine(dir, "run.json"), new JsonObject { ["tool"] = "shapenoise" }.ToJsonString());
    }

    private static void AssertNoHidden(string parent) => Assert.Empty(Directory.GetDirectories(parent, ".*"));

    [Fact]
    public void Write_IntoTheInputsOwnFolder_RefusedAndInputKept()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["data"]);
        File.WriteAllText(d["data/movie.tif"], "pixels");
        var e = Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["data"], Overwrite: true, [d["data/movie.tif"]]), dir => WriteRun(dir)));
        Assert.Contains("input", e.Message);
        Assert.Equal("pixels", File.ReadAllText(d["data/movie.tif"]));
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Write_OntoAnAncestorOfTheInput_Refused()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["a/b"]);
        File.WriteAllText(d["a/b/movie.tif"], "pixels");
        // Even when the ancestor looks like an earlier output, the input inside it must survive.
        WriteRun(d["a"]);
        Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["a"], Overwrite: true, [d["a/b/movie.tif"]]), dir => WriteRun(dir)));
        Assert.True(File.Exists(d["a/b/movie.tif"]));
    }

    [Fact]
    public void Write_InsideAnInputFolderOfFrames_Refused()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["frames"]);
        File.WriteAllText(d["frames/t000.png"], "p");
        Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["frames/out"], Inputs: [d["frames"]]), dir => WriteRun(dir)));
        Assert.False(Directory.Exists(d["frames/out"]));
    }

    [Fact]
    public void Write_SubfolderBesideAnInputFile_Allowed()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["data"]);
        File.WriteAllText(d["data/movie.tif"], "pixels");
        OutputFolder.Write(new OutputTarget(d["data/run"], Inputs: [d["data/movie.tif"]]), dir => WriteRun(dir));
        Assert.True(File.Exists(d["data/run/summary.json"]));
        Assert.Equal("pixels", File.ReadAllText(d["data/movie.tif"]));
    }

    [Fact]
    public void Write_NonEmptyForeignFolder_RefusedWithoutTouchingIt()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["mine"]);
        File.WriteAllText(d["mine/thesis.docx"], "years of work");
        var e = Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["mine"], Overwrite: true), dir => WriteRun(dir)));
        Assert.Contains("not a ShapeNoise output", e.Message);
        Assert.Equal("years of work", File.ReadAllText(d["mine/thesis.docx"]));
        Assert.Single(Directory.GetFileSystemEntries(d["mine"]));
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Write_ForeignRunJson_Refused()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["other"]);
        File.WriteAllText(d["other/run.json"], "{\"tool\": \"something-else\"}");
        Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["other"], Overwrite: true), dir => WriteRun(dir)));
        Assert.True(File.Exists(d["other/run.json"]));
    }

    [Fact]
    public void Write_PreviousOutput_NeedsOverwriteThenReplacesOnlyIt()
    {
        using var d = new TempDir();
        File.WriteAllText(d["sibling.txt"], "keep");
        OutputFolder.Write(d["out"], dir => WriteRun(dir, "first"));
        var e = Assert.Throws<OutputException>(() => OutputFolder.Write(d["out"], dir => WriteRun(dir, "second")));
        Assert.Contains("--overwrite", e.Message);
        Assert.Equal("first", File.ReadAllText(d["out/summary.json"]));
        OutputFolder.Write(new OutputTarget(d["out"], Overwrite: true), dir => WriteRun(dir, "second"));
        Assert.Equal("second", File.ReadAllText(d["out/summary.json"]));
        Assert.Equal("keep", File.ReadAllText(d["sibling.txt"]));
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Write_PreviousOutputWithAUserFileAdded_RefusedEvenWithOverwrite()
    {
        using var d = new TempDir();
        OutputFolder.Write(d["out"], dir => WriteRun(dir));
        File.WriteAllText(d["out/my-notes.txt"], "notes");
        var e = Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["out"], Overwrite: true), dir => WriteRun(dir)));
        Assert.Contains("my-notes.txt", e.Message);
        Assert.Equal("notes", File.ReadAllText(d["out/my-notes.txt"]));
    }

    [Fact]
    public void Write_RunJson_ListsEveryFileWritten()
    {
        using var d = new TempDir();
        OutputFolder.Write(d["out"], dir =>
        {
            WriteRun(dir);
            Directory.CreateDirectory(Path.Combine(dir, "sub"));
            File.WriteAllText(Path.Combine(dir, "sub", "a.csv"), "a");
        });
        var files = JsonNode.Parse(File.ReadAllText(d["out/run.json"]))!["files"]!.AsArray().Select(f => (string)f!).ToArray();
        Assert.Equal(["run.json", "sub/a.csv", "summary.json"], files);
    }

    [Fact]
    public void Write_EmptyExistingFolder_IsUsed()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["empty"]);
        OutputFolder.Write(d["empty"], dir => WriteRun(dir));
        Assert.True(File.Exists(d["empty/summary.json"]));
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Write_FailureWhileWriting_LeavesNothingAndRemovesCreatedParents()
    {
        using var d = new TempDir();
        Assert.Throws<InvalidOperationException>(() => OutputFolder.Write(d["new/deeper/out"], dir =>
        {
            WriteRun(dir);
            throw new InvalidOperationException("boom");
        }));
        Assert.False(Directory.Exists(d["new"]), "parents created for the output are removed again");
        Assert.Empty(Directory.GetFileSystemEntries(d.Path));
    }

    [Fact]
    public void Write_FailureWhileReplacing_KeepsThePreviousOutput()
    {
        using var d = new TempDir();
        OutputFolder.Write(d["out"], dir => WriteRun(dir, "first"));
        Assert.Throws<InputException>(() => OutputFolder.Write(new OutputTarget(d["out"], Overwrite: true), dir =>
        {
            WriteRun(dir, "half");
            throw new InputException("movie.tif", "truncated");
        }));
        Assert.Equal("first", File.ReadAllText(d["out/summary.json"]));
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Write_StaleFoldersOfAKilledRun_RemovedOrRestored()
    {
        using var d = new TempDir();
        // A killed run (pid 2^22 + 7 is above Linux's default pid_max of 2^22, so no live process has it) left a partial
        // folder with our marker, and a moved-aside earlier output whose replacement never arrived.
        int dead = (1 << 22) + 7;
        string partial = d[$".out.partial-{dead}-abc"], old = d[$".out.old-{dead}-def"];
        Directory.CreateDirectory(partial);
        File.WriteAllText(Path.Combine(partial, ".shapenoise-scratch"), dead.ToString());
        Directory.CreateDirectory(old);
        WriteRun(old, "earlier");
        Directory.CreateDirectory(d[".out.partial-notours"]);
        File.WriteAllText(d[".out.partial-notours/x"], "user");
        OutputFolder.Write(d["other"], dir => WriteRun(dir));   // a run into another folder of the same parent cleans only "other"'s
        Assert.True(Directory.Exists(partial));
        var e = Assert.Throws<OutputException>(() => OutputFolder.Write(d["out"], dir => WriteRun(dir, "new")));
        Assert.Contains("--overwrite", e.Message);   // the earlier output was restored in place, so it needs --overwrite
        Assert.Equal("earlier", File.ReadAllText(d["out/summary.json"]));
        Assert.False(Directory.Exists(partial));
        Assert.False(Directory.Exists(old));
        Assert.True(File.Exists(d[".out.partial-notours/x"]), "a folder without our marker and a pid is never deleted");
    }

    [Fact]
    public void Write_TargetIsASymlink_Refused()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["real"]);
        Directory.CreateSymbolicLink(d["link"], d["real"]);
        Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["link"], Overwrite: true), dir => WriteRun(dir)));
        Assert.True(new DirectoryInfo(d["link"]).LinkTarget is not null);
    }

    [Fact]
    public void Write_InputReachedThroughASymlink_StillRecognised()
    {
        using var d = new TempDir();
        Directory.CreateDirectory(d["data"]);
        File.WriteAllText(d["data/movie.tif"], "pixels");
        Directory.CreateSymbolicLink(d["alias"], d["data"]);
        Assert.Throws<OutputException>(() => OutputFolder.Write(new OutputTarget(d["data"], Inputs: [d["alias/movie.tif"]]), dir => WriteRun(dir)));
        Assert.True(File.Exists(d["data/movie.tif"]));
    }

    [Fact]
    public void Write_TargetIsAFile_Refused()
    {
        using var d = new TempDir();
        File.WriteAllText(d["out"], "a file");
        Assert.Throws<OutputException>(() => OutputFolder.Write(d["out"], dir => WriteRun(dir)));
        Assert.Equal("a file", File.ReadAllText(d["out"]));
    }
}
