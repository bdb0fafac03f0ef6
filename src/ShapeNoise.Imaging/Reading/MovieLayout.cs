using System.Text.Json;
using System.Xml.Linq;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>One series of a TIFF file (an OME <c>Image</c>, a tifffile series, or the whole file): its time, z and
/// channel sizes, the page holding each plane, and its scale.</summary>
/// <param name="SizeT">Time points.</param>
/// <param name="SizeZ">Z planes.</param>
/// <param name="SizeC">Channels.</param>
/// <param name="Pages">Page index of plane (t, z, c) at <c>(t * SizeZ + z) * SizeC + c</c>; -1 where no page is mapped.</param>
/// <param name="Scale">Pixel size and frame interval of this series.</param>
internal sealed record SeriesLayout(int SizeT, int SizeZ, int SizeC, int[] Pages, MovieMetadata.Scale Scale)
{
    /// <summary>Page index of plane (t, z, c), or -1.</summary>
    public int Page(int t, int z, int c) => Pages[(t * SizeZ + z) * SizeC + c];
}

/// <summary>How the pages of a TIFF file map to series, time, z and channel, read from its first page's
/// ImageDescription: OME-XML (OME-TIFF), an ImageJ header, a tifffile JSON description, or none (one page a frame).</summary>
/// <param name="Kind">"OME-TIFF", "ImageJ hyperstack", "tifffile" or "TIFF": names the layout in messages.</param>
/// <param name="Series">The series, in file order.</param>
/// <remarks>ImageJ hyperstacks store their pages with C varying fastest, then Z, then T (tifffile's documentation of
/// <c>imwrite(imagej=True)</c>: "data shapes up to 6 dimensions in TZCYXS order"). OME-TIFF: plane order by
/// <c>Pixels/@DimensionOrder</c> (XYZCT: Z fastest) and <c>TiffData</c> IFD/FirstZ/FirstC/FirstT/PlaneCount
/// (OME-TIFF specification; OME Data Model 2016-06 schema: IFD default 0, PlaneCount default 1 when IFD is given, else
/// every plane).</remarks>
internal sealed record MovieLayout(string Kind, IReadOnlyList<SeriesLayout> Series)
{
    /// <summary>Reads the layout of a file's pages.</summary>
    public static MovieLayout Of(string path, IReadOnlyList<TiffPage> pages)
    {
        var p0 = pages[0];
        string? d = p0.Description;
        if (!string.IsNullOrWhiteSpace(d))
        {
            if (MovieMetadata.OmeDocument(path, d) is { } doc) return Ome(path, doc, pages.Count);
            if (d.StartsWith("ImageJ=", StringComparison.Ordinal)) return ImageJ(path, d, pages);
            if (d.TrimStart().StartsWith('{') && d.Contains("\"shape\"", StringComparison.Ordinal)) return Shaped(path, pages);
        }
        return new MovieLayout("TIFF", [Sequential(pages.Count, 1, 1, MovieMetadata.FromPage(path, p0))]);
    }

    private static SeriesLayout Sequential(int t, int z, int c, MovieMetadata.Scale scale, int first = 0)
    {
        var p = new int[t * z * c];
        for (int i = 0; i < p.Length; i++) p[i] = first + i;
        return new SeriesLayout(t, z, c, p, scale);
    }

    private static MovieLayout ImageJ(string path, string description, IReadOnlyList<TiffPage> pages)
    {
        var kv = MovieMetadata.ImageJKeys(description);
        int Key(string name)
        {
            if (!kv.TryGetValue(name, out var v)) return 1;
            return int.TryParse(v, System.Globalization.NumberStyles.Integer, System.Globalization.CultureInfo.InvariantCulture, out var n) && n >= 1 ? n
                : throw new InputException(path, $"ImageJ header has {name}={v}, not a positive whole number");
        }
        int c = Key("channels"), z = Key("slices"), t = Key("frames");
        long product = (long)c * z * t;
        int images = kv.ContainsKey("images") ? Key("images") : (int)Math.Min(product, int.MaxValue);
        // ImageJ writes a plain stack as images=N slices=N; a header with images=N alone is read the same way (N slices).
        if (product == 1 && images > 1) { z = images; product = images; }
        if (product != images)
            throw new InputException(path, $"ImageJ header says images={images} but channels={c} x slices={z} x frames={t} = {product}");
        if (images != pages.Count)
            throw new InputException(path, $"ImageJ header says images={images} but the file has {pages.Count} page(s)");
        return new MovieLayout("ImageJ hyperstack", [Sequential(t, z, c, MovieMetadata.FromPage(path, pages[0]))]);
    }

    private static MovieLayout Shaped(string path, IReadOnlyList<TiffPage> pages)
    {
        // tifffile's shaped series: the first page of each series carries {"shape": [...], "axes": "..."?} (JSON).
        var series = new List<SeriesLayout>();
        int at = 0;
        while (at < pages.Count)
        {
            var d = pages[at].Description;
            if (d is null || !d.TrimStart().StartsWith('{'))
                throw new InputException(path, $"tifffile descriptions cover {at} of {pages.Count} pages; page {at + 1} starts no series");
            int[] shape; string? axes = null;
            try
            {
                using var j = JsonDocument.Parse(d);
                shape = j.RootElement.GetProperty("shape").EnumerateArray().Select(e => e.GetInt32()).ToArray();
                if (j.RootElement.TryGetProperty("axes", out var a) && a.ValueKind == JsonValueKind.String) axes = a.GetString();
            }
            catch (Exception e) when (e is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw new InputException(path, $"page {at + 1}: tifffile JSON description cannot be read ({e.Message})");
            }
            int lead = pages[at].SamplesPerPixel > 1 ? shape.Length - 3 : shape.Length - 2;
            int t = 1, z = 1, c = 1, unknown = 0, count = 1;
            for (int k = 0; k < Math.Max(lead, 0); k++)
            {
                count *= shape[k];
                char ax = axes is not null && axes.Length == shape.Length ? axes[k] : '?';
                switch (ax)
                {
                    case 'T': t *= shape[k]; break;
                    case 'Z': z *= shape[k]; break;
                    case 'C': c *= shape[k]; break;
                    default: if (shape[k] > 1) { unknown++; t *= shape[k]; } break;
                }
            }
            if (unknown > 1 || (unknown == 1 && (z > 1 || c > 1)))
                throw new InputException(path, $"tifffile description gives shape [{string.Join(", ", shape)}] without naming the axes: which dimension is time is unknown (save it as an ImageJ hyperstack or OME-TIFF with axes)");
            if (at + count > pages.Count)
                throw new InputException(path, $"tifffile description of the series at page {at + 1} gives {count} pages but only {pages.Count - at} remain");
            // Row-major order of the leading axes: with T, Z, C in that order (TZCYX, TZYX, TCYX) the page of (t, z, c) is (t*Z + z)*C + c.
            if (axes is not null && axes.Length == shape.Length && !InOrder(axes))
                throw new InputException(path, $"tifffile axes '{axes}' are not in T, Z, C order; save the file as an ImageJ hyperstack or OME-TIFF");
            series.Add(Sequential(t, z, c, MovieMetadata.FromPage(path, pages[at]), at));
            at += count;
        }
        return new MovieLayout("tifffile", series);
    }

    private static bool InOrder(string axes)
    {
        int last = -1;
        foreach (char a in axes)
        {
            int r = a switch { 'T' => 0, 'Z' => 1, 'C' => 2, _ => -1 };
            if (r < 0) continue;
            if (r < last) return false;
            last = r;
        }
        return true;
    }

    private static MovieLayout Ome(string path, XDocument doc, int pageCount)
    {
        var images = doc.Root?.Elements().Where(e => e.Name.LocalName == "Image").ToList() ?? [];
        if (images.Count == 0) return new MovieLayout("OME-TIFF", [Sequential(pageCount, 1, 1, new MovieMetadata.Scale(null, null, "OME-XML"))]);
        var series = new List<SeriesLayout>();
        int next = 0;   // without TiffData, series follow one another
        string file = Path.GetFileName(path);
        foreach (var image in images)
        {
            var px = image.Elements().FirstOrDefault(e => e.Name.LocalName == "Pixels")
                     ?? throw new InputException(path, $"OME-XML Image '{(string?)image.Attribute("ID")}' has no Pixels element");
            int Size(string name)
            {
                var v = (string?)px.Attribute(name);
                if (v is null) return 1;
                return int.TryParse(v, System.Globalization.NumberStyles.Integer, System.Globalization.CultureInfo.InvariantCulture, out var n) && n >= 1 ? n
                    : throw new InputException(path, $"OME-XML Pixels has {name}=\"{v}\", not a positive whole number");
            }
            int sz = Size("SizeZ"), sc = Size("SizeC"), st = Size("SizeT");
            string order = (string?)px.Attribute("DimensionOrder") ?? "XYZCT";
            if (order.Length != 5 || !order.StartsWith("XY", StringComparison.Ordinal) || order.IndexOf('Z') < 2 || order.IndexOf('C') < 2 || order.IndexOf('T') < 2)
                throw new InputException(path, $"OME-XML DimensionOrder '{order}' is not one of XYZCT, XYZTC, XYCZT, XYCTZ, XYTZC, XYTCZ");
            int n = sz * sc * st;
            var map = new int[n];
            Array.Fill(map, -1);
            int SizeOf(char a) => a == 'Z' ? sz : a == 'C' ? sc : st;
            // Plane p in dimension order: index of the fastest axis order[2] = p % S2, then order[3], then order[4].
            void Assign(int plane, int page)
            {
                int i2 = plane % SizeOf(order[2]), r = plane / SizeOf(order[2]);
                int i3 = r % SizeOf(order[3]), i4 = r / SizeOf(order[3]);
                int z = 0, c = 0, t = 0;
                foreach (var (ax, v) in new[] { (order[2], i2), (order[3], i3), (order[4], i4) })
                    if (ax == 'Z') z = v; else if (ax == 'C') c = v; else t = v;
                map[(t * sz + z) * sc + c] = page;
            }
            int Linear(int z, int c, int t)
            {
                int Of(char a) => a == 'Z' ? z : a == 'C' ? c : t;
                return Of(order[2]) + SizeOf(order[2]) * (Of(order[3]) + SizeOf(order[3]) * Of(order[4]));
            }
            var tiffData = px.Elements().Where(e => e.Name.LocalName == "TiffData").ToList();
            if (tiffData.Count == 0)
            {
                for (int p = 0; p < n; p++) Assign(p, next + p);
                next += n;
            }
            foreach (var td in tiffData)
            {
                var uuid = td.Elements().FirstOrDefault(e => e.Name.LocalName == "UUID");
                if ((string?)uuid?.Attribute("FileName") is { } other && !string.Equals(other, file, StringComparison.Ordinal))
                    throw new InputException(path, $"OME-XML maps planes to another file '{other}' (multi-file OME-TIFF is not supported; give the file holding the planes as one OME-TIFF)");
                int A(string name, int dflt) => int.TryParse((string?)td.Attribute(name), System.Globalization.NumberStyles.Integer, System.Globalization.CultureInfo.InvariantCulture, out var v) ? v : dflt;
                bool hasIfd = td.Attribute("IFD") is not null;
                int ifd = A("IFD", 0), fz = A("FirstZ", 0), fc = A("FirstC", 0), ft = A("FirstT", 0);
                int count = A("PlaneCount", hasIfd ? 1 : n);
                if (ifd < 0 || count < 0 || fz < 0 || fz >= sz || fc < 0 || fc >= sc || ft < 0 || ft >= st)
                    throw new InputException(path, $"OME-XML TiffData (IFD={ifd}, FirstZ={fz}, FirstC={fc}, FirstT={ft}, PlaneCount={count}) lies outside SizeZ={sz}, SizeC={sc}, SizeT={st}");
                int p0 = Linear(fz, fc, ft);
                if (p0 + count > n)
                    throw new InputException(path, $"OME-XML TiffData at IFD {ifd} maps {count} planes from plane {p0}, but the image has only {n}");
                for (int k = 0; k < count; k++) Assign(p0 + k, ifd + k);
            }
            series.Add(new SeriesLayout(st, sz, sc, map, MovieMetadata.FromOmePixels(path, px)));
        }
        return new MovieLayout("OME-TIFF", series);
    }
}
