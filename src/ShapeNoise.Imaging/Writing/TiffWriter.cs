using System.Buffers.Binary;
using System.IO.Compression;

namespace ShapeNoise.Imaging.Writing;

/// <summary>Writes multi-page grayscale TIFF files (little-endian, one strip per page, optional Deflate), with an
/// ImageDescription on the first page (for OME-XML). Deterministic: the same pages give the same bytes.</summary>
/// <remarks>Adobe Systems (1992), TIFF Revision 6.0; Deflate per the Adobe TIFF Technical Notes (1995).</remarks>
public static class TiffWriter
{
    /// <summary>Pixel encodings this writer supports.</summary>
    public enum PixelType
    {
        /// <summary>8-bit unsigned integer samples (BitsPerSample 8, SampleFormat 1); values outside 0..255 throw.</summary>
        UInt8,
        /// <summary>16-bit unsigned integer samples (BitsPerSample 16, SampleFormat 1); values outside 0..65535 throw.</summary>
        UInt16,
        /// <summary>32-bit unsigned integer samples (BitsPerSample 32, SampleFormat 1); negative values throw.</summary>
        UInt32,
        /// <summary>32-bit IEEE floating-point samples (BitsPerSample 32, SampleFormat 3), holding the integer values.</summary>
        Float32,
    }

    /// <summary>Writes <paramref name="pages"/> (row-major values, each Width x Height) to <paramref name="path"/>.</summary>
    public static void Write(string path, int width, int height, IEnumerable<int[]> pages, PixelType type = PixelType.UInt16,
        string? description = null, bool deflate = true)
    {
        using var fs = new FileStream(path, FileMode.Create, FileAccess.Write);
        using var bw = new BinaryWriter(fs);
        bw.Write((byte)'I'); bw.Write((byte)'I'); bw.Write((ushort)42);
        long nextIfdPointer = 4; bw.Write(0u);
        int bps = type switch { PixelType.UInt8 => 8, PixelType.UInt16 => 16, _ => 32 };
        byte[]? desc = description is null ? null : System.Text.Encoding.UTF8.GetBytes(description + "\0");
        int index = 0;
        foreach (var page in pages)
        {
            if (page.Length != width * height) throw new ArgumentException("page size does not match width x height");
            var raw = Encode(page, type);
            var data = deflate ? Compress(raw) : raw;
            long dataOffset = fs.Position;
            bw.Write(data);
            if ((fs.Position & 1) != 0) bw.Write((byte)0);
            long descOffset = 0;
            if (index == 0 && desc is not null) { descOffset = fs.Position; bw.Write(desc); if ((fs.Position & 1) != 0) bw.Write((byte)0); }
            var entries = new List<(ushort Tag, ushort Type, uint Count, uint Value)>
            {
                (256, 4, 1, (uint)width), (257, 4, 1, (uint)height), (258, 3, 1, (uint)bps),
                (259, 3, 1, deflate ? 8u : 1u), (262, 3, 1, 1),
            };
            if (index == 0 && desc is not null) entries.Add((270, 2, (uint)desc.Length, (uint)descOffset));
            entries.Add((273, 4, 1, (uint)dataOffset));
            entries.Add((277, 3, 1, 1));
            entries.Add((278, 4, 1, (uint)height));
            entries.Add((279, 4, 1, (uint)data.Length));
            entries.Add((339, 3, 1, type == PixelType.Float32 ? 3u : 1u));
            long ifd = fs.Position;
            fs.Position = nextIfdPointer; bw.Write((uint)ifd); fs.Position = ifd;
            bw.Write((ushort)entries.Count);
            foreach (var e in entries)
            {
                bw.Write(e.Tag); bw.Write(e.Type); bw.Write(e.Count);
                if (e.Type == 3 && e.Count == 1) { bw.Write((ushort)e.Value); bw.Write((ushort)0); }
                else bw.Write(e.Value);
            }
            nextIfdPointer = fs.Position; bw.Write(0u);
            index++;
        }
    }

    private static byte[] Encode(int[] page, PixelType type)
    {
        switch (type)
        {
            case PixelType.UInt8:
            {
                var b = new byte[page.Length];
                for (int i = 0; i < page.Length; i++) b[i] = checked((byte)page[i]);
                return b;
            }
            case PixelType.UInt16:
            {
                var b = new byte[page.Length * 2];
                for (int i = 0; i < page.Length; i++) BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(2 * i), checked((ushort)page[i]));
                return b;
            }
            case PixelType.UInt32:
            {
                var b = new byte[page.Length * 4];
                for (int i = 0; i < page.Length; i++) BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(4 * i), checked((uint)page[i]));
                return b;
            }
            default:
            {
                var b = new byte[page.Length * 4];
                for (int i = 0; i < page.Length; i++) BinaryPrimitives.WriteSingleLittleEndian(b.AsSpan(4 * i), page[i]);
                return b;
            }
        }
    }

    private static byte[] Compress(byte[] raw)
    {
        using var ms = new MemoryStream();
        using (var z = new ZLibStream(ms, CompressionLevel.SmallestSize, leaveOpen: true)) z.Write(raw);
        return ms.ToArray();
    }

    /// <summary>OME-XML (2016-06 schema) for a single-channel time series, SizeZ = SizeC = 1, DimensionOrder XYZCT, one
    /// IFD per frame from IFD 0: PhysicalSizeX = PhysicalSizeY = <paramref name="pixelSizeUm"/> with unit "µm" and
    /// TimeIncrement = <paramref name="frameIntervalMin"/> with unit "min". A scale that is unknown (null, not finite or
    /// not above 0) is left out, never guessed, so readers fall back to pixels and frames (docs/inputs.md#written-tiffs).</summary>
    /// <remarks>Open Microscopy Environment, OME Data Model and File Formats, schema 2016-06 (Pixels, Channel, TiffData);
    /// Goldberg et al. (2005), Genome Biology 6:R47; Linkert et al. (2010), J. Cell Biol. 189:777.</remarks>
    public static string OmeXml(int width, int height, int frames, string pixelType, double? pixelSizeUm, double? frameIntervalMin)
    {
        var ci = System.Globalization.CultureInfo.InvariantCulture;
        string size = pixelSizeUm is { } s && double.IsFinite(s) && s > 0
            ? $" PhysicalSizeX=\"{s.ToString("R", ci)}\" PhysicalSizeXUnit=\"µm\" PhysicalSizeY=\"{s.ToString("R", ci)}\" PhysicalSizeYUnit=\"µm\"" : "";
        string dt = frameIntervalMin is { } t && double.IsFinite(t) && t > 0
            ? $" TimeIncrement=\"{t.ToString("R", ci)}\" TimeIncrementUnit=\"min\"" : "";
        return "<?xml version=\"1.0\" encoding=\"UTF-8\"?>" +
               "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\"" +
               " xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\"" +
               " xsi:schemaLocation=\"http://www.openmicroscopy.org/Schemas/OME/2016-06 http://www.openmicroscopy.org/Schemas/OME/2016-06/ome.xsd\">" +
               "<Image ID=\"Image:0\" Name=\"labels\">" +
               $"<Pixels ID=\"Pixels:0\" DimensionOrder=\"XYZCT\" Type=\"{pixelType}\" SizeX=\"{width}\" SizeY=\"{height}\" SizeZ=\"1\" SizeC=\"1\" SizeT=\"{frames}\"{size}{dt}>" +
               "<Channel ID=\"Channel:0:0\" SamplesPerPixel=\"1\"/>" +
               $"<TiffData IFD=\"0\" PlaneCount=\"{frames}\"/>" +
               "</Pixels></Image></OME>";
    }
}
