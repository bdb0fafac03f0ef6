using ShapeNoise.Shape;

namespace ShapeNoise.Tracking;

/// <summary>One analysed outline (one cell in one frame), in px.</summary>
public readonly record struct CellRecord(int Frame, int Label, int TrackId, ShapeMeasures Shape, double ThetaContinuousRad,
    bool StarShaped, double MeanRadiusPx, double Mode2AmplitudePx, int Vertices);

/// <summary>Runs of consecutive cells of the same frame (cells are stored in frame order).</summary>
public static class FrameRuns
{
    /// <summary>(frame, first index, count) for each frame present in <paramref name="cells"/>.</summary>
    public static List<(int Frame, int Start, int Count)> Of(IReadOnlyList<CellRecord> cells)
    {
        var runs = new List<(int Frame, int Start, int Count)>();
        for (int i = 0; i < cells.Count;)
        {
            int j = i;
            while (j < cells.Count && cells[j].Frame == cells[i].Frame) j++;
            runs.Add((cells[i].Frame, i, j - i));
            i = j;
        }
        return runs;
    }
}

/// <summary>Why a track ended.</summary>
public enum TrackEnd
{
    /// <summary>The cell was still tracked in the last frame of the movie.</summary>
    MovieEnd,
    /// <summary>No outline of the next frame continues the cell (nor, with --max-gap, of the following frames).</summary>
    Lost,
    /// <summary>The cell's successor in the next frame touches the image border and is excluded.</summary>
    Border,
    /// <summary>The cell's successor in the next frame is below the minimum area and is excluded.</summary>
    Small,
    /// <summary>The cell divided into two or more objects.</summary>
    Division,
    /// <summary>The cell merged with another object.</summary>
    Merge,
}
