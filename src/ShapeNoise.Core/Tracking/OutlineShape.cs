using System.Numerics;
using ShapeNoise.Shape;

namespace ShapeNoise.Tracking;

/// <summary>What the tracker needs of one outline: its shape measures, its M radial samples cast from its own long axis
/// and their Fourier modes (docs/measures.md#outline-definitions).</summary>
/// <param name="Shape">Shape measures of the outline polygon.</param>
/// <param name="RhoRaw">rho(theta + psi_k), k = 0..M-1, about the centroid from the outline's own axis angle theta.</param>
/// <param name="ModesRaw">C_n of <paramref name="RhoRaw"/>, n = 0..M/2 (the tracker may flip the sign of odd modes in place).</param>
/// <param name="StarShaped">Whether every ray crossed the outline once.</param>
public sealed record OutlineShape(ShapeMeasures Shape, double[] RhoRaw, Complex[] ModesRaw, bool StarShaped)
{
    /// <summary>Shape measures, radial samples and modes of the polygon <paramref name="vertices"/> with <paramref name="rays"/> rays.</summary>
    public static OutlineShape Of(Point2[] vertices, int rays)
    {
        var shape = ShapeMeasures.Of(vertices);
        var rho = new double[rays];
        bool star = RadialFunction.Sample(vertices, new Point2(shape.CentroidX, shape.CentroidY), shape.ThetaRad, rho);
        var modes = new Complex[rays / 2 + 1];
        FourierModes.Of(rho, modes);
        return new OutlineShape(shape, rho, modes, star);
    }
}
