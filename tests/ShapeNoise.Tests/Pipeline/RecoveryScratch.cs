using ShapeNoise.Pipeline;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;
using Xunit.Abstractions;

namespace ShapeNoise.Tests.Pipeline;

public class RecoveryScratch(ITestOutputHelper log)
{
    [Fact]
    public void Scratch()
    {
        foreach (var method in new[] { ShapeNoise.Outlines.OutlineMethod.Subpixel, ShapeNoise.Outlines.OutlineMethod.Midpoint, ShapeNoise.Outlines.OutlineMethod.PixelEdge })
        {
            var e = EllipseMovie.Generate(new EllipseMovieOptions());
            var sw = System.Diagnostics.Stopwatch.StartNew();
            var r = MovieAnalyzer.Run(MemoryMovie.Of(e), new AnalysisOptions { Outline = method });
            log.WriteLine($"{method} {sw.ElapsedMilliseconds} ms tracks {r.Counts.Tracks} used {r.Counts.TracksUsed} nonstar {r.Counts.NonStarShaped}");
            log.WriteLine($"truth anis {e.Truth.Anisotropy:F3} contour {e.Truth.AnisotropyContour:F3} varL {e.Truth.VarLPx2:F3} varW {e.Truth.VarWPx2:F3} along {e.Truth.VarAlongPx2:F3} across {e.Truth.VarAcrossPx2:F3}");
            var p = r.Pooled;
            log.WriteLine($"meas  anis {p.Anisotropy} contour {p.AnisotropyContour} raw {p.AnisotropyContourRaw}");
            log.WriteLine($"varL {p.VarL.Value:F3} varW {p.VarW.Value:F3} along {p.VarAlong.Value:F3} across {p.VarAcross.Value:F3} alongRaw {p.VarAlongRaw:F3} acrossRaw {p.VarAcrossRaw:F3} floorA {p.FloorAlong:F4} floorC {p.FloorAcross:F4}");
        }
    }
}
