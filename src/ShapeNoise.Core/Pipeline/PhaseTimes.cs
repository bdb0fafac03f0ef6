using System.Diagnostics;

namespace ShapeNoise.Pipeline;

/// <summary>Wall-clock seconds spent per pipeline phase (for the benchmark); thread-safe accumulation.</summary>
public sealed class PhaseTimes
{
    private readonly Dictionary<string, double> _seconds = new();
    private readonly List<string> _order = [];

    /// <summary>Adds <paramref name="seconds"/> (s, wall clock) to <paramref name="phase"/>'s total; a new phase goes last in <see cref="Phases"/>.</summary>
    public void Add(string phase, double seconds)
    {
        lock (_seconds)
        {
            if (!_seconds.ContainsKey(phase)) { _seconds[phase] = 0; _order.Add(phase); }
            _seconds[phase] += seconds;
        }
    }

    /// <summary>Times <paramref name="action"/> under <paramref name="phase"/>.</summary>
    public T Time<T>(string phase, Func<T> action)
    {
        long t0 = Stopwatch.GetTimestamp();
        try { return action(); }
        finally { Add(phase, Stopwatch.GetElapsedTime(t0).TotalSeconds); }
    }

    /// <summary>Each phase with its total wall-clock seconds (s), in the order first seen; a snapshot.</summary>
    public IReadOnlyList<(string Phase, double Seconds)> Phases
    {
        get { lock (_seconds) return _order.Select(p => (p, _seconds[p])).ToList(); }
    }
}
