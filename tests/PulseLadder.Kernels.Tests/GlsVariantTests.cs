namespace PulseLadder.Kernels.Tests;

/// <summary>Every exact variant against the scalar definition (GlsReference), at awkward lengths.</summary>
public class GlsVariantTests
{
    // Points: 0, 1, 2 (degenerate), width-1/width/width+1 of both vector widths, and larger odd sizes.
    public static TheoryData<int, int, int> Cases()
    {
        var data = new TheoryData<int, int, int>();
        int[] points = [0, 1, 2, 3, 4, 5, 7, 8, 9, 17, 301];
        // Frequencies: 0, 1, block width +-1, segment length +-1, re-seed interval +1.
        int[] freqs = [0, 1, 3, 4, 5, 63, 64, 65, 2049];
        foreach (GlsVariant v in TestData.SupportedVariants)
            foreach (int n in points)
                foreach (int m in freqs)
                    // N = 3 interpolates exactly (p = 1 wherever D > 0); near the frequencies where D -> 0 both evaluations are
                    // 0/0-ill-conditioned, so long grids with N = 3 are not a meaningful twin comparison.
                    if ((long)n * m <= 301L * 2049 && !(n > 17 && m < 60) && !(m > 65 && n < 8))
                        data.Add((int)v, n, m);
        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Execute_MatchesReferenceTo1e10_AtAwkwardLengths(int variant, int n, int m)
    {
        var (t, y, w) = TestData.Irregular(n, 1000 + n);
        double f0 = 0.013, df = 0.00071;
        var expected = new double[m];
        GlsReference.Compute(t, y, w, f0, df, expected);
        var plan = new GlsPlan(f0, df, m, (GlsVariant)variant);
        var actual = new double[m];
        plan.Execute(t, y, w, actual);
        Assert.True(TestData.MaxAbsDiff(expected, actual) <= 1e-10, $"max |dp| = {TestData.MaxAbsDiff(expected, actual):E3}");
    }

    // 1000 points over 3000 days, 20000 frequencies up to 5 c/d: many re-seed chunks and segments.
    // The reference (2e7 sin/cos) is computed once for all variants.
    private static readonly Lazy<(double[] T, double[] Y, double[] W, double F0, double Df, double[] P)> LargeCase = new(() =>
    {
        var (t, y, w) = TestData.Irregular(1000, 7, span: 3000.0);
        var p = new double[20000];
        GlsReference.Compute(t, y, w, 0.001, 2.5e-4, p);
        return (t, y, w, 0.001, 2.5e-4, p);
    });

    public static TheoryData<int> Variants()
    {
        var d = new TheoryData<int>();
        foreach (GlsVariant v in TestData.SupportedVariants) d.Add((int)v);
        return d;
    }

    [Theory]
    [MemberData(nameof(Variants))]
    public void Execute_MatchesReference_LargeInputLongGrid(int variant)
    {
        var (t, y, w, f0, df, expected) = LargeCase.Value;
        int m = expected.Length;
        var actual = new double[m];
        new GlsPlan(f0, df, m, (GlsVariant)variant).Execute(t, y, w, actual);
        Assert.True(TestData.MaxAbsDiff(expected, actual) <= 1e-10, $"max |dp| = {TestData.MaxAbsDiff(expected, actual):E3}");
    }

    [Fact]
    public void Execute_IsBitIdentical_SerialAndParallel()
    {
        var (t, y, w) = TestData.Irregular(500, 3, span: 2000.0);
        const int m = 5 * GlsPlan.ReseedInterval + 17;
        var serial = new double[m];
        var parallel = new double[m];
        new GlsPlan(0.01, 1e-4, m, GlsVariantPicker.Fastest).Execute(t, y, w, serial);
        new GlsPlan(0.01, 1e-4, m, GlsVariantPicker.Fastest, maxDegreeOfParallelism: 3).Execute(t, y, w, parallel);
        Assert.Equal(serial, parallel);
    }

    [Fact]
    public void Execute_ReusedPlan_GivesSameResultForSmallerInput()
    {
        var plan = new GlsPlan(0.02, 0.001, 300, GlsVariantPicker.Fastest);
        var (t1, y1, w1) = TestData.Irregular(400, 11);
        var (t2, y2, w2) = TestData.Irregular(37, 12);
        var first = new double[300];
        plan.Execute(t1, y1, w1, first);
        var reused = new double[300];
        plan.Execute(t2, y2, w2, reused);
        var expected = new double[300];
        GlsReference.Compute(t2, y2, w2, 0.02, 0.001, expected);
        Assert.True(TestData.MaxAbsDiff(expected, reused) <= 1e-10);
    }

    [Fact]
    public void Gls_MatchesReference_ThroughPicker()
    {
        var (t, y, w) = TestData.Irregular(123, 5);
        var expected = new double[777];
        var actual = new double[777];
        GlsReference.Compute(t, y, w, 0.05, 0.0013, expected);
        Periodogram.Gls(t, y, w, 0.05, 0.0013, actual);
        Assert.True(TestData.MaxAbsDiff(expected, actual) <= 1e-10);
        Assert.StartsWith("gls-exact-", Periodogram.GlsVariantName);
    }

    [Fact]
    public void Resolve_ThrowsOnUnknownName_AndAcceptsScalar()
    {
        Assert.Throws<InvalidOperationException>(() => GlsVariantPicker.Resolve("avx9000"));
        Assert.Equal(GlsVariant.Scalar, GlsVariantPicker.Resolve(" Scalar "));
        Assert.Equal(GlsVariantPicker.Fastest, GlsVariantPicker.Resolve(null));
    }

    [Fact]
    public void Execute_ZeroWeightPoints_AreIgnoredLikeReference()
    {
        var (t, y, w) = TestData.Irregular(50, 21);
        for (int i = 0; i < 50; i += 7) w[i] = 0;
        var expected = new double[200];
        var actual = new double[200];
        GlsReference.Compute(t, y, w, 0.01, 0.003, expected);
        new GlsPlan(0.01, 0.003, 200, GlsVariantPicker.Fastest).Execute(t, y, w, actual);
        Assert.True(TestData.MaxAbsDiff(expected, actual) <= 1e-10);
        Assert.All(actual, p => Assert.False(double.IsNaN(p)));
    }
}

/// <summary>The plan owns its buffers: a warmed-up serial call allocates nothing.</summary>
public class GlsPlanAllocationTests
{
    [Fact]
    public void Execute_AllocatesNothing_AfterFirstCall()
    {
        var (t, y, w) = TestData.Irregular(200, 41);
        var power = new double[5000];
        var plan = new GlsPlan(0.01, 0.001, power.Length, GlsVariantPicker.Fastest);
        plan.Execute(t, y, w, power);
        long before = GC.GetAllocatedBytesForCurrentThread();
        plan.Execute(t, y, w, power);
        long after = GC.GetAllocatedBytesForCurrentThread();
        Assert.Equal(0, after - before);
    }

    [Fact]
    public void Gls_AllocatesNothing_InSteadyState()
    {
        var (t, y, w) = TestData.Irregular(150, 42);
        var power = new double[3000];
        Periodogram.Gls(t, y, w, 0.02, 0.0005, power);
        long before = GC.GetAllocatedBytesForCurrentThread();
        Periodogram.Gls(t, y, w, 0.03, 0.0004, power);
        long after = GC.GetAllocatedBytesForCurrentThread();
        Assert.Equal(0, after - before);
    }
}
