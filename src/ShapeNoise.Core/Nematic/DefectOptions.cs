namespace ShapeNoise.Nematic;

/// <summary>
/// Sampling grid of the ensemble flow around +1/2 defects, in each defect's frame: offsets
/// u, w = k x <see cref="StepCoarseWidths"/> x coarse width for k = -<see cref="HalfSteps"/>..<see cref="HalfSteps"/>, so
/// (2 HalfSteps + 1)^2 samples over +-HalfSteps x StepCoarseWidths coarse widths (docs/measures.md#nematic-field-and-defects:
/// +-3 coarse widths with the defaults 6 and 0.5).
/// </summary>
/// <param name="HalfSteps">Steps on each side of the core (at least 1).</param>
/// <param name="StepCoarseWidths">Step between samples in coarse widths (positive).</param>
public sealed record EnsembleFlowGrid(int HalfSteps = 6, double StepCoarseWidths = 0.5)
{
    /// <summary>Samples along one side, 2 HalfSteps + 1.</summary>
    public int Side => 2 * HalfSteps + 1;

    /// <summary>The spec's grid: +-3 coarse widths in steps of half a width.</summary>
    public static EnsembleFlowGrid Default { get; } = new();

    /// <summary>Throws <see cref="ArgumentException"/> naming the parameter when it is out of range.</summary>
    public EnsembleFlowGrid Validated()
    {
        if (HalfSteps < 1) throw new ArgumentException($"{nameof(HalfSteps)} must be at least 1 (got {HalfSteps})");
        if (!(StepCoarseWidths > 0 && double.IsFinite(StepCoarseWidths))) throw new ArgumentException($"{nameof(StepCoarseWidths)} must be positive (got {StepCoarseWidths})");
        return this;
    }
}

/// <summary>Options of the defect stage and the shape-noise hypothesis test; validated on construction.</summary>
public sealed record DefectOptions
{
    /// <summary>Validates every value; throws <see cref="ArgumentException"/> naming the parameter.</summary>
    /// <param name="coarseWidth">Gaussian width of the coarse-graining (also the linking gate and the border margin).</param>
    /// <param name="gridSpacing">Grid spacing of the coarse-grained fields.</param>
    /// <param name="bootstrapResamples">Bootstrap resamples over defect tracks (0 = no intervals).</param>
    /// <param name="seed">Seed of every resample and permutation.</param>
    /// <param name="ensemble">Ensemble-flow grid; null = <see cref="EnsembleFlowGrid.Default"/>.</param>
    /// <param name="keepDrift">Keep the tissue's drift in the velocities and defect kinematics (--keep-drift; docs/defects.md#drift).</param>
    public DefectOptions(LengthSpec coarseWidth, LengthSpec gridSpacing, int bootstrapResamples = 1000, int seed = 1, EnsembleFlowGrid? ensemble = null,
        bool keepDrift = false)
    {
        if (!(coarseWidth.Value > 0 && double.IsFinite(coarseWidth.Value))) throw new ArgumentException($"{nameof(coarseWidth)} must be a positive length (got {coarseWidth.Value})");
        if (!(gridSpacing.Value > 0 && double.IsFinite(gridSpacing.Value))) throw new ArgumentException($"{nameof(gridSpacing)} must be a positive length (got {gridSpacing.Value})");
        if (bootstrapResamples < 0) throw new ArgumentException($"{nameof(bootstrapResamples)} must be >= 0 (got {bootstrapResamples})");
        CoarseWidth = coarseWidth; GridSpacing = gridSpacing; BootstrapResamples = bootstrapResamples; Seed = seed;
        Ensemble = (ensemble ?? EnsembleFlowGrid.Default).Validated();
        KeepDrift = keepDrift;
    }

    /// <summary>Keep the tissue's drift u(t) in the cell velocities and the defect kinematics (false = remove it, the default).</summary>
    public bool KeepDrift { get; }

    /// <summary>Gaussian width of the coarse-graining.</summary>
    public LengthSpec CoarseWidth { get; }
    /// <summary>Grid spacing of the coarse-grained fields.</summary>
    public LengthSpec GridSpacing { get; }
    /// <summary>Bootstrap resamples over defect tracks.</summary>
    public int BootstrapResamples { get; }
    /// <summary>Seed of every resample and permutation.</summary>
    public int Seed { get; }
    /// <summary>Ensemble-flow grid.</summary>
    public EnsembleFlowGrid Ensemble { get; }

    /// <summary>The spec's defaults: coarse width 2 R0, grid spacing R0 / 2, 1000 resamples, seed 1.</summary>
    public static DefectOptions Default { get; } = new(new LengthSpec(2, true), new LengthSpec(0.5, true));
}
