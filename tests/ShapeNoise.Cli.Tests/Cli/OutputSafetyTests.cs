using System.Diagnostics;
using System.Runtime.InteropServices;
using System.Security.Cryptography;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Cli;

/// <summary>--out through the real command (docs/inputs.md#output-folders): the user's files survive every case, exit codes
/// are honest, and no hidden folder remains — after refusals, after a read-only folder, and after SIGINT/SIGTERM/SIGKILL at
/// several points of a run.</summary>
public class OutputSafetyTests
{
    [DllImport("libc", SetLastError = true)] private static extern int kill(int pid, int sig);
    [DllImport("libc")] private static extern uint geteuid();
    private const int SigInt = 2, SigKill = 9, SigTerm = 15;

    private static string Hash(string file) => Convert.ToHexString(SHA256.HashData(File.ReadAllBytes(file)));

    /// <summary>A user's folder: a small movie and a notes file beside it.</summary>
    private static (string Movie, string Notes) UserData(TempDir d)
    {
        Assert.Equal(0, Support.Cli.Run("synth", "ellipses", "--out", d["gen"], "--cells", "6", "--frames", "16").ExitCode);
        Directory.CreateDirectory(d["data"]);
        File.Copy(d["gen/labels.tif"], d["data/movie.tif"]);
        File.WriteAllText(d["data/notes.txt"], "lab notes");
        return (d["data/movie.tif"], d["data/notes.txt"]);
    }

    private static void AssertNoHidden(string parent) => Assert.True(Directory.GetDirectories(parent, ".*").Length == 0, string.Join(", ", Directory.GetDirectories(parent, ".*")));

    [Fact]
    public void Analyze_OutIsTheInputsFolder_Exit3AndEverythingKept()
    {
        using var d = new TempDir();
        var (movie, notes) = UserData(d);
        string before = Hash(movie);
        foreach (var extra in new[] { Array.Empty<string>(), ["--overwrite"] })
        {
            var r = Support.Cli.Run(["analyze", movie, "--out", d["data"], "--bootstrap", "10", .. extra]);
            Assert.Equal(3, r.ExitCode);
            Assert.Single(r.Stderr.Trim().Split('\n'));
            Assert.Contains("input", r.Stderr);
            Assert.Equal(before, Hash(movie));
            Assert.Equal("lab notes", File.ReadAllText(notes));
            Assert.Equal(2, Directory.GetFileSystemEntries(d["data"]).Length);
        }
        // "--out ." from inside the input's folder (the way the bug was first met).
        var psi = new ProcessStartInfo("dotnet") { WorkingDirectory = d["data"], RedirectStandardError = true, RedirectStandardOutput = true };
        foreach (var a in new[] { typeof(ShapeNoise.Cli.ExitCodes).Assembly.Location, "analyze", "movie.tif", "--out", ".", "--bootstrap", "10" }) psi.ArgumentList.Add(a);
        using var p = Process.Start(psi)!;
        p.WaitForExit(120_000);
        Assert.Equal(3, p.ExitCode);
        Assert.Equal(before, Hash(movie));
        AssertNoHidden(d["data"]);
        AssertNoHidden(d.Path);
    }

    [Fact]
    public void Analyze_ForeignAndPreviousOutputs_RefusedOrReplacedAsDocumented()
    {
        using var d = new TempDir();
        var (movie, _) = UserData(d);
        Directory.CreateDirectory(d["foreign"]);
        File.WriteAllText(d["foreign/results.xlsx"], "mine");
        var foreign = Support.Cli.Run("analyze", movie, "--out", d["foreign"], "--bootstrap", "10", "--overwrite");
        Assert.Equal(3, foreign.ExitCode);
        Assert.Equal("mine", File.ReadAllText(d["foreign/results.xlsx"]));
        Assert.Single(Directory.GetFileSystemEntries(d["foreign"]));

        Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d["runs/a"], "--bootstrap", "10", "--quiet").ExitCode);   // missing parent is created
        string first = File.ReadAllText(d["runs/a/run.json"]);
        var again = Support.Cli.Run("analyze", movie, "--out", d["runs/a"], "--bootstrap", "10", "--quiet");
        Assert.Equal(3, again.ExitCode);
        Assert.Contains("--overwrite", again.Stderr);
        Assert.Equal(first, File.ReadAllText(d["runs/a/run.json"]));
        Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d["runs/a"], "--bootstrap", "10", "--quiet", "--overwrite").ExitCode);
        Assert.True(File.Exists(d["runs/a/report.html"]));
        AssertNoHidden(d["runs"]);
    }

    [Fact]
    public void Analyze_ReadOnlyPreviousOutput_Exit3BeforeAnyWorkAndNothingHidden()
    {
        using var d = new TempDir();
        var (movie, _) = UserData(d);
        Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d["runs/a"], "--bootstrap", "10", "--quiet").ExitCode);
        string first = File.ReadAllText(d["runs/a/summary.json"]);
        // Root ignores permission bits, so as root the command runs as the unprivileged uid 65534 (util-linux setpriv).
        Chmod(d.Path, "a+rwx"); Chmod(d["data"], "a+rwx"); Chmod(d["runs"], "a+rwx");
        Chmod(d["runs/a"], "a-w");
        var r = RunAs(["analyze", movie, "--out", d["runs/a"], "--bootstrap", "10", "--overwrite"], d.Path);
        Chmod(d["runs/a"], "u+w");
        Assert.Equal(3, r.ExitCode);
        Assert.Contains("not writable", r.Stderr);
        Assert.Equal(first, File.ReadAllText(d["runs/a/summary.json"]));
        AssertNoHidden(d["runs"]);
        // A read-only parent: nothing can be created, exit 3, nothing left.
        Chmod(d["runs"], "a-w");
        var p = RunAs(["analyze", movie, "--out", d["runs/b"], "--bootstrap", "10"], d.Path);
        Chmod(d["runs"], "u+w");
        Assert.Equal(3, p.ExitCode);
        Assert.False(Directory.Exists(d["runs/b"]));
        AssertNoHidden(d["runs"]);
    }

    [Theory]
    [InlineData(SigInt, 130)]
    [InlineData(SigTerm, 143)]
    public void Analyze_InterruptedAtSeveralPoints_UserFilesSurviveAndNothingHiddenRemains(int signal, int code)
    {
        using var d = new TempDir();
        var (movie, notes) = UserData(d);
        string before = Hash(movie);
        Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d["runs/a"], "--bootstrap", "200", "--quiet").ExitCode);
        string earlier = File.ReadAllText(d["runs/a/summary.json"]);
        // The length of a whole run: the shorter of two (the test assemblies run side by side, so one run can be slowed
        // several-fold by the others).
        double full = double.MaxValue;
        for (int rep = 0; rep < 2; rep++)
        {
            var sw = Stopwatch.StartNew();
            Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d[$"runs/timed{rep}"], "--bootstrap", "200", "--quiet").ExitCode);
            full = Math.Min(full, sw.Elapsed.TotalMilliseconds);
        }
        int interrupted = 0;
        // Fractions of a whole run, then "while writing": as soon as the temporary folder appears, and a little after.
        double[] points = [0.05, 0.15, 0.35, 0.55, 0.8, -1, -1.03, -1.1];
        foreach (double at in points)
        {
            using var p = Start(["analyze", movie, "--out", d["runs/a"], "--bootstrap", "200", "--quiet", "--overwrite"]);
            if (at >= 0) Thread.Sleep((int)(at * full));
            else
            {
                var wait = Stopwatch.StartNew();
                while (!p.HasExited && Directory.GetDirectories(d["runs"], ".a.partial-*").Length == 0 && wait.ElapsedMilliseconds < 60_000) Thread.Sleep(2);
                Thread.Sleep((int)((-at - 1) * 1000));
            }
            _ = kill(p.Id, signal); // -1 only when the run has already ended; the exit code below tells which
            Assert.True(p.WaitForExit(60_000));
            Assert.True(p.ExitCode == code || p.ExitCode == 0, $"exit {p.ExitCode} at {at:P0}: {p.StandardError.ReadToEnd()}");
            if (p.ExitCode == code) interrupted++;
            Assert.Equal(before, Hash(movie));
            Assert.Equal("lab notes", File.ReadAllText(notes));
            AssertNoHidden(d["runs"]);
            Assert.True(File.Exists(d["runs/a/report.html"]), "the earlier (or the new, complete) output is in place");
            if (p.ExitCode == code) Assert.Equal(earlier, File.ReadAllText(d["runs/a/summary.json"]));
        }
        // Timing on a loaded machine varies; the early points are always still running, so at least two runs must have been interrupted
        // for the test to mean anything (the others finished first and must then have left a complete output, checked above).
        Assert.True(interrupted >= 2, $"only {interrupted} of {points.Length} runs were still running when signalled (a whole run: {full:F0} ms)");
    }

    [Fact]
    public void Analyze_KilledWithSigkill_NextRunRemovesTheStaleFolder()
    {
        using var d = new TempDir();
        var (movie, _) = UserData(d);
        Directory.CreateDirectory(d["runs"]);
        var sw = Stopwatch.StartNew();
        bool leftOne = false;
        foreach (int afterMs in new[] { 0, 30, 150 })
        {
            // Killed while writing: wait until the temporary folder appears, then a little more.
            using var p = Start(["analyze", movie, "--out", d["runs/k"], "--bootstrap", "200", "--quiet", "--overwrite"]);
            while (!p.HasExited && Directory.GetDirectories(d["runs"], ".k.partial-*").Length == 0 && sw.Elapsed.TotalMilliseconds < 60_000) Thread.Sleep(2);
            Thread.Sleep(afterMs);
            _ = kill(p.Id, SigKill); // -1 only when the run has already ended; then no folder is left either
            p.WaitForExit(60_000);
            leftOne |= Directory.GetDirectories(d["runs"], ".k.*").Length > 0;
            Assert.Equal(0, Support.Cli.Run("analyze", movie, "--out", d["runs/k"], "--bootstrap", "10", "--quiet", "--overwrite").ExitCode);
            Assert.Empty(Directory.GetDirectories(d["runs"], ".k.*"));
            Assert.True(File.Exists(d["runs/k/report.html"]));
        }
        Assert.True(leftOne, "at least one SIGKILL landed while the temporary folder existed (else the test proves nothing)");
    }

    /// <summary>Starts the command with SIGINT at its default disposition: a test run started as a background job of a
    /// non-interactive shell inherits SIGINT ignored (POSIX: background commands ignore SIGINT and SIGQUIT when job control
    /// is off), exec keeps that, and the runtime then rightly leaves the signal ignored, so Ctrl-C could not be tested.
    /// GNU coreutils env (>= 8.31) resets it and execs dotnet in its place (same process id).</summary>
    private static Process Start(string[] args)
    {
        var psi = new ProcessStartInfo("env") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add("--default-signal=INT");
        psi.ArgumentList.Add("dotnet");
        psi.ArgumentList.Add(typeof(ShapeNoise.Cli.ExitCodes).Assembly.Location);
        foreach (var a in args) psi.ArgumentList.Add(a);
        return Process.Start(psi)!;
    }

    private static Support.Cli.Result RunAs(string[] args, string home)
    {
        bool root = geteuid() == 0;
        var psi = new ProcessStartInfo(root ? "setpriv" : "dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        if (root) foreach (var a in new[] { "--reuid=65534", "--regid=65534", "--clear-groups", "dotnet" }) psi.ArgumentList.Add(a);
        psi.ArgumentList.Add(typeof(ShapeNoise.Cli.ExitCodes).Assembly.Location);
        foreach (var a in args) psi.ArgumentList.Add(a);
        psi.Environment["HOME"] = home;
        psi.Environment["DOTNET_CLI_HOME"] = home;
        using var p = Process.Start(psi)!;
        var so = p.StandardOutput.ReadToEndAsync(); var se = p.StandardError.ReadToEndAsync();
        Assert.True(p.WaitForExit(120_000));
        return new Support.Cli.Result(p.ExitCode, so.Result, se.Result);
    }

    private static void Chmod(string path, string mode)
    {
        using var p = Process.Start("chmod", [mode, path])!;
        p.WaitForExit();
        Assert.Equal(0, p.ExitCode);
    }
}
