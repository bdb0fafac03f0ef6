using System.Diagnostics;

namespace ShapeNoise.Tests.Support;

/// <summary>Runs a third-party check in Debian's Python (/usr/bin/python3, whose dist-packages hold python3-tifffile and
/// friends; python3 on PATH when there is no /usr/bin/python3). A missing module is an error that names the Debian
/// package to install (scripts/ensure-test-deps.sh installs it), never a silent pass.</summary>
public static class Python
{
    /// <summary>The interpreter Debian's python3-* packages install into.</summary>
    public static string Interpreter => File.Exists("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

    /// <summary>Runs <paramref name="script"/> (python3 -c) with <paramref name="args"/>; returns stdout. Throws when
    /// <paramref name="module"/> cannot be imported (naming <paramref name="debianPackage"/>) or the script fails.</summary>
    public static string Run(string module, string debianPackage, string script, params string[] args)
    {
        var probe = Start($"import {module}", []);
        if (probe.ExitCode != 0)
            throw new InvalidOperationException($"{Interpreter} cannot import {module}: install Debian's {debianPackage} " +
                $"(apt-get install {debianPackage}; scripts/ensure-test-deps.sh does it). {probe.Stderr.Trim()}");
        var r = Start(script, args);
        if (r.ExitCode != 0) throw new InvalidOperationException($"python check failed (exit {r.ExitCode}): {r.Stderr.Trim()}");
        return r.Stdout;
    }

    private static (int ExitCode, string Stdout, string Stderr) Start(string script, string[] args)
    {
        var psi = new ProcessStartInfo(Interpreter) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add("-c"); psi.ArgumentList.Add(script);
        foreach (var a in args) psi.ArgumentList.Add(a);
        psi.Environment["PYTHONIOENCODING"] = "utf-8";
        using var p = Process.Start(psi)!;
        var so = p.StandardOutput.ReadToEndAsync();
        var se = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(120_000)) { p.Kill(true); throw new TimeoutException("python did not finish in 120 s"); }
        return (p.ExitCode, so.Result, se.Result);
    }
}
