using PulseLadder.Core.Distances;

namespace PulseLadder.Core.Tests.Distances;

public class PercentileTests
{
    // Slow reference: full sort and linear interpolation between order statistics (numpy.percentile's default).
    private static double Reference(double[] v, double q)
    {
        var s = v.OrderBy(x => x).ToArray();
        double h = (s.Length - 1) * q;
        int lo = (int)Math.Floor(h);
        int hi = Math.Min(lo + 1, s.Length - 1);
        return s[lo] + (h - lo) * (s[hi] - s[lo]);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(7)]
    [InlineData(2000)]
    [InlineData(2001)]
    public void Percentiles_EqualSortedReference_ForAwkwardLengths(int n)
    {
        var rng = new Random(n);
        var v = Enumerable.Range(0, n).Select(_ => Math.Round(rng.NextDouble() * 10, n > 100 ? 6 : 1)).ToArray(); // ties for small n
        var (p16, p50, p84) = DistanceComputation.Percentiles((double[])v.Clone());
        Assert.Equal(Reference(v, 0.15865525393145707), p16, 12);
        Assert.Equal(Reference(v, 0.5), p50, 12);
        Assert.Equal(Reference(v, 0.8413447460685429), p84, 12);
    }
}
