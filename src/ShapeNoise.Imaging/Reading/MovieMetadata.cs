using System.Globalization;
using System.Xml.Linq;
using ShapeNoise.Reading;

namespace ShapeNoise.Imaging.Reading;

/// <summary>Pixel size and frame interval from a TIFF's ImageDescription: OME-XML (OME-TIFF) or an ImageJ header.</summary>
/// <remarks>OME Data Model and file formats: Goldberg I.G. et al. (2005), Genome Biology 6:R47; attributes
/// Pixels/@PhysicalSizeX(+Unit, default µm) and Pixels/@TimeIncrement(+Unit, default s) of the 2016-06 schema.</remarks>
public static class MovieMetadata
{
    /// <summary>Parsed scale; nulls where the description says nothing.</summary>
    public readonly record struct Scale(double? PixelSizeUm, double? FrameIntervalMin, string Source);

    /// <summary>Reads the scale from an ImageDescription; <paramref name="xResolution"/> (px per unit) is used for ImageJ headers.</summary>
    public static Scale FromDescription(string path, string? description, double xResolution)
    {
        if (string.IsNullOrWhiteSpace(description)) return new Scale(null, null, "none");
        int ome = description.IndexOf("<OME", StringComparison.Ordinal);
        if (ome >= 0) return FromOme(path, description[(description.LastIndexOf("<?xml", ome, StringComparison.Ordinal) is var x && x >= 0 ? x : ome)..]);
        if (description.StartsWith("ImageJ=", StringComparison.Ordinal)) return FromImageJ(description, xResolution);
        return new Scale(null, null, "none");
    }

    private static Scale FromOme(string path, string xml)
    {
        XDocument doc;
        try { doc = XDocument.Parse(xml); }
        catch (System.Xml.XmlException e) { throw new InputException(path, $"OME-XML metadata is not well-formed ({e.Message})"); }
        var pixels = doc.Descendants().FirstOrDefault(e => e.Name.LocalName == "Pixels");
        if (pixels is null) return new Scale(null, null, "OME-XML without Pixels");
        int Int(string name) => int.TryParse((string?)pixels.Attribute(name), NumberStyles.Integer, CultureInfo.InvariantCulture, out var v) ? v : 1;
        if (Int("SizeC") > 1 || Int("SizeZ") > 1)
            throw new InputException(path, $"OME-TIFF has SizeC={Int("SizeC")} and SizeZ={Int("SizeZ")}; a label movie must have one channel and one z plane per frame");
        double? size = Num(pixels, "PhysicalSizeX") is { } s ? s * LengthToUm(path, (string?)pixels.Attribute("PhysicalSizeXUnit") ?? "µm") : null;
        double? dt = Num(pixels, "TimeIncrement") is { } t ? t * TimeToMin(path, (string?)pixels.Attribute("TimeIncrementUnit") ?? "s") : null;
        if (dt is null)
        {
            // Fall back to the DeltaT of the first two planes.
            var planes = pixels.Elements().Where(e => e.Name.LocalName == "Plane" && e.Attribute("DeltaT") is not null).Take(2).ToList();
            if (planes.Count == 2 && Num(planes[0], "DeltaT") is { } t0 && Num(planes[1], "DeltaT") is { } t1 && t1 > t0)
                dt = (t1 - t0) * TimeToMin(path, (string?)planes[0].Attribute("DeltaTUnit") ?? "s");
        }
        return new Scale(size is > 0 ? size : null, dt is > 0 ? dt : null, "OME-XML");
    }

    private static double? Num(XElement e, string name)
        => double.TryParse((string?)e.Attribute(name), NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && double.IsFinite(v) ? v : null;

    /// <summary>Factor from an OME length unit to um.</summary>
    public static double LengthToUm(string path, string unit) => unit switch
    {
        "µm" or "um" or "μm" or "micron" or "microns" => 1,
        "nm" => 1e-3,
        "mm" => 1e3,
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

    private static Scale FromImageJ(string d, double xres)
    {
        var kv = new Dictionary<string, string>();
        foreach (var line in d.Split('\n'))
        {
            int eq = line.IndexOf('=');
            if (eq > 0) kv[line[..eq].Trim()] = line[(eq + 1)..].Trim();
        }
        double? size = null, dt = null;
        if (kv.TryGetValue("unit", out var u) && xres > 0)
        {
            double f = u switch { "micron" or "um" or "µm" or "\\u00B5m" => 1, "nm" => 1e-3, "mm" => 1e3, _ => double.NaN };
            if (double.IsFinite(f)) size = f / xres;
        }
        if (kv.TryGetValue("finterval", out var fi) && double.TryParse(fi, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && v > 0)
        {
            string tu = kv.GetValueOrDefault("tunit", "sec");
            double f = tu switch { "min" => 1, "h" or "hour" => 60, "ms" => 1.0 / 60000, _ => 1.0 / 60 };
            dt = v * f;
        }
        return new Scale(size, dt, "ImageJ header");
    }
}
