using ShapeNoise.Cli.Jobs;
using System.Runtime.InteropServices;
using ShapeNoise.Reporting;

namespace ShapeNoise.Cli;

/// <summary>Ctrl-C (SIGINT), SIGTERM and SIGHUP: remove this run's temporary folders (restoring an earlier output that was
/// being replaced), say so in one line and exit with 128 + the signal number, the shell convention (130 for Ctrl-C).
/// See docs/inputs.md#output-folders.</summary>
internal static class Interrupts
{
    private static readonly List<PosixSignalRegistration> Registrations = [];
    private static readonly ManualResetEventSlim Unwound = new();
    private static volatile bool _requested;

    /// <summary>True once a signal arrived: the command's own failure (its files vanished under it) is then not reported.</summary>
    public static bool Requested => _requested;

    /// <summary>Installs the handlers for the life of the process.</summary>
    public static void Install()
    {
        foreach (var (signal, code) in new[] { (PosixSignal.SIGINT, 130), (PosixSignal.SIGTERM, 143), (PosixSignal.SIGHUP, 129) })
            Registrations.Add(PosixSignalRegistration.Create(signal, ctx =>
            {
                ctx.Cancel = true;   // we exit ourselves, after cleaning up
                _requested = true;
                int unfinished = Scratch.CleanAll();
                Unwound.Wait(TimeSpan.FromSeconds(2));   // let the command unwind through its own clean-up if it is writing
                unfinished += Scratch.CleanAll();
                Console.Error.WriteLine(unfinished > 0 ? $"shapenoise: interrupted ({ctx.Signal}); the unfinished output was removed and any earlier output left as it was"
                                                       : $"shapenoise: interrupted ({ctx.Signal})");
                Exit(code);
            }));
    }

    /// <summary>Ends the process at once with <paramref name="code"/>. The clean-up is done and stderr is unbuffered, so on
    /// Linux and macOS the C library's _exit(2) is used: Environment.Exit would run the runtime's shutdown while worker threads
    /// may still be inside native code (figure rendering, OpenCV), which once ended a SIGTERM run with a segmentation
    /// fault (exit 139) in CI.</summary>
    private static void Exit(int code)
    {
        Console.Error.Flush();
        if (OperatingSystem.IsLinux() || OperatingSystem.IsMacOS()) _exit(code);
        Environment.Exit(code);
    }

    [DllImport("libc", EntryPoint = "_exit")]
    private static extern void _exit(int status);

    /// <summary>Called when the command has returned: after a signal, hand over to the handler (which exits) instead of
    /// letting the command's exit code stand.</summary>
    public static void AfterCommand()
    {
        if (!_requested) return;
        Unwound.Set();
        Thread.Sleep(Timeout.Infinite);
    }
}
