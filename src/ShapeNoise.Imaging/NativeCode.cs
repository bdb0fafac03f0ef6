using System.Runtime.InteropServices;

namespace ShapeNoise.Imaging;

/// <summary>Where the image library's native code is found. The JIT-compiled command finds it through its dependency manifest
/// (runtimes/&lt;rid&gt;/native/); the ahead-of-time compiled command (scripts/publish.sh) has no manifest and carries the
/// library beside its executable, so it is loaded from there.</summary>
public static class NativeCode
{
    private const string OpenCvLibrary = "OpenCvSharpExtern";
    private static int _registered;

    /// <summary>Loads the image library from the application's folder when it is there; otherwise the runtime's own probing
    /// applies. Call once at start-up, before any image operation (later calls do nothing).</summary>
    public static void UseApplicationFolder()
    {
        if (Interlocked.Exchange(ref _registered, 1) != 0) return;
        NativeLibrary.SetDllImportResolver(typeof(OpenCvSharp.Mat).Assembly, (name, _, _) =>
        {
            if (name != OpenCvLibrary) return IntPtr.Zero;
            string path = Path.Combine(AppContext.BaseDirectory, $"lib{OpenCvLibrary}.so");
            return File.Exists(path) && NativeLibrary.TryLoad(path, out var handle) ? handle : IntPtr.Zero;
        });
    }
}
