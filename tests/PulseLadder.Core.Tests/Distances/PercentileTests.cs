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
    [InlineData(4)]
    [InlineData(7)]
    [InlineData(8)]
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
        var (q16, q84) = DistanceComputation.OneSigmaPercentiles((double[])v.Clone());
        Assert.Equal(p16, q16, 12);
        Assert.Equal(p84, q84, 12);
    }
}

public class GaussTests
{
    // Reference: Math.NET Numerics 5.0.0 Normal.InvCDF (a general-purpose library). Acklam's approximation is quoted
    // with relative error < 1.15e-9; we allow 2e-9 absolute-or-relative.
    [Theory]
    [InlineData(1e-12)]
    [InlineData(1e-6)]
    [InlineData(0.001)]
    [InlineData(0.02)]
    [InlineData(0.02425)]
    [InlineData(0.1)]
    [InlineData(0.3)]
    [InlineData(0.5)]
    [InlineData(0.7)]
    [InlineData(0.97575)]
    [InlineData(0.99)]
    [InlineData(0.999999)]
    public void InverseNormal_MatchesMathNet(double p)
    {
        double expected = MathNet.Numerics.Distributions.Normal.InvCDF(0, 1, p);
        double actual = DistanceComputation.Gauss.InverseNormal(p);
        Assert.True(Math.Abs(actual - expected) <= 2e-9 * Math.Max(1, Math.Abs(expected)), $"p={p}: {actual} vs {expected}");
    }

    // The block path against the one-at-a-time formula (the project's reference, itself checked against Math.NET above):
    // the same bits for uniforms over (0, 1), both tails, the branch edges and NaN.
    [Fact]
    public void InverseNormalBlock_GivesTheScalarFormulasBits()
    {
        var rng = new Random(7);
        var p = new double[100_003];
        for (int i = 0; i < p.Length; i++) p[i] = rng.NextDouble();
        double[] special = [0.02425, Math.BitDecrement(0.02425), 1 - 0.02425, Math.BitIncrement(1 - 0.02425), 1e-300, 0.5, double.Epsilon, Math.BitDecrement(1.0), double.NaN];
        special.CopyTo(p, 17);
        var z = new double[p.Length];
        DistanceComputation.Gauss.InverseNormalBlock(p, z);
        for (int i = 0; i < p.Length; i++)
        {
            double want = DistanceComputation.Gauss.InverseNormal(p[i]);
            Assert.True(BitConverter.DoubleToInt64Bits(want) == BitConverter.DoubleToInt64Bits(z[i]), $"p={p[i]:R}: {z[i]:R} vs {want:R}");
        }
    }

    // Deviates and uniforms drawn in blocks come out as drawing them one by one from System.Random would give them.
    [Fact]
    public void Next_AndNextUniform_FollowTheGeneratorsSequence()
    {
        var g = new DistanceComputation.Gauss(new Random(11));
        var r = new Random(11);
        for (int i = 0; i < 1000; i++)
        {
            if (i % 7 == 3) Assert.Equal(r.NextDouble(), g.NextUniform());
            double u;
            do u = r.NextDouble(); while (u == 0.0);
            Assert.Equal(DistanceComputation.Gauss.InverseNormal(u), g.Next());
        }
    }

    // Moments of 200000 deviates: mean 0 +- 0.01, variance 1 +- 0.01, 15.87% below -1 +- 0.3% (normal distribution).
    [Fact]
    public void Next_HasStandardNormalMoments()
    {
        var g = new DistanceComputation.Gauss(new Random(1));
        const int n = 200_000;
        double s = 0, s2 = 0; int below = 0;
        for (int i = 0; i < n; i++) { double z = g.Next(); s += z; s2 += z * z; if (z < -1) below++; }
        Assert.InRange(s / n, -0.01, 0.01);
        Assert.InRange(s2 / n, 0.99, 1.01);
        Assert.InRange((double)below / n, 0.1557, 0.1617);
    }
}
