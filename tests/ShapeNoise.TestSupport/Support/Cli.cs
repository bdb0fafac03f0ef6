using System.Diagnostics;

namespace ShapeNoise.Tests.Support;

/// <summary>Runs the real shapenoise command (the built Cli assembly) as a separate process.</summary>
public static class Cli
{
    public sealed record Result(int ExitCode, string Stdout, string Stderr);

    public static Result Run(params string[] args) => RunWith(new Dictionary<string, string>(), args);

    /// <summary>As <see cref="Run"/>, with extra environment variables for the process.</summary>
    public static Result RunWith(IReadOnlyDictionary<string, string> environment, params string[] args)
    {
        string dll = typeof(ShapeNoise.Cli.ExitCodes).Assembly.Location;
        var psi = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        foreach (var (k, v) in environment) psi.Environment[k] = v;
        psi.ArgumentList.Add(dll);
        foreach (var a in args) psi.ArgumentList.Add(a);
        using var p = Process.Start(psi)!;
        var so = p.StandardOutput.ReadToEndAsync();
        var se = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(180_000)) { p.Kill(true); throw new TimeoutException("shapenoise did not finish in 180 s"); }
        return new Result(p.ExitCode, so.Result, se.Result);
    }
}
