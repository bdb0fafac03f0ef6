namespace ShapeNoise.Shape;

/// <summary>Per-outline shape measures of docs/measures.md#outline-definitions, in pixels.</summary>
public readonly record struct ShapeMeasures(
    double AreaPx2, double CentroidX, double CentroidY, double PerimeterPx,
    double L1, double L2, double ThetaRad, double LengthPx, double WidthPx, double AspectRatio, double Elongation)
{
    /// <summary>
    /// L = 4 sqrt(l1), W = 4 sqrt(l2), AR = sqrt(l1/l2), q = (sqrt(l1) - sqrt(l2)) / (sqrt(l1) + sqrt(l2)),
    /// from the polygon shape tensor.
    /// </summary>
    public static ShapeMeasures Of(ReadOnlySpan<Point2> polygon)
    {
        var s = ShapeTensor.Of(polygon);
        double l1 = s.L1, l2 = s.L2, r1 = Math.Sqrt(l1), r2 = Math.Sqrt(l2);
        return new ShapeMeasures(s.AreaPx2, s.Centroid.X, s.Centroid.Y, Polygon.Perimeter(polygon),
            l1, l2, s.ThetaRad, 4 * r1, 4 * r2, r2 > 0 ? r1 / r2 : double.PositiveInfinity,
            r1 + r2 > 0 ? (r1 - r2) / (r1 + r2) : 0);
    }

    /// <summary>Cell nematic tensor components Q_c = q [[cos 2theta, sin 2theta], [sin 2theta, -cos 2theta]]: (Qxx, Qxy).</summary>
    public (double Qxx, double Qxy) Nematic => (Elongation * Math.Cos(2 * ThetaRad), Elongation * Math.Sin(2 * ThetaRad));
}
