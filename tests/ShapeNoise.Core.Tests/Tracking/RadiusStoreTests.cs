using ShapeNoise.Tracking;

namespace ShapeNoise.Tests.Tracking;

/// <summary>The temporary radius file stores doubles bit for bit (IEEE 754 binary64 written and read as raw bytes), by
/// single reads and by the sequential pass of the end of a movie, across its 8192-outline blocks.</summary>
public class RadiusStoreTests
{
    [Fact]
    public void ReadAll_TwentyThousandOutlines_SameDoublesInIndexOrderAsSingleReads()
    {
        var rnd = new Random(4);
        using var store = new RadiusStore(16);
        var written = new List<double[]>();
        for (int i = 0; i < 20_000; i++)
        {
            var rho = Enumerable.Range(0, 16).Select(_ => i == 7 ? double.NaN : rnd.NextDouble() * 30).ToArray();
            written.Add(rho);
            Assert.Equal(i, store.Append(rho));
        }
        long next = 0;
        store.ReadAll((index, rho) =>
        {
            Assert.Equal(next++, index);
            Assert.Equal(written[(int)index], rho.ToArray());
        });
        Assert.Equal(20_000, next);
        var one = new double[16];
        store.Read(12_345, one);
        Assert.Equal(written[12_345], one);
    }
}
