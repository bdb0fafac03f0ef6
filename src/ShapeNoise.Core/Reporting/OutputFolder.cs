using ShapeNoise.Reading;

namespace ShapeNoise.Reporting;

/// <summary>Writes an output folder atomically: everything goes to a hidden temporary folder beside the target, which is
/// renamed into place only when complete, so a failed run never leaves a half-written folder.</summary>
public static class OutputFolder
{
    /// <summary>Runs <paramref name="write"/> on a fresh temporary folder, then moves it to <paramref name="target"/>
    /// (replacing an earlier output folder there). Throws <see cref="OutputException"/> when the target cannot be written.</summary>
    public static void Write(string target, Action<string> write)
    {
        string full = Path.GetFullPath(target.TrimEnd('/', Path.DirectorySeparatorChar));
        string parent = Path.GetDirectoryName(full) ?? throw new OutputException(target, "has no parent folder");
        string name = Path.GetFileName(full);
        if (File.Exists(full)) throw new OutputException(target, "exists and is a file, not a folder");
        try { Directory.CreateDirectory(parent); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or NotSupportedException)
        { throw new OutputException(target, $"cannot create the parent folder ({e.Message})"); }
        string temp = Path.Combine(parent, $".{name}.partial-{Environment.ProcessId}-{Guid.NewGuid():N}");
        try { Directory.CreateDirectory(temp); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        { throw new OutputException(target, $"output folder is not writable ({e.Message})"); }
        try
        {
            write(temp);
            string? old = null;
            if (Directory.Exists(full))
            {
                old = Path.Combine(parent, $".{name}.old-{Guid.NewGuid():N}");
                Directory.Move(full, old);
            }
            Directory.Move(temp, full);
            if (old is not null) Directory.Delete(old, recursive: true);
        }
        catch (Exception e)
        {
            try { if (Directory.Exists(temp)) Directory.Delete(temp, recursive: true); } catch (IOException) { }
            if (e is IOException or UnauthorizedAccessException) throw new OutputException(target, $"writing failed ({e.Message})");
            throw;
        }
    }
}
