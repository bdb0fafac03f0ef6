using System.Reflection;
using NetArchTest.Rules;

namespace ShapeNoise.Tests.Architecture;

/// <summary>The dependency rule of DEVELOPERS.md: Core &lt;- Imaging, Core &lt;- Reporting, all &lt;- Cli; Core is maths and
/// the pipeline (MathNet.Numerics only), OpenCvSharp only in Imaging, ScottPlot/CsvHelper/Tomlyn only in
/// Reporting, and the namespaces of Core depend on each other without a circle. Checked on the compiled IL with
/// NetArchTest.Rules (Mono.Cecil), method bodies included, and on each assembly's reference list.</summary>
public class DependencyRuleTests
{
    private static readonly Assembly Core = typeof(ShapeNoise.Shape.Polygon).Assembly;
    private static readonly Assembly Imaging = typeof(ShapeNoise.Imaging.Reading.TiffPages).Assembly;
    private static readonly Assembly Reporting = typeof(ShapeNoise.Reporting.OutputFolder).Assembly;

    private static readonly string[] Presentation = ["ScottPlot", "CsvHelper", "Tomlyn", "SkiaSharp", "Spectre", "ShapeNoise.Reporting", "ShapeNoise.Cli"];
    private static readonly string[] ImageCode = ["OpenCvSharp", "ShapeNoise.Imaging"];

    private static void AssertNoDependency(Assembly a, string[] forbidden)
    {
        var result = Types.InAssembly(a).ShouldNot().HaveDependencyOnAny(forbidden).GetResult();
        Assert.True(result.IsSuccessful, $"{a.GetName().Name} must not depend on {string.Join(", ", forbidden)}; offending types: "
            + string.Join(", ", result.FailingTypeNames ?? []));
        var refs = a.GetReferencedAssemblies().Select(r => r.Name!).Where(n => forbidden.Any(f => n.StartsWith(f, StringComparison.Ordinal))).ToList();
        Assert.True(refs.Count == 0, $"{a.GetName().Name} references {string.Join(", ", refs)}");
    }

    [Fact]
    public void Core_ReferencesNoPresentationOrImagingCode() => AssertNoDependency(Core, [.. Presentation, .. ImageCode]);

    [Fact]
    public void Core_ReferencesOnlyTheMathsPackages()
    {
        var allowed = new[] { "System", "Microsoft", "netstandard", "mscorlib", "MathNet.Numerics" };
        var other = Core.GetReferencedAssemblies().Select(r => r.Name!).Where(n => !allowed.Any(p => n == p || n.StartsWith(p + ".", StringComparison.Ordinal))).ToList();
        Assert.True(other.Count == 0, $"ShapeNoise.Core references {string.Join(", ", other)}");
    }

    [Fact]
    public void Imaging_ReferencesNoPresentationCode() => AssertNoDependency(Imaging, Presentation);

    [Fact]
    public void Reporting_ReferencesNoImagingOrCommandCode() => AssertNoDependency(Reporting, [.. ImageCode, "Spectre", "ShapeNoise.Cli"]);

    [Fact]
    public void CoreNamespaces_DependWithoutCircles()
    {
        var graph = NamespaceGraph(Core, "ShapeNoise.");
        var cycle = FindCycle(graph);
        Assert.True(cycle is null, $"namespaces of ShapeNoise.Core depend in a circle: {string.Join(" -> ", cycle ?? [])}");
    }

    [Fact]
    public void FindCycle_OnAKnownCircle_FindsIt()
    {
        // The checker itself must be able to fail: a hand-made graph with a circle b -> c -> b.
        var g = new Dictionary<string, HashSet<string>> { ["a"] = ["b"], ["b"] = ["c"], ["c"] = ["b"] };
        Assert.Equal(["b", "c", "b"], FindCycle(g));
        Assert.Null(FindCycle(new Dictionary<string, HashSet<string>> { ["a"] = ["b"], ["b"] = [] }));
    }

    /// <summary>Which namespace of the assembly uses which other (IL-level, through NetArchTest).</summary>
    internal static Dictionary<string, HashSet<string>> NamespaceGraph(Assembly a, string prefix)
    {
        var names = a.GetTypes().Select(t => t.Namespace).Where(n => n is not null && n.StartsWith(prefix, StringComparison.Ordinal)).Distinct().Select(n => n!).ToList();
        // NetArchTest matches a dependency by name prefix: no namespace may be a prefix of another, or edges would be false.
        foreach (var x in names) foreach (var y in names)
            if (x != y && y.StartsWith(x, StringComparison.Ordinal)) throw new InvalidOperationException($"namespace {x} is a prefix of {y}");
        var graph = names.ToDictionary(n => n, _ => new HashSet<string>());
        foreach (var from in names)
            foreach (var to in names)
            {
                if (from == to) continue;
                var uses = Types.InAssembly(a).That().ResideInNamespaceMatching($"^{System.Text.RegularExpressions.Regex.Escape(from)}$")
                    .Should().NotHaveDependencyOn(to).GetResult();   // matches names starting with "to" (see the prefix check)
                if (!uses.IsSuccessful) graph[from].Add(to);
            }
        return graph;
    }

    /// <summary>A circle in the graph as a path that ends where it starts, or null (depth-first search).</summary>
    internal static List<string>? FindCycle(Dictionary<string, HashSet<string>> g)
    {
        var state = new Dictionary<string, int>();
        var path = new List<string>();
        List<string>? Visit(string n)
        {
            state[n] = 1; path.Add(n);
            foreach (var m in g.GetValueOrDefault(n, []).OrderBy(x => x, StringComparer.Ordinal))
            {
                if (state.GetValueOrDefault(m) == 1) return [.. path.Skip(path.IndexOf(m)), m];
                if (state.GetValueOrDefault(m) == 0 && Visit(m) is { } c) return c;
            }
            state[n] = 2; path.RemoveAt(path.Count - 1);
            return null;
        }
        foreach (var n in g.Keys.OrderBy(x => x, StringComparer.Ordinal))
            if (state.GetValueOrDefault(n) == 0 && Visit(n) is { } c) return c;
        return null;
    }
}
