using System.Text.Json.Nodes;
using ShapeNoise.Reading;

namespace ShapeNoise.Reporting;

/// <summary>Where a command writes its folder: the folder, whether an earlier ShapeNoise output there may be replaced, and
/// the inputs it must never write into or over.</summary>
/// <param name="Folder">The output folder (need not exist; missing parents are created).</param>
/// <param name="Overwrite">An earlier ShapeNoise output in <paramref name="Folder"/> may be replaced (<c>--overwrite</c>).</param>
/// <param name="Inputs">Input files and folders of the run.</param>
public sealed record OutputTarget(string Folder, bool Overwrite = false, IReadOnlyList<string>? Inputs = null)
{
    /// <summary>A new folder with no inputs to protect and no overwriting (folders a job writes inside its own output).</summary>
    public static implicit operator OutputTarget(string folder) => new(folder);
}

/// <summary>
/// Writes an output folder so that a user's files are never lost: everything goes to a hidden temporary folder beside the
/// target, which is renamed into place only when complete. The target must be missing, empty, or (with
/// <see cref="OutputTarget.Overwrite"/>) an earlier ShapeNoise output whose run.json lists every file in it; it must not hold,
/// or lie inside, any input. Temporary folders are registered with <see cref="Scratch"/> so an interrupt removes them, and
/// stale ones of a killed run are removed (or an interrupted replacement restored) by the next run into the same parent.
/// See docs/inputs.md#output-folders.
/// </summary>
public static class OutputFolder
{
    private const string PartialTag = ".partial-", OldTag = ".old-", Marker = ".shapenoise-scratch";

    /// <summary>Checks, before any work, that <paramref name="target"/> may be written; throws <see cref="OutputException"/>
    /// (exit 3) with a one-line reason otherwise.</summary>
    public static void Check(OutputTarget target) => Resolve(target);

    /// <summary>Runs <paramref name="write"/> on a fresh temporary folder, adds the list of written files to its run.json,
    /// then moves it to the target (replacing an earlier output only as <see cref="Check"/> allows).</summary>
    public static void Write(OutputTarget target, Action<string> write)
    {
        var (full, parent, name, existing) = Resolve(target);
        var created = CreateParents(parent, target.Folder);
        RemoveStale(parent, name);
        string temp = Path.Combine(parent, $".{name}{PartialTag}{Environment.ProcessId}-{Guid.NewGuid():N}");
        using var scratch = Scratch.Register(temp);
        try
        {
            try
            {
                Directory.CreateDirectory(temp);
                File.WriteAllText(Path.Combine(temp, Marker), Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture));
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            { throw new OutputException(target.Folder, $"the parent folder is not writable ({e.Message})"); }
            write(temp);
            File.Delete(Path.Combine(temp, Marker));
            AddManifest(temp);
            Scratch.ThrowIfAborted();      // an interrupt arrived while we wrote: nothing moves into place
            var again = Resolve(target);   // the target may have changed while we worked
            Swap(temp, full, parent, name, again.Existing || existing, target.Folder);
        }
        catch (Exception e)
        {
            Scratch.Delete(temp);
            RemoveCreated(created);
            if (e is IOException or UnauthorizedAccessException) throw new OutputException(target.Folder, $"writing failed ({e.Message})");
            throw;
        }
    }

    private static (string Full, string Parent, string Name, bool Existing) Resolve(OutputTarget target)
    {
        if (string.IsNullOrWhiteSpace(target.Folder)) throw new OutputException("(empty)", "no output folder given");
        string full = Path.GetFullPath(target.Folder.TrimEnd('/', Path.DirectorySeparatorChar));
        if (full == Path.GetPathRoot(full)) throw new OutputException(target.Folder, "is the root folder; choose a new folder for the output");
        string parent = Path.GetDirectoryName(full)!, name = Path.GetFileName(full);
        if (File.Exists(full)) throw new OutputException(target.Folder, "exists and is a file, not a folder; choose a new folder for the output");
        string real = FilePaths.Real(full);
        foreach (var input in target.Inputs ?? [])
        {
            if (string.IsNullOrWhiteSpace(input) || (!File.Exists(input) && !Directory.Exists(input))) continue;
            string inReal = FilePaths.Real(input);
            string holder = File.Exists(inReal) ? Path.GetDirectoryName(inReal)! : inReal;
            if (Within(inReal, real) || holder == real)
                throw new OutputException(target.Folder, $"holds the input {input}; the output must go to a new folder, not the input's own folder");
            if (Within(real, holder) && Directory.Exists(inReal))
                throw new OutputException(target.Folder, $"lies inside the input folder {input}; choose a folder outside it");
        }
        if (!Directory.Exists(full)) return (full, parent, name, false);
        if (new DirectoryInfo(full).LinkTarget is not null)
            throw new OutputException(target.Folder, "is a symbolic link; give the folder it points to, or a new folder");
        if (!Directory.EnumerateFileSystemEntries(full).Any()) return (full, parent, name, true);
        string? why = PreviousOutput(full);
        if (why is not null) throw new OutputException(target.Folder, why);
        if (!target.Overwrite)
            throw new OutputException(target.Folder, "holds an earlier ShapeNoise output; give --overwrite to replace it, or choose a new folder");
        RequireRemovable(full, target.Folder);
        return (full, parent, name, true);
    }

    /// <summary>Null when <paramref name="dir"/> is an earlier ShapeNoise output that may be replaced, else the reason it may not.</summary>
    private static string? PreviousOutput(string dir)
    {
        const string foreign = "is not empty and is not a ShapeNoise output (no run.json of ours); nothing was written, choose a new folder";
        string runJson = Path.Combine(dir, AnalysisFolder.Run);
        if (!File.Exists(runJson)) return foreign;
        JsonNode? run;
        try { run = JsonNode.Parse(File.ReadAllText(runJson)); }
        catch (Exception e) when (e is System.Text.Json.JsonException or IOException or UnauthorizedAccessException) { return foreign; }
        if (run is not JsonObject o || (string?)o["tool"] != "shapenoise") return foreign;
        if (o["files"] is not JsonArray listed) return null;   // written before file lists were kept: run.json alone identifies it
        var known = new HashSet<string>(StringComparer.Ordinal);
        foreach (var f in listed) if (f is not null) known.Add((string)f!);
        foreach (var f in Directory.EnumerateFiles(dir, "*", SearchOption.AllDirectories))
        {
            string rel = Path.GetRelativePath(dir, f).Replace('\\', '/');
            if (!known.Contains(rel))
                return $"holds {rel}, which ShapeNoise did not write; move it out or choose a new folder (nothing was replaced)";
        }
        return null;
    }

    /// <summary>Fails before any work when an earlier output could not be removed completely (a read-only folder in it).</summary>
    private static void RequireRemovable(string dir, string shown)
    {
        foreach (var d in Directory.EnumerateDirectories(dir, "*", SearchOption.AllDirectories).Prepend(dir))
        {
            try { using (File.Create(Path.Combine(d, $".shapenoise-probe-{Guid.NewGuid():N}"), 1, FileOptions.DeleteOnClose)) { } }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            { throw new OutputException(shown, $"the earlier output cannot be replaced: {Path.GetRelativePath(dir, d)} is not writable ({e.Message})"); }
        }
    }

    private static void Swap(string temp, string full, string parent, string name, bool existing, string shown)
    {
        if (!existing || !Directory.Exists(full)) { Directory.Move(temp, full); return; }
        string old = Path.Combine(parent, $".{name}{OldTag}{Environment.ProcessId}-{Guid.NewGuid():N}");
        using var scratch = Scratch.Register(old, restoreTo: full);
        Directory.Move(full, old);
        try { Directory.Move(temp, full); }
        catch { Directory.Move(old, full); throw; }
        try { Directory.Delete(old, recursive: true); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        { Console.Error.WriteLine($"shapenoise: warning: {shown}: replaced, but the earlier output could not be removed completely ({e.Message}); the next run here removes {old}"); }
    }

    /// <summary>Adds <c>"files"</c> (every file written, relative, '/'-separated) to the folder's run.json: the list that
    /// lets a later <c>--overwrite</c> prove the folder holds nothing else.</summary>
    private static void AddManifest(string dir)
    {
        string runJson = Path.Combine(dir, AnalysisFolder.Run);
        if (!File.Exists(runJson)) return;
        var files = new List<string>();
        foreach (var f in Directory.EnumerateFiles(dir, "*", SearchOption.AllDirectories)) files.Add(Path.GetRelativePath(dir, f).Replace('\\', '/'));
        files.Sort(StringComparer.Ordinal);
        if (JsonNode.Parse(File.ReadAllText(runJson)) is not JsonObject run) return;
        var arr = new JsonArray();
        foreach (var f in files) arr.Add((JsonNode)f);
        run["files"] = arr;
        File.WriteAllText(runJson, run.ToJsonString(Summary.Indented));
    }

    /// <summary>Removes temporary folders of earlier runs into <paramref name="parent"/> whose process is gone; an earlier
    /// output that an interrupted replacement had moved aside is moved back when nothing took its place.</summary>
    private static void RemoveStale(string parent, string name)
    {
        if (!Directory.Exists(parent)) return;
        foreach (var d in Directory.EnumerateDirectories(parent, $".{name}.*"))
        {
            string suffix = Path.GetFileName(d)[(name.Length + 1)..];
            bool partial = suffix.StartsWith(PartialTag, StringComparison.Ordinal), old = suffix.StartsWith(OldTag, StringComparison.Ordinal);
            if (!partial && !old) continue;
            string rest = suffix[(partial ? PartialTag.Length : OldTag.Length)..];
            int dash = rest.IndexOf('-');
            if (dash <= 0 || !int.TryParse(rest[..dash], out int pid) || Scratch.IsAlive(pid)) continue;
            try
            {
                string target = Path.Combine(parent, name);
                if (partial && (File.Exists(Path.Combine(d, Marker)) || !Directory.EnumerateFileSystemEntries(d).Any())) Directory.Delete(d, true);
                else if (old && !Directory.Exists(target) && File.Exists(Path.Combine(d, AnalysisFolder.Run))) Directory.Move(d, target);
                else if (old && File.Exists(Path.Combine(d, AnalysisFolder.Run))) Directory.Delete(d, true);
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException) { /* left for a later run; never fatal */ }
        }
    }

    private static List<string> CreateParents(string parent, string shown)
    {
        var created = new List<string>();
        for (string? p = parent; p is not null && !Directory.Exists(p); p = Path.GetDirectoryName(p)) created.Add(p);
        try { Directory.CreateDirectory(parent); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or NotSupportedException)
        { throw new OutputException(shown, $"cannot create the parent folder ({e.Message})"); }
        return created;
    }

    private static void RemoveCreated(List<string> created)
    {
        foreach (var p in created)   // innermost first
            try { if (Directory.Exists(p) && !Directory.EnumerateFileSystemEntries(p).Any()) Directory.Delete(p); }
            catch (IOException) { return; }
            catch (UnauthorizedAccessException) { return; }
    }

    private static bool Within(string path, string folder)
        => path.Length > folder.Length && path.StartsWith(folder, StringComparison.Ordinal) && path[folder.Length] == Path.DirectorySeparatorChar;

}

/// <summary>Temporary folders of this process, removed on every exit path: by their owner's <c>Dispose</c> on success or
/// failure, and by <see cref="CleanAll"/> from the command's interrupt handler (SIGINT, SIGTERM).</summary>
public static class Scratch
{
    private static readonly Dictionary<string, string?> Live = new(StringComparer.Ordinal);
    private static volatile bool _aborted;

    /// <summary>True once <see cref="CleanAll"/> has run: no new temporary folder may be registered, nothing moved into place.</summary>
    public static bool Aborted => _aborted;

    /// <summary>Throws <see cref="OperationCanceledException"/> after an interrupt (see <see cref="Aborted"/>).</summary>
    public static void ThrowIfAborted()
    {
        if (_aborted) throw new OperationCanceledException("interrupted");
    }

    /// <summary>Registers a folder; disposing the handle unregisters it (it is not deleted by disposing).</summary>
    /// <param name="path">The temporary folder.</param>
    /// <param name="restoreTo">When set, an interrupt moves the folder back here (an earlier output moved aside) instead of deleting it.</param>
    public static IDisposable Register(string path, string? restoreTo = null)
    {
        ThrowIfAborted();
        lock (Live) Live[path] = restoreTo;
        return new Handle(path);
    }

    /// <summary>Deletes a folder if it exists, ignoring a failure (a later run removes what is left).</summary>
    public static void Delete(string path)
    {
        try { if (Directory.Exists(path)) Directory.Delete(path, recursive: true); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }

    /// <summary>Removes every registered folder (moving an earlier output that was set aside back into place when nothing has
    /// replaced it yet), retrying while other threads may still write.</summary>
    /// <returns>How many folders were registered (0: nothing was unfinished).</returns>
    public static int CleanAll()
    {
        _aborted = true;
        KeyValuePair<string, string?>[] all;
        lock (Live) all = [.. Live];
        for (int round = 0, quiet = 0; round < 40 && quiet < 3; round++)
        {
            bool any = false;
            foreach (var (path, restore) in all)
            {
                if (!Directory.Exists(path)) continue;
                any = true;
                if (restore is not null && !Directory.Exists(restore)) { try { Directory.Move(path, restore); } catch (IOException) { } continue; }
                Delete(path);
            }
            quiet = any ? 0 : quiet + 1;
            Thread.Sleep(any ? 20 : 10);
        }
        return all.Length;
    }

    /// <summary>Whether a process with this id runs (and is not this tool's earlier, dead run whose id was reused by another program).</summary>
    public static bool IsAlive(int pid)
    {
        if (pid == Environment.ProcessId) return true;
        string cmd = $"/proc/{pid}/cmdline";
        if (Directory.Exists("/proc/self")) return File.Exists(cmd) && SafeRead(cmd).Contains("shapenoise", StringComparison.OrdinalIgnoreCase);
        try { using var p = System.Diagnostics.Process.GetProcessById(pid); return !p.HasExited; }
        catch (ArgumentException) { return false; }
    }

    private static string SafeRead(string file)
    {
        try { return File.ReadAllText(file); } catch (IOException) { return ""; } catch (UnauthorizedAccessException) { return ""; }
    }

    private sealed class Handle(string path) : IDisposable
    {
        public void Dispose() { lock (Live) Live.Remove(path); }
    }
}
