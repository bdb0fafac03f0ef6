namespace ShapeNoise.Shape;

/// <summary>A point in image coordinates: x = column, y = row, pixel (r, c) has its centre at (c + 0.5, r + 0.5); y points down.</summary>
public readonly record struct Point2(double X, double Y);
