using ShapeNoise.Cli.Jobs;
using System.ComponentModel;
using System.Globalization;
using System.Reflection;
using Spectre.Console.Cli;

namespace ShapeNoise.Cli;

/// <summary>A bad option or usage: an unknown option, a stray argument, a value that does not convert (exit 64).</summary>
internal sealed class OptionException(string message) : ArgumentException(message);

/// <summary>
/// Strict command lines for every command. Spectre.Console.Cli (0.57) collects unknown options into
/// <see cref="CommandContext.Remaining"/> instead of failing, and its conversion errors do not name the option; this
/// checks the arguments against the command's settings type (its [CommandOption]/[CommandArgument] attributes, read by
/// reflection) before anything runs, and refuses with one line that names the offending token and the nearest known
/// option of that command.
/// </summary>
internal static class StrictOptions
{
    /// <summary>Every command of the application by its path (as typed), with its settings type.</summary>
    public static readonly IReadOnlyDictionary<string, Type> Commands = new Dictionary<string, Type>
    {
        ["synth ellipses"] = typeof(SynthEllipsesCommand.Settings),
        ["synth monolayer"] = typeof(SynthMonolayerCommand.Settings),
        ["analyze"] = typeof(AnalyzeCommand.Settings),
        ["segment"] = typeof(SegmentCommand.Settings),
        ["score"] = typeof(ScoreCommand.Settings),
        ["compare"] = typeof(CompareCommand.Settings),
        ["plan"] = typeof(PlanCommand.Settings),
    };

    private sealed record OptionSpec(string Display, string[] Long, string[] Short, bool TakesValue, bool ValueOptional, Type ValueType);
    private sealed record Spec(List<OptionSpec> Options, int Positionals, bool LastIsList, string Usage);

    /// <summary>
    /// Checks a whole command line (as passed to the program). Does nothing when the first words name no command (help,
    /// version, unknown command: left to the parser) or when help is asked for.
    /// </summary>
    /// <exception cref="OptionException">An unknown option, a stray argument, a repeated option or a value that does not convert.</exception>
    public static void Check(IReadOnlyList<string> args)
    {
        string? command = null; int start = 0;
        foreach (var (path, _) in Commands)
        {
            var words = path.Split(' ');
            if (words.Length <= args.Count && words.Length > start && words.Select((w, i) => args[i] == w).All(x => x)) { command = path; start = words.Length; }
        }
        if (command is null) return;
        for (int i = start; i < args.Count; i++) if (args[i] is "-h" or "--help" or "-?") return;
        var spec = SpecOf(Commands[command]);
        var seen = new HashSet<OptionSpec>();
        int positionals = 0;
        for (int i = start; i < args.Count; i++)
        {
            string a = args[i];
            if (a == "--")
            {
                if (i + 1 < args.Count) throw new OptionException($"unexpected argument '{args[i + 1]}' after '--' for '{command}'");
                continue;
            }
            if (a.StartsWith("--", StringComparison.Ordinal) || (a.Length > 1 && a[0] == '-' && !IsNumber(a)))
            {
                bool isLong = a.StartsWith("--", StringComparison.Ordinal);
                string body = a[(isLong ? 2 : 1)..];
                int sep = isLong ? body.IndexOfAny(['=', ':']) : -1;
                string name = sep >= 0 ? body[..sep] : body;
                string? inline = sep >= 0 ? body[(sep + 1)..] : null;
                if (!isLong && name.Length > 1)
                    throw new OptionException($"unknown option '{a}' for '{command}'{Suggestion("-" + name, spec)}");
                var o = spec.Options.Find(x => isLong ? x.Long.Contains(name) : x.Short.Contains(name))
                        ?? throw new OptionException($"unknown option '{a.Split('=', ':')[0]}' for '{command}'{Suggestion((isLong ? "--" : "-") + name, spec)}");
                if (!seen.Add(o)) throw new OptionException($"option '{o.Display}' given twice for '{command}' (give it once)");
                if (!o.TakesValue)
                {
                    if (inline is not null) throw new OptionException($"option '{o.Display}' of '{command}' is a flag and takes no value (got '{inline}')");
                    continue;
                }
                string? value = inline;
                if (value is null && i + 1 < args.Count && (!args[i + 1].StartsWith('-') || IsNumber(args[i + 1]) || args[i + 1] == "-")) value = args[++i];
                if (value is null)
                {
                    if (o.ValueOptional) continue;
                    throw new OptionException($"option '{o.Display}' of '{command}' needs a value");
                }
                Convert(o, value, command);
                continue;
            }
            positionals++;
            if (positionals > spec.Positionals && !spec.LastIsList)
                throw new OptionException($"unexpected argument '{a}' for '{command}' (usage: shapenoise {command} {spec.Usage})");
        }
    }

    /// <summary>Refuses options that the parser collected as remaining (the check made after parsing, before the command runs).</summary>
    public static void CheckRemaining(CommandContext context, CommandSettings settings)
    {
        var spec = SpecOf(settings.GetType());
        foreach (var g in context.Remaining.Parsed)
            throw new OptionException($"unknown option '{g.Key}' for '{context.Name}'{Suggestion(g.Key, spec)}");
        if (context.Remaining.Raw.Count > 0)
            throw new OptionException($"unexpected argument '{context.Remaining.Raw[0]}' for '{context.Name}'");
    }

    /// <summary>
    /// The known option nearest to <paramref name="typed"/>: the smallest edit distance (ties to the longest common
    /// prefix) among the close ones, those within max(2, half the typed length) edits or that hold the typed letters in
    /// order starting with the same letter ('--frm' → '--frames', '-q' → '--quiet'); null when none is close.
    /// </summary>
    public static string? Nearest(string typed, IEnumerable<string> known)
    {
        string? best = null; int bestD = int.MaxValue, bestP = -1;
        string t = typed.TrimStart('-').ToLowerInvariant();
        foreach (var k in known)
        {
            string n = k.TrimStart('-').ToLowerInvariant();
            int d = Distance(t, n);
            if (d > Math.Max(2, t.Length / 2) && !(t.Length > 0 && n.StartsWith(t[0]) && IsSubsequence(t, n))) continue;
            int p = 0; while (p < t.Length && p < n.Length && t[p] == n[p]) p++;
            if (d < bestD || (d == bestD && p > bestP) || (d == bestD && p == bestP && string.CompareOrdinal(k, best) < 0)) { best = k; bestD = d; bestP = p; }
        }
        return best;
    }

    private static bool IsSubsequence(string t, string n)
    {
        int j = 0;
        for (int i = 0; i < n.Length && j < t.Length; i++) if (n[i] == t[j]) j++;
        return j == t.Length;
    }

    /// <summary>Optimal-string-alignment edit distance: insertions, deletions, substitutions and adjacent transpositions each cost 1.</summary>
    public static int Distance(string a, string b)
    {
        var d = new int[a.Length + 1, b.Length + 1];
        for (int i = 0; i <= a.Length; i++) d[i, 0] = i;
        for (int j = 0; j <= b.Length; j++) d[0, j] = j;
        for (int i = 1; i <= a.Length; i++)
            for (int j = 1; j <= b.Length; j++)
            {
                int cost = a[i - 1] == b[j - 1] ? 0 : 1;
                int v = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + cost);
                if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) v = Math.Min(v, d[i - 2, j - 2] + 1);
                d[i, j] = v;
            }
        return d[a.Length, b.Length];
    }

    private static string Suggestion(string typed, Spec spec)
    {
        var near = Nearest(typed, spec.Options.SelectMany(o => o.Long.Select(l => "--" + l)));
        return near is null ? "; see --help" : $"; did you mean '{near}'?";
    }

    [System.Diagnostics.CodeAnalysis.UnconditionalSuppressMessage("Trimming", "IL2026", Justification = "The settings types live in this assembly, which the native publish does not trim (TrimMode partial); scripts/check-native.sh runs every command natively.")]
    [System.Diagnostics.CodeAnalysis.UnconditionalSuppressMessage("Trimming", "IL2072", Justification = "The settings types live in this assembly, which the native publish does not trim (TrimMode partial); scripts/check-native.sh runs every command natively.")]
    private static void Convert(OptionSpec o, string value, string command)
    {
        var t = Nullable.GetUnderlyingType(o.ValueType) ?? o.ValueType;
        if (t.IsArray) t = t.GetElementType()!;
        if (t == typeof(string)) return;
        bool ok;
        try
        {
            var converted = TypeDescriptor.GetConverter(t).ConvertFromString(null, CultureInfo.InvariantCulture, value);
            ok = converted is not null && converted is not (double and (double.NaN or double.PositiveInfinity or double.NegativeInfinity));
        }
        catch (Exception e) when (e is FormatException or ArgumentException or NotSupportedException or OverflowException) { ok = false; }
        if (!ok) throw new OptionException($"option '{o.Display}' of '{command}' expects {Kind(t)} (got '{value}')");
    }

    private static string Kind(Type t) =>
        t == typeof(int) || t == typeof(long) ? "an integer" : t == typeof(double) || t == typeof(float) ? "a finite number" : t.IsEnum ? $"one of {string.Join(", ", Enum.GetNames(t))}" : $"a {t.Name}";

    /// <summary>Runs <see cref="CheckRemaining"/> after parsing, before each command.</summary>
    public sealed class Interceptor : ICommandInterceptor
    {
        /// <inheritdoc/>
        public void Intercept(CommandContext context, CommandSettings settings) => CheckRemaining(context, settings);
    }

    private static bool IsNumber(string s) => double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out _);

    [System.Diagnostics.CodeAnalysis.UnconditionalSuppressMessage("Trimming", "IL2070", Justification = "The settings types live in this assembly, which the native publish does not trim (TrimMode partial); scripts/check-native.sh runs every command natively.")]
    private static Spec SpecOf(Type settings)
    {
        var options = new List<OptionSpec>(); int positionals = 0; bool list = false;
        var usage = new List<string>();
        foreach (var p in settings.GetProperties(BindingFlags.Public | BindingFlags.Instance))
        {
            if (p.GetCustomAttribute<CommandOptionAttribute>() is { } o)
            {
                bool flag = o.ValueName is null && (p.PropertyType == typeof(bool) || p.PropertyType == typeof(bool?));
                string display = o.LongNames.Count > 0 ? "--" + o.LongNames[0] : "-" + o.ShortNames[0];
                options.Add(new OptionSpec(display, [.. o.LongNames], [.. o.ShortNames], !flag, o.ValueIsOptional, p.PropertyType));
            }
            else if (p.GetCustomAttribute<CommandArgumentAttribute>() is { } a)
            {
                positionals = Math.Max(positionals, a.Position + 1);
                if (p.PropertyType.IsArray) list = true;
                usage.Add($"{a.Position}\t<{a.ValueName}>{(p.PropertyType.IsArray ? "..." : "")}");
            }
        }
        usage.Sort(string.CompareOrdinal);
        return new Spec(options, positionals, list, string.Join(' ', usage.Select(u => u[(u.IndexOf('\t') + 1)..]).Append("[OPTIONS]")));
    }
}
