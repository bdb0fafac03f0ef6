using ShapeNoise.Cli.Jobs;
using ShapeNoise.Reading;
using Spectre.Console;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

/// <summary>Maps failures to one-line messages and documented exit codes.</summary>
internal static class ExitCodes
{
    public const int Ok = 0, Unexpected = 1, BadInput = 2, Unwritable = 3, BadOptions = 64;

    /// <summary>Shown after the top-level help.</summary>
    public const string Help = """

EXIT CODES:
    0     done
    1     unexpected error
    2     bad input: the one-line message names the file and the problem (nothing is written)
    3     the output folder cannot or may not be written: not empty and not ours, an earlier output without
          --overwrite, the input's own folder, read-only (nothing is changed, nothing is left half-written)
    64    bad options or usage
    130   interrupted (Ctrl-C; 143 for SIGTERM): the unfinished output is removed, an earlier output kept
""";

    public static int Run(Func<int> body)
    {
        try { return body(); }
        catch (InputException e) { Error(e.Message); return BadInput; }
        catch (OutputException e) { Error($"{e.Message}"); return Unwritable; }
        catch (ArgumentException e) { Error(OptionNames.ToFlags(e.Message)); return BadOptions; }
        catch (CommandParseException e) { Error(e.Message); return BadOptions; }
        catch (CommandRuntimeException e) { Error(e.Message); return BadOptions; }
        catch (Exception e) { Error($"unexpected {e.GetType().Name}: {e.Message}"); return Unexpected; }
    }

    private static void Error(string message)
    {
        if (!Interrupts.Requested) Console.Error.WriteLine($"shapenoise: error: {message.ReplaceLineEndings(" ")}");
    }
}
