using System.Globalization;
using System.Text;

namespace ShapeNoise.Reporting;

/// <summary>
/// cells.csv, the one table with a row per outline (about 230 000 rows on a 100-frame, 1024 x 1024 px movie), written
/// field by field into a character buffer: the same text as <see cref="CellMap"/> through CsvHelper (same columns, doubles
/// as round-trip "R", booleans as True/False, the label as an unsigned id, CRLF line ends; no field of this table ever
/// needs quoting), without a type-converter lookup and a string per field (bench/README.md).
/// </summary>
internal static class CellsCsv
{
    /// <summary>Writes <paramref name="rows"/> to <paramref name="path"/> with the columns of <paramref name="c"/>.</summary>
    public static void Write(string path, IEnumerable<CellRow> rows, AnalysisColumns c)
    {
        using var w = new StreamWriter(path, false, new UTF8Encoding(false), 1 << 16);
        // The header from the class map itself, so the column names have one home.
        var names = new CellMap(c).MemberMaps.Where(m => !m.Data.Ignore).Select(m => m.Data.Names[0]);
        bool px = c.CellPx is not null;     // the map's own condition for the x_px, y_px columns
        w.Write(string.Join(",", names));
        w.Write("\r\n");
        var line = new Line(new char[1024]);
        foreach (var r in rows)
        {
            line.Int(r.Frame); line.Double(r.Time); line.UInt((uint)r.Label); line.Int(r.TrackId); line.Bool(r.InStatistics);
            line.Double(r.X); line.Double(r.Y); line.Double(r.Area); line.Double(r.Perimeter); line.Double(r.Length); line.Double(r.Width);
            line.Double(r.AspectRatio); line.Double(r.Elongation); line.Double(r.ThetaRad); line.Double(r.MeanRadius);
            line.Double(r.Mode2Amplitude); line.Bool(r.StarShaped); line.Int(r.Vertices);
            if (px) { line.Double(r.XPx); line.Double(r.YPx); }
            w.Write(line.End());
        }
    }

    /// <summary>One row being formatted: fields separated by commas, ended by CRLF.</summary>
    private sealed class Line(char[] buffer)
    {
        private int _at;

        public void Int(int v) { Comma(); v.TryFormat(buffer.AsSpan(_at), out int n, default, CultureInfo.InvariantCulture); _at += n; }

        public void UInt(uint v) { Comma(); v.TryFormat(buffer.AsSpan(_at), out int n, default, CultureInfo.InvariantCulture); _at += n; }

        public void Double(double v) { Comma(); v.TryFormat(buffer.AsSpan(_at), out int n, "R", CultureInfo.InvariantCulture); _at += n; }

        public void Bool(bool v) { Comma(); (v ? "True" : "False").CopyTo(buffer.AsSpan(_at)); _at += v ? 4 : 5; }

        public ReadOnlySpan<char> End()
        {
            buffer[_at++] = '\r'; buffer[_at++] = '\n';
            var s = buffer.AsSpan(0, _at);
            _at = 0;
            return s;
        }

        private void Comma() { if (_at > 0) buffer[_at++] = ','; }
    }
}
