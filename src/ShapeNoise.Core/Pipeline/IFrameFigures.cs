using ShapeNoise.Reading;

namespace ShapeNoise.Pipeline;

/// <summary>A finished figure: its file name in the output folder, the caption that says how to read it, and its PNG bytes.</summary>
/// <param name="FileName">File name in the output folder (e.g. defects-frame-000.png).</param>
/// <param name="Caption">How to read the figure, in a sentence or two.</param>
/// <param name="Png">The encoded PNG image.</param>
public sealed record Figure(string FileName, string Caption, byte[] Png);

/// <summary>Extra figures drawn on the movie's own frames (implemented by the imaging layer); the caller saves them and
/// embeds the same bytes in the report.</summary>
public interface IFrameFigures
{
    /// <summary>Draws the figures; <paramref name="reopen"/> opens the movie again to read frames. Figures that belong
    /// together (one strip) share one caption.</summary>
    IReadOnlyList<Figure> Draw(AnalysisResult result, Func<ILabelMovie> reopen);
}
