using System.Runtime.InteropServices;

namespace ShapeNoise.Tracking;

/// <summary>
/// Holds the body-frame radii of every outline of the open tracks in a temporary file (deleted on close) instead of in
/// memory, so memory stays flat however long the movie: each outline's M doubles are appended once and read back
/// once, when its track ends. Exact: the doubles are stored bit for bit.
/// </summary>
internal sealed class RadiusStore : IDisposable
{
    private readonly FileStream _file;
    private readonly int _rays;
    private long _length;
    private bool _dirty;

    /// <summary>Opens an empty store in a new temporary file for outlines of <paramref name="rays"/> radii (px) each.</summary>
    public RadiusStore(int rays)
    {
        _rays = rays;
        string path = Path.Combine(Path.GetTempPath(), $"shapenoise-radii-{Environment.ProcessId}-{Guid.NewGuid():N}.bin");
        _file = new FileStream(path, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 1 << 20, FileOptions.DeleteOnClose);
    }

    /// <summary>Appends one outline's radii; returns its index.</summary>
    public long Append(ReadOnlySpan<double> rho)
    {
        if (rho.Length != _rays) throw new ArgumentException($"expected {_rays} radii");
        _file.Write(MemoryMarshal.AsBytes(rho));
        _dirty = true;
        return _length++;
    }

    /// <summary>Writes the appended radii through to the file before any read.</summary>
    private void Flush()
    {
        if (_dirty) { _file.Flush(); _dirty = false; }
    }

    /// <summary>Reads outline <paramref name="index"/>'s radii into <paramref name="rho"/>.</summary>
    public void Read(long index, Span<double> rho)
    {
        Flush();
        int bytes = _rays * sizeof(double);
        int got = RandomAccess.Read(_file.SafeFileHandle, MemoryMarshal.AsBytes(rho[.._rays]), index * bytes);
        if (got != bytes) throw new IOException("temporary radius file was cut short");
    }

    /// <summary>Number of outlines stored.</summary>
    public long Count => _length;

    /// <summary>Reads every stored outline in index order, in large sequential blocks, handing each one's radii to
    /// <paramref name="each"/> (index, radii; the span is reused after the call).</summary>
    public void ReadAll(Action<long, ReadOnlySpan<double>> each)
    {
        Flush();
        const int block = 8192;
        var buffer = new double[block * _rays];
        for (long first = 0; first < _length; first += block)
        {
            int n = (int)Math.Min(block, _length - first);
            var bytes = MemoryMarshal.AsBytes(buffer.AsSpan(0, n * _rays));
            long offset = first * _rays * sizeof(double);
            while (bytes.Length > 0)
            {
                int got = RandomAccess.Read(_file.SafeFileHandle, bytes, offset);
                if (got <= 0) throw new IOException("temporary radius file was cut short");
                bytes = bytes[got..]; offset += got;
            }
            for (int i = 0; i < n; i++) each(first + i, buffer.AsSpan(i * _rays, _rays));
        }
    }

    /// <summary>Closes and so deletes the temporary file.</summary>
    public void Dispose() => _file.Dispose();
}
