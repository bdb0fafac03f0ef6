using ShapeNoise.Reading;

namespace ShapeNoise.Pipeline;

/// <summary>Extra figures drawn on the movie's own frames (implemented by the imaging layer).</summary>
public interface IFrameFigures
{
    /// <summary>Writes figures into <paramref name="dir"/>; <paramref name="reopen"/> opens the movie again to read frames.</summary>
    void Write(AnalysisResult result, Func<ILabelMovie> reopen, string dir);
}
