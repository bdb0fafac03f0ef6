using ShapeNoise.Imaging.Reading;
using ShapeNoise.Pipeline;
using ShapeNoise.Reading;
using ShapeNoise.Synthesis;
using ShapeNoise.Tests.Support;

namespace ShapeNoise.Tests.Reading;

/// <summary>
/// Non-square pixels: the same analytic ellipses (the EllipseMovie scenario) rasterised once on square pixels and once
/// on pixels 1.3 times taller than wide (pixel centres at x + 0.5, (y + 0.5) * 1.3 in square-pixel units), as a
/// microscope with a 0.5 x 0.65 um pixel would record them. Through <see cref="SquarePixelMovie"/> the second must give
/// the first's measures; read as if square it must not. The reference is the continuous geometry (an ellipse's area and
/// axes do not depend on the grid it is sampled on), not the code under test.
/// </summary>
public class PixelScaleTests(Xunit.Abstractions.ITestOutputHelper log)
{
    private const double Aspect = 1.3, PixelUm = 0.5;
    private static readonly EllipseMovie Movie = EllipseMovie.Generate(new EllipseMovieOptions { Cells = 9, Frames = 25, Seed = 5 });

    /// <summary>Rasterises the movie's ellipses at pixel centres (x + 0.5, (y + 0.5) * aspect).</summary>
    private static int[] RenderTall(int t, int width, int height)
    {
        var img = new int[width * height];
        var tr = Movie.Truth;
        for (int i = 0; i < Movie.Options.Cells; i++)
        {
            double x0 = tr.CentreX[i][t], y0 = tr.CentreY[i][t], a = tr.A[i][t], b = tr.B[i][t], c = Math.Cos(tr.Theta[i][t]), s = Math.Sin(tr.Theta[i][t]);
            for (int y = 0; y < height; y++)
                for (int x = 0; x < width; x++)
                {
                    double dx = x + 0.5 - x0, dy = (y + 0.5) * Aspect - y0;
                    double u = (dx * c + dy * s) / a, v = (-dx * s + dy * c) / b;
                    if (u * u + v * v <= 1) img[y * width + x] = tr.LabelOfCell[t][i];
                }
        }
        return img;
    }

    private static ILabelMovie Tall(bool declareNonSquare)
    {
        int w = Movie.Width, h = (int)Math.Round(Movie.Height / Aspect);
        var frames = new List<int[]>();
        for (int t = 0; t < Movie.Options.Frames; t++) frames.Add(RenderTall(t, w, h));
        var m = new MemoryMovie(w, h, frames, PixelUm, Movie.Options.FrameIntervalMin);
        return declareNonSquare ? new RescaledMovie(m, m.Info with { PixelSizeYUm = PixelUm * Aspect, PixelSizeSource = "OME-XML" }) : m;
    }

    private sealed record Diff(double Area, double Length, double Width, double ThetaDeg, int Matched);

    /// <summary>Mean relative differences of area, length, width and mean |orientation difference| over cells matched by (frame, label).</summary>
    private static Diff Compare(AnalysisResult reference, AnalysisResult other, double yScale = 1)
    {
        var byKey = new Dictionary<(int, int), ShapeNoise.Shape.ShapeMeasures>();
        foreach (var c in other.Cells) byKey[(c.Frame, c.Label)] = c.Shape;
        double da = 0, dl = 0, dw = 0, dt = 0; int n = 0;
        foreach (var c in reference.Cells)
        {
            if (!byKey.TryGetValue((c.Frame, c.Label), out var o)) continue;
            da += Math.Abs(o.AreaPx2 / c.Shape.AreaPx2 - 1);
            dl += Math.Abs(o.LengthPx / c.Shape.LengthPx - 1);
            dw += Math.Abs(o.WidthPx / c.Shape.WidthPx - 1);
            double d = (o.ThetaRad - c.Shape.ThetaRad) % Math.PI;
            if (d > Math.PI / 2) d -= Math.PI; else if (d < -Math.PI / 2) d += Math.PI;
            dt += Math.Abs(d) * 180 / Math.PI;
            n++;
        }
        return new Diff(da / n, dl / n, dw / n, dt / n, n);
    }

    [Fact]
    public void SquarePixelMovie_TallPixels_MatchesSquareRendering()
    {
        var opts = new AnalysisOptions { BootstrapResamples = 50 };
        var square = MovieAnalyzer.Run(MemoryMovie.Of(Movie, withUnits: true), opts);
        using var corrected = new SquarePixelMovie(Tall(declareNonSquare: true));
        // round(round(H / 1.3) * 1.3) rows at the finer 0.5 um pixel.
        Assert.Equal((int)Math.Round(Math.Round(Movie.Height / Aspect) * Aspect), corrected.Info.Height);
        Assert.Equal(PixelUm, corrected.Info.PixelSizeUm);
        var fixedUp = MovieAnalyzer.Run(corrected, opts);
        using var raw = Tall(declareNonSquare: false);
        var naive = MovieAnalyzer.Run(raw, opts);

        var good = Compare(square, fixedUp);
        var bad = Compare(square, naive);
        log.WriteLine($"corrected: {good}; uncorrected: {bad}; anisotropy square {square.Pooled.Anisotropy.Value:G4}, corrected {fixedUp.Pooled.Anisotropy.Value:G4}, uncorrected {naive.Pooled.Anisotropy.Value:G4}");
        // Tolerances: nearest-neighbour resampling moves each horizontal boundary by up to half a coarse pixel (0.65 px)
        // on top of the square grid's own +-0.5 px; over an ellipse of semi-axes 14 x 9 px (perimeter ~73 px) these
        // errors of either sign leave the area within ~2% and the axes within ~2% on average, the axis direction within ~2 deg.
        Assert.True(good.Matched > 150, $"only {good.Matched} cells matched");
        Assert.True(good.Area < 0.02, $"area differs by {good.Area:P2} on average");
        Assert.True(good.Length < 0.02, $"length differs by {good.Length:P2}");
        Assert.True(good.Width < 0.02, $"width differs by {good.Width:P2}");
        Assert.True(good.ThetaDeg < 2, $"orientation differs by {good.ThetaDeg:F2} deg");
        // Read as square pixels, the same cells are squashed by 1/1.3 along y: area ~23% smaller, axes and orientation biased.
        Assert.True(bad.Area > 0.15, $"uncorrected area differs by only {bad.Area:P2}");
        Assert.True(bad.ThetaDeg > 2 * good.ThetaDeg && bad.Width + bad.Length > 5 * (good.Width + good.Length),
            $"uncorrected: length {bad.Length:P2}, width {bad.Width:P2}, theta {bad.ThetaDeg:F2} deg");
        // Pooled anisotropy var L / var W: within 10% of the square rendering after correction (pixelation noise of the
        // two grids differs, and var W of b ~ 9 px with sigma 0.5 px is sensitive to it), and visibly further without.
        double a0 = square.Pooled.Anisotropy.Value, a1 = fixedUp.Pooled.Anisotropy.Value, a2 = naive.Pooled.Anisotropy.Value;
        Assert.True(Math.Abs(a1 / a0 - 1) < 0.10, $"anisotropy {a1:G4} corrected vs {a0:G4} square");
        Assert.True(Math.Abs(a2 / a0 - 1) > 2 * Math.Abs(a1 / a0 - 1), $"anisotropy {a2:G4} uncorrected vs {a0:G4} square, corrected {a1:G4}");
    }

    [Fact]
    public void Analyze_NonSquareMovieNotResampled_Refused()
    {
        // A movie that reports non-square pixels but was not resampled would bias every anisotropy: refused, not measured.
        using var m = Tall(declareNonSquare: true);
        var e = Assert.Throws<InputException>(() => MovieAnalyzer.Run(m, new AnalysisOptions { BootstrapResamples = 10 }));
        Assert.Contains("not square", e.Message);
    }

    [Fact]
    public void ResolveUnits_OptionAndMetadata_OptionWinsAndIsNamed()
    {
        var info = new MovieInfo("m.tif", 10, 10, 5, 0.5, 2, "test", "OME-XML", "ImageJ header");
        var w = new List<string>();
        var u = MovieAnalyzer.ResolveUnits(info, new AnalysisOptions { PixelSizeUm = 0.25 }, w);
        Assert.Equal((0.25, "option", 2.0, "ImageJ header"), (u.PixelSizeUm!.Value, u.PixelSizeSource, u.FrameIntervalMin!.Value, u.FrameIntervalSource));
        Assert.DoesNotContain(w, x => x.Contains("ignored"));
        var none = MovieAnalyzer.ResolveUnits(info with { PixelSizeUm = null, FrameIntervalMin = null }, new AnalysisOptions(), w);
        Assert.Equal(("none", "none"), (none.PixelSizeSource, none.FrameIntervalSource));
    }
}
