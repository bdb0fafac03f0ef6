using System.Globalization;
using System.Xml.Linq;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Pixel size and frame interval from a TIFF's ImageDescription (OME-XML or an ImageJ header) and its
/// resolution tags.</summary>
/// <remarks>OME Data Model and file formats: Goldberg I.G. et al. (2005), Genome Biology 6:R47; attributes
/// Pixels/@PhysicalSizeX, @PhysicalSizeY (+Unit, default µm) and Pixels/@TimeIncrement (+Unit, default s) of the
/// 2016-06 schema. TIFF 6.0 tags XResolution (282), YResolution (283), ResolutionUnit (296: 1 none, 2 inch, 3 cm).</remarks>
internal static class MovieMetadata
{
    /// <summary>Parsed scale; nulls where the file says nothing.</summary>
    /// <param name="PixelSizeUm">Pixel width (um/px), or null.</param>
    /// <param name="FrameIntervalMin">Frame interval (min), or null.</param>
    /// <param name="Source">Where the values came from: "OME-XML", "ImageJ header", "TIFF resolution tags" or "none".</param>
    /// <param name="PixelSizeYUm">Pixel height (um/px), or null when unknown (then taken equal to the width).</param>
    public readonly record struct Scale(double? PixelSizeUm, double? FrameIntervalMin, string Source, double? PixelSizeYUm = null)
    {
        /// <summary>Source of the pixel size ("none" when it is unknown).</summary>
        public string PixelSizeSource => PixelSizeUm is null ? "none" : Source;
        /// <summary>Source of the frame interval ("none" when it is unknown).</summary>
        public string FrameIntervalSource => FrameIntervalMin is null ? "none" : Source;
    }

    /// <summary>Reads the scale from an ImageDescription; <paramref name="xResolution"/> (px per unit) is used for ImageJ
    /// headers, and taken for both axes.</summary>
    public static Scale FromDescription(string path, string? description, double xResolution)
        => FromDescription(path, description, xResolution, xResolution, 1);

    /// <summary>Reads the scale of a page: OME-XML, else an ImageJ header (unit key with X/YResolution), else plain TIFF
    /// resolution tags when ResolutionUnit is 3 (cm). Inch-based resolutions (unit 2, the TIFF default, usually a
    /// screen's 72 dpi) and unit 1 (none) are not a physical pixel size and are ignored.</summary>
    public static Scale FromPage(string path, TiffPage page)
        => FromDescription(path, page.Description, page.XResolution, page.YResolution, page.ResolutionUnit);

    private static Scale FromDescription(string path, string? description, double xres, double yres, int resolutionUnit)
    {
        if (!string.IsNullOrWhiteSpace(description))
        {
            if (OmeDocument(path, description) is { } doc)
            {
                var pixels = doc.Descendants().FirstOrDefault(e => e.Name.LocalName == "Pixels");
                return pixels is null ? new Scale(null, null, "none") : FromOmePixels(path, pixels);
            }
            if (description.StartsWith("ImageJ=", StringComparison.Ordinal)) return FromImageJ(ImageJKeys(description), xres, yres);
        }
        if (resolutionUnit == 3 && xres > 0)
        {
            double sx = 1e4 / xres, sy = yres > 0 ? 1e4 / yres : sx;
            return new Scale(sx, null, "TIFF resolution tags", sy);
        }
        return new Scale(null, null, "none");
    }

    /// <summary>The OME-XML document of a description, or null when the description is not OME-XML.</summary>
    public static XDocument? OmeDocument(string path, string description)
    {
        int ome = description.IndexOf("<OME", StringComparison.Ordinal);
        if (ome < 0) return null;
        int x = description.LastIndexOf("<?xml", ome, StringComparison.Ordinal);
        try { return XDocument.Parse(description[(x >= 0 ? x : ome)..]); }
        catch (System.Xml.XmlException e) { throw new InputException(path, $"OME-XML metadata is not well-formed ({e.Message})"); }
    }

    /// <summary>Pixel size (X and Y) and frame interval of one OME <c>Pixels</c> element.</summary>
    public static Scale FromOmePixels(string path, XElement pixels)
    {
        double? sx = Num(pixels, "PhysicalSizeX") is { } s ? s * LengthToUm(path, (string?)pixels.Attribute("PhysicalSizeXUnit") ?? "µm") : null;
        double? sy = Num(pixels, "PhysicalSizeY") is { } y ? y * LengthToUm(path, (string?)pixels.Attribute("PhysicalSizeYUnit") ?? "µm") : null;
        double? dt = Num(pixels, "TimeIncrement") is { } t ? t * TimeToMin(path, (string?)pixels.Attribute("TimeIncrementUnit") ?? "s") : null;
        if (dt is null)
        {
            // Fall back to the DeltaT of the first two planes.
            var planes = pixels.Elements().Where(e => e.Name.LocalName == "Plane" && e.Attribute("DeltaT") is not null).Take(2).ToList();
            if (planes.Count == 2 && Num(planes[0], "DeltaT") is { } t0 && Num(planes[1], "DeltaT") is { } t1 && t1 > t0)
                dt = (t1 - t0) * TimeToMin(path, (string?)planes[0].Attribute("DeltaTUnit") ?? "s");
        }
        sx = sx is > 0 ? sx : null;
        sy = sy is > 0 && sx is not null ? sy : null;
        return new Scale(sx, dt is > 0 ? dt : null, "OME-XML", sy);
    }

    private static double? Num(XElement e, string name)
        => double.TryParse((string?)e.Attribute(name), NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && double.IsFinite(v) ? v : null;

    /// <summary>Factor from an OME length unit to um.</summary>
    public static double LengthToUm(string path, string unit) => unit switch
    {
        "µm" or "um" or "μm" or "micron" or "microns" => 1,
        "nm" => 1e-3,
        "mm" => 1e3,
        "cm" => 1e4,
        "m" => 1e6,
        "Å" => 1e-4,
        _ => throw new InputException(path, $"OME-XML length unit '{unit}' is not supported (use µm, nm or mm)"),
    };

    /// <summary>Factor from an OME time unit to min.</summary>
    public static double TimeToMin(string path, string unit) => unit switch
    {
        "s" or "sec" => 1.0 / 60,
        "ms" => 1.0 / 60000,
        "min" => 1,
        "h" => 60,
        _ => throw new InputException(path, $"OME-XML time unit '{unit}' is not supported (use s, ms, min or h)"),
    };

    /// <summary>The key=value lines of an ImageJ header.</summary>
    public static Dictionary<string, string> ImageJKeys(string description)
    {
        var kv = new Dictionary<string, string>();
        foreach (var line in description.Split('\n'))
        {
            int eq = line.IndexOf('=');
            if (eq > 0) kv[line[..eq].Trim()] = line[(eq + 1)..].Trim();
        }
        return kv;
    }

    private static Scale FromImageJ(Dictionary<string, string> kv, double xres, double yres)
    {
        double? size = null, sizeY = null, dt = null;
        if (kv.TryGetValue("unit", out var u) && xres > 0)
        {
            double f = u switch { "micron" or "microns" or "um" or "µm" or "μm" or "\\u00B5m" => 1, "nm" => 1e-3, "mm" => 1e3, "cm" => 1e4, _ => double.NaN };
            if (double.IsFinite(f)) { size = f / xres; sizeY = yres > 0 ? f / yres : size; }
        }
        if (kv.TryGetValue("finterval", out var fi) && double.TryParse(fi, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && v > 0)
        {
            string tu = kv.GetValueOrDefault("tunit", "sec");
            double f = tu switch { "min" => 1, "h" or "hour" => 60, "ms" => 1.0 / 60000, _ => 1.0 / 60 };
            dt = v * f;
        }
        return new Scale(size, dt, "ImageJ header", sizeY);
    }
}
