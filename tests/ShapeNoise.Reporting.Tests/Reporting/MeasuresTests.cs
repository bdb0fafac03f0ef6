using ShapeNoise.Comparison;
using ShapeNoise.Reporting;

namespace ShapeNoise.Tests.Reporting;

public class MeasuresTests
{
    [Fact]
    public void Get_EveryComparisonMeasure_HasAnEntry()
    {
        foreach (var m in ConditionComparison.Measures) Assert.Equal(m, Measures.Get(m).Name);
    }

    [Fact]
    public void Label_KindsInUmMin_UnitsPerDocs()
    {
        // docs/measures.md#coordinates-and-units: lengths um, areas um2, times min, speeds um/min.
        var u = UnitScale.Written(true, true);
        Assert.Equal("anisotropy (var_L / var_W)", Measures.Anisotropy.Label(u));
        Assert.Equal("var_L (um2)", Measures.VarL.Label(u));
        Assert.Equal("tau_q (min, bias-corrected)", Measures.TauQ.Label(u));
        Assert.Equal("flow_headward_speed (um/min)", Measures.FlowHeadwardSpeed.Label(u));
        Assert.Equal("px/frame", UnitScale.Written(false, false).Label(UnitKind.Speed));
        Assert.Throws<ArgumentException>(() => Measures.Get("no_such_measure"));
    }
}
