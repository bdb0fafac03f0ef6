namespace ShapeNoise.Reporting;

/// <summary>Path helpers shared by the output-folder rules and compare's one-movie-once rule.</summary>
public static class FilePaths
{
    /// <summary>The absolute path with every symbolic link along it resolved (as realpath(3) does), without a trailing
    /// separator; components that do not exist are kept as they are.</summary>
    public static string Real(string path)
    {
        string full = Path.GetFullPath(path);
        string root = Path.GetPathRoot(full)!;
        string current = root;
        foreach (var part in full[root.Length..].Split(Path.DirectorySeparatorChar, StringSplitOptions.RemoveEmptyEntries))
        {
            current = Path.Combine(current, part);
            FileSystemInfo info = Directory.Exists(current) ? new DirectoryInfo(current) : new FileInfo(current);
            if (info.LinkTarget is not null && info.ResolveLinkTarget(returnFinalTarget: true) is { } target)
                current = Real(target.FullName);   // a link's target may itself pass through links
        }
        return Path.TrimEndingDirectorySeparator(current);
    }
}
