using ShapeNoise.Pipeline;
using ShapeNoise.Reporting;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Pipeline;

public class InvarianceTests
{
    private static readonly EllipseMovie Movie = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 9, Frames = 25, Seed = 5 });

    [Fact]
    public void Analyze_PixelSizeScaling_LengthsScaleRatiosDoNot()
    {
        var opts = new AnalysisOptions { BootstrapResamples = 100 };
        var px = MovieAnalyzer.Run(MemoryMovie.Of(Movie), opts);
        var um = MovieAnalyzer.Run(MemoryMovie.Of(Movie), opts with { PixelSizeUm = 0.25, FrameIntervalMin = 3 });
        var a = Summary.Build(px); var b = Summary.Build(um);
        Assert.Equal("px", a["units"]!["length"]!.GetValue<string>());
        Assert.Equal("um", b["units"]!["length"]!.GetValue<string>());
        double V(System.Text.Json.Nodes.JsonObject o, string k) => o[k]!["value"]!.GetValue<double>();
        Assert.Equal(V(a, "anisotropy"), V(b, "anisotropy"), 12);
        Assert.Equal(V(a, "anisotropy_contour"), V(b, "anisotropy_contour"), 12);
        Assert.Equal(V(a, "var_L") * 0.0625, V(b, "var_L"), 12);
        Assert.Equal(a["mean_cell_radius"]!.GetValue<double>() * 0.25, b["mean_cell_radius"]!.GetValue<double>(), 12);
        var ca = Tables.Cells(px).ToList(); var cb = Tables.Cells(um).ToList();
        Assert.Equal(ca[3].Area * 0.0625, cb[3].Area, 9);
        Assert.Equal(ca[3].Time * 3, cb[3].Time, 12);
        Assert.Equal(ca[3].Elongation, cb[3].Elongation, 12);
    }

    [Fact]
    public void Analyze_TranslatedMovie_SameMeasures()
    {
        // Shift every frame by (5, 3) px on a larger canvas: shapes, tracks and pooled values are unchanged.
        int w = Movie.Width, h = Movie.Height, W = w + 10, H = h + 10;
        var frames = new List<int[]>();
        for (int t = 0; t < Movie.Options.Frames; t++)
        {
            var src = Movie.RenderFrame(t); var dst = new int[W * H];
            for (int y = 0; y < h; y++) for (int x = 0; x < w; x++) dst[(y + 3) * W + x + 5] = src[y * w + x];
            frames.Add(dst);
        }
        var opts = new AnalysisOptions { BootstrapResamples = 50 };
        var a = MovieAnalyzer.Run(MemoryMovie.Of(Movie), opts).Pooled;
        var b = MovieAnalyzer.Run(new MemoryMovie(W, H, frames), opts).Pooled;
        Assert.Equal(a.Anisotropy.Value, b.Anisotropy.Value, 9);
        Assert.Equal(a.VarAlongRaw, b.VarAlongRaw, 9);
        Assert.Equal(a.FloorPerMode, b.FloorPerMode, 9);
    }

    [Fact]
    public void Analyze_SameInputTwice_SameNumbers()
    {
        var opts = new AnalysisOptions { BootstrapResamples = 200, Seed = 3 };
        var a = Summary.Build(MovieAnalyzer.Run(MemoryMovie.Of(Movie), opts));
        var b = Summary.Build(MovieAnalyzer.Run(MemoryMovie.Of(Movie), opts));
        a.Remove("tool_version"); b.Remove("tool_version");
        Assert.Equal(a.ToJsonString(), b.ToJsonString());
    }
}
