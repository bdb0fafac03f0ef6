using System.Buffers.Binary;
using System.Diagnostics;
using ShapeNoise.Imaging.Reading;
using ShapeNoise.Reading;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Reading;

/// <summary>
/// Seeded fuzzing of the TIFF reader through the CLI's entry point (<see cref="LabelMovies.Open"/>): mutants of four small
/// valid corpus files (classic Deflate strips, tiled LZW, big-endian BigTIFF strips, PackBits) must either decode or be
/// refused with an <see cref="InputException"/> (exit 2), never another exception (exit 1) or an ArgumentException (the
/// CLI's exit 64). IFD positions follow the TIFF 6.0 specification (section 2) and the BigTIFF specification.
/// </summary>
public class TiffFuzzTests(ITestOutputHelper output)
{
    private static readonly string[] Seeds = ["deflate_pred2.tif", "tiffcp_tiled16_lzw.tif", "bigtiff_bigendian_strips.tif", "tiffcp_packbits.tif"];
    private static readonly int[] LayoutTags = [256, 257, 258, 259, 273, 277, 278, 279, 284, 317, 322, 323, 324, 325, 339];

    private sealed record Entry(int At, int Tag, int Type, int CountAt, int ValueAt);

    /// <summary>The IFD entries of page 1 (TIFF 6.0 section 2; BigTIFF: 8-byte counts and offsets, 20-byte entries).</summary>
    private static (bool Little, bool Big, List<Entry> Entries) Parse(byte[] d)
    {
        bool le = d[0] == 'I';
        ushort U16(int o) => le ? BinaryPrimitives.ReadUInt16LittleEndian(d.AsSpan(o)) : BinaryPrimitives.ReadUInt16BigEndian(d.AsSpan(o));
        bool big = U16(2) == 43;
        long ifd = big ? (long)(le ? BinaryPrimitives.ReadUInt64LittleEndian(d.AsSpan(8)) : BinaryPrimitives.ReadUInt64BigEndian(d.AsSpan(8)))
                       : (le ? BinaryPrimitives.ReadUInt32LittleEndian(d.AsSpan(4)) : BinaryPrimitives.ReadUInt32BigEndian(d.AsSpan(4)));
        int n = big ? (int)(le ? BinaryPrimitives.ReadUInt64LittleEndian(d.AsSpan((int)ifd)) : BinaryPrimitives.ReadUInt64BigEndian(d.AsSpan((int)ifd))) : U16((int)ifd);
        int start = (int)ifd + (big ? 8 : 2), size = big ? 20 : 12;
        var list = new List<Entry>();
        for (int i = 0; i < n; i++)
        {
            int e = start + i * size;
            list.Add(new Entry(e, U16(e), U16(e + 2), e + 4, e + (big ? 12 : 8)));
        }
        return (le, big, list);
    }

    private static void Put(byte[] d, int at, int bytes, ulong v, bool le)
    {
        var s = d.AsSpan(at, bytes);
        switch (bytes)
        {
            case 2: if (le) BinaryPrimitives.WriteUInt16LittleEndian(s, (ushort)v); else BinaryPrimitives.WriteUInt16BigEndian(s, (ushort)v); break;
            case 4: if (le) BinaryPrimitives.WriteUInt32LittleEndian(s, (uint)v); else BinaryPrimitives.WriteUInt32BigEndian(s, (uint)v); break;
            default: if (le) BinaryPrimitives.WriteUInt64LittleEndian(s, v); else BinaryPrimitives.WriteUInt64BigEndian(s, v); break;
        }
    }

    private static (byte[] Data, string What) Mutate(byte[] seed, Random rng)
    {
        var d = (byte[])seed.Clone();
        var (le, big, entries) = Parse(seed);
        ulong[] interesting = [0, 1, 2, 3, 7, 8, 15, 16, 31, 32, 64, 255, 0xFFFF, 0x10000, 100_000, (ulong)d.Length - 1, (ulong)d.Length, (ulong)d.Length + 1,
            0x7FFF_FFFF, 0x8000_0000, 0xFFFF_FFFF, 0x1_0000_0000, 0x7FFF_FFFF_FFFF_FFFF, 0x8000_0000_0000_0000, ulong.MaxValue];
        ulong Pick() => rng.Next(3) == 0 ? (ulong)rng.NextInt64() : interesting[rng.Next(interesting.Length)];
        switch (rng.Next(6))
        {
            case 0:
            {
                int k = 1 + rng.Next(8);
                for (int i = 0; i < k; i++) d[rng.Next(d.Length)] = (byte)rng.Next(256);
                return (d, $"{k} random bytes");
            }
            case 1:
            {
                int len = rng.Next(d.Length);
                return (d[..len], $"truncated to {len} bytes");
            }
            case 2:
            case 3:
            {
                var layout = entries.Where(e => LayoutTags.Contains(e.Tag)).ToList();
                var e = layout[rng.Next(layout.Count)];
                ulong v = Pick();
                int width = e.Type == 3 ? 2 : e.Type == 16 ? 8 : 4;
                Put(d, e.ValueAt, big && width == 4 && rng.Next(2) == 0 ? 8 : width, v, le);
                return (d, $"tag {e.Tag} value := {v}");
            }
            case 4:
            {
                var e = entries[rng.Next(entries.Count)];
                ulong v = Pick();
                Put(d, e.CountAt, big ? 8 : 4, v, le);
                if (rng.Next(2) == 0) Put(d, e.At + 2, 2, (ulong)rng.Next(20), le);   // and its type
                return (d, $"tag {e.Tag} count := {v}");
            }
            default:
            {
                ulong v = Pick();
                if (rng.Next(2) == 0) { Put(d, big ? 8 : 4, big ? 8 : 4, v, le); return (d, $"first IFD offset := {v}"); }
                var e = entries[^1];
                Put(d, e.At + (big ? 20 : 12), big ? 8 : 4, v, le);   // next-IFD offset of page 1
                return (d, $"next IFD offset := {v}");
            }
        }
    }

    private static string Kind(string problem) =>
        problem.Contains("too large") ? "too large"
        : problem.Contains("do not cover") ? "strips/tiles do not cover"
        : problem.Contains("truncated") || problem.Contains("beyond the end") ? "truncated / beyond the end"
        : problem.Contains("corrupt pixel data") ? "corrupt compressed data"
        : problem.Contains("compression") ? "unsupported compression"
        : problem.Contains("predictor") ? "unsupported predictor"
        : problem.Contains("negative") || problem.Contains("does not fit") ? "label value"
        : problem.Contains("-bit") || problem.Contains("floating-point") || problem.Contains("sample format") || problem.Contains("samples per pixel") ? "sample type"
        : problem.Contains("not a TIFF") ? "not a TIFF"
        : problem.Contains("all background") || problem.Contains("empty") ? "empty frame"
        : problem.Contains("page 1 is") ? "page sizes differ"
        : problem.Contains(" claims ") ? "absurd entry or value count"
        : problem.Contains("corrupt TIFF directory") || problem.Contains("loops back") ? "corrupt directory (size, tiles, offsets)"
        : "other: " + problem;

    [Fact]
    public async Task Open_400SeededMutants_DecodeOrInputExceptionOnly()
    {
        // Fixed seed: the same 400 mutants every run.
        var rng = new Random(20240611);
        using var dir = new TempDir();
        var counts = new SortedDictionary<string, int>();
        var failures = new List<string>();
        long maxAllocated = 0;
        int perSeed = 100;
        foreach (var seedName in Seeds)
        {
            var seed = File.ReadAllBytes(Path.Combine(TiffContainerTests.CorpusDir, seedName));
            for (int m = 0; m < perSeed; m++)
            {
                var (data, what) = Mutate(seed, rng);
                string file = dir[$"mutant-{seedName[..^4]}-{m:D3}.tif"];
                File.WriteAllBytes(file, data);
                string? outcome = null;
                long allocated = 0;
                var work = Task.Run(() =>
                {
                    long before = GC.GetAllocatedBytesForCurrentThread();
                    try
                    {
                        using var movie = LabelMovies.Open(file);
                        foreach (var f in movie.Frames()) GC.KeepAlive(f);
                        outcome = "decoded";
                    }
                    catch (InputException e) { outcome = Kind(e.Problem); if (!e.Message.Contains(Path.GetFileName(file)) || e.Message.Contains('\n')) failures.Add($"{seedName} [{what}]: message '{e.Message}'"); }
                    catch (Exception e) { failures.Add($"{seedName} [{what}]: {e.GetType().Name}: {e.Message}"); outcome = "FAILED"; }
                    allocated = GC.GetAllocatedBytesForCurrentThread() - before;
                });
                // A hang guard, not a speed check: the slowest mutant takes milliseconds.
                if (await Task.WhenAny(work, Task.Delay(TimeSpan.FromSeconds(10))) != work) { failures.Add($"{seedName} [{what}]: still running after 10 s"); continue; }
                maxAllocated = Math.Max(maxAllocated, allocated);
                if (allocated > 200L << 20) failures.Add($"{seedName} [{what}]: allocated {allocated >> 20} MB");
                counts[outcome!] = counts.GetValueOrDefault(outcome!) + 1;
                File.Delete(file);
            }
        }
        foreach (var (k, v) in counts) output.WriteLine($"{v,4}  {k}");
        output.WriteLine($"largest allocation by one mutant: {maxAllocated / 1024.0:F0} KiB");
        Assert.True(failures.Count == 0, string.Join("\n", failures));
        Assert.Empty(Directory.EnumerateFileSystemEntries(dir.Path));   // the reader leaves nothing behind
        Assert.Equal(Seeds.Length * perSeed, counts.Values.Sum());
        Assert.True(counts.GetValueOrDefault("decoded") > 0 && counts.Count > 4, "the mutants must exercise both outcomes");
    }
}
