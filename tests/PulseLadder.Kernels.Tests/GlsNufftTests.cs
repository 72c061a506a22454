using Xunit.Abstractions;

namespace PulseLadder.Kernels.Tests;

/// <summary>The NUFFT approximation against the exact kernel (itself tested against GlsReference and astropy).</summary>
public class GlsNufftTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData(3000, 100_000, 3000.0, 0.001)]
    [InlineData(12_000, 60_000, 4000.0, 0.002)]
    [InlineData(300, 40_001, 800.0, 0.5)]
    [InlineData(50, 7, 100.0, 0.03)]
    public void Execute_AgreesWithExactKernelTo1e9(int n, int m, double span, double f0)
    {
        var (t, y, w) = TestData.Irregular(n, 77 + n, span);
        double df = 5.0 / m;
        var exact = new double[m];
        new GlsPlan(f0, df, m, GlsVariantPicker.Fastest, Environment.ProcessorCount).Execute(t, y, w, exact);
        var fast = new double[m];
        new GlsNufftPlan(f0, df, m).Execute(t, y, w, fast);
        double err = TestData.MaxAbsDiff(exact, fast);
        output.WriteLine(FormattableString.Invariant($"N={n} M={m}: max |dp| = {err:E3}"));
        Assert.True(err <= 1e-9, $"max |dp| = {err:E3}");
    }
}

/// <summary>The cost model of <see cref="Periodogram.GlsAuto"/>.</summary>
public class GlsAutoTests
{
    [Theory]
    [InlineData(1000, 100_000, false)]   // exact on two cores beats three 2^18 FFTs
    [InlineData(300, 1_000_000, false)]  // few points: exact is 10x cheaper than three 2^21 FFTs
    [InlineData(30_000, 1_000_000, true)]
    [InlineData(100_000, 200_000, true)]
    [InlineData(2, 1_000_000, false)]    // degenerate input never needs the fast path
    public void ChooseFast_PicksByCost_AtDocumentedSizes(int n, int m, bool fast)
        => Assert.Equal(fast, Periodogram.ChooseFast(n, m, 1e-5));

    [Fact]
    public void GlsAuto_ReportsNufft_AndAgreesWithExact_ForManyPoints()
    {
        var (t, y, w) = TestData.Irregular(10_000, 31, span: 3000.0);
        const int m = 100_000;
        var auto = new double[m];
        string method = Periodogram.GlsAuto(t, y, w, 0.01, 1e-4, auto);
        Assert.Equal("gls-nufft-gauss12", method);
        var exact = new double[m];
        Periodogram.Gls(t, y, w, 0.01, 1e-4, exact);
        Assert.True(TestData.MaxAbsDiff(exact, auto) <= 1e-9);
    }

    [Fact]
    public void GlsAuto_ReportsExactVariant_ForSmallInput()
    {
        var (t, y, w) = TestData.Irregular(100, 32);
        var p = new double[1000];
        Assert.Equal(Periodogram.GlsVariantName, Periodogram.GlsAuto(t, y, w, 0.01, 1e-3, p));
    }
}
