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

/// <summary>
/// The period search's grid path (<see cref="Periodogram.GlsForSearch"/>): NUFFT plans sized for a chosen sum error,
/// against the exact kernel (itself tested against GlsReference and astropy's LombScargle).
/// </summary>
public class GlsSearchPathTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData(300, 12_832, 2000.0, 0.01)]   // a demo star's band: two seasons plus, Cepheid range
    [InlineData(150, 6_001, 900.0, 0.0125)]
    [InlineData(600, 30_000, 3000.0, 1.0)]    // RR Lyrae range on a long baseline
    [InlineData(2_000, 100_000, 4000.0, 0.2)]
    public void GlsForSearch_WithinTenTimesTheSumErrorOfExact(int n, int m, double span, double f0)
    {
        var (t, y, w) = TestData.Irregular(n, 101 + n, span);
        double df = 1.0 / (5 * span);
        var exact = new double[m];
        new GlsPlan(f0, df, m, GlsVariantPicker.Fastest, 1).Execute(t, y, w, exact);
        var fast = new double[m];
        string method = Periodogram.GlsForSearch(t, y, w, f0, df, fast);
        double err = TestData.MaxAbsDiff(exact, fast);
        output.WriteLine(FormattableString.Invariant($"N={n} M={m}: {method}, max |dp| = {err:E3}"));
        Assert.StartsWith("gls-nufft-gauss", method);
        Assert.True(err <= 10 * Periodogram.SearchSumError, $"max |dp| = {err:E3}");
    }

    [Fact]
    public void GlsForSearch_ReusedPlan_ServesAnotherGridOfTheSameFftLength()
    {
        // Two grids whose lengths map to one FFT length: the second call reuses the thread's plan with another
        // count, start and step, and must be as accurate as a fresh plan.
        var (t, y, w) = TestData.Irregular(400, 5, 1500.0);
        foreach (var (m, f0, df) in new[] { (12_000, 0.01, 1.0 / 7500), (10_500, 0.3, 1.0 / 6000), (12_800, 0.02, 1.0 / 9000) })
        {
            var exact = new double[m];
            new GlsPlan(f0, df, m, GlsVariantPicker.Fastest, 1).Execute(t, y, w, exact);
            var fast = new double[m];
            Periodogram.GlsForSearch(t, y, w, f0, df, fast);
            Assert.True(TestData.MaxAbsDiff(exact, fast) <= 10 * Periodogram.SearchSumError, $"M={m}");
        }
    }

    [Theory]
    [InlineData(40, 12_832, false)]    // few points: the exact kernel is cheaper than three FFTs
    [InlineData(300, 12_832, true)]
    [InlineData(300, 500, false)]      // short grid: exact
    [InlineData(5_000, 1_000_000, true)]
    public void PreferNufftForSearch_PicksByOperationCount(int n, int m, bool nufft)
        => Assert.Equal(nufft, Periodogram.PreferNufftForSearch(n, m));

    [Theory]
    [InlineData(1_000, 1e-9)]
    [InlineData(12_832, 1e-9)]
    [InlineData(13_200, 1e-9)]
    [InlineData(100_000, 1e-12)]
    public void ChooseKernel_CapacityCoversTheGrid_AndSpreadStaysInRange(int m, double eps)
    {
        var (capacity, spread, ratio) = GlsNufftPlan.ChooseKernel(m, eps);
        Assert.InRange(capacity, m, 2 * m + 2);
        Assert.InRange(spread, 4, GlsNufftPlan.MaxSpread);
        // Dutt & Rokhlin (1993) error model: exp(-pi Msp (1 - 1/(2R - 1))) <= target.
        Assert.True(Math.Exp(-Math.PI * spread * (1 - 1 / (2 * ratio - 1))) <= eps);
    }

    [Fact]
    public void WindowForSearch_MatchesDirectSums()
    {
        // Deeming (1975) window |(1/N) sum exp(2 pi i f t)|^2 by direct summation, the definition.
        var (t, _, _) = TestData.Irregular(500, 9, 1200.0);
        const int m = 8_000;
        double f0 = 0.01, df = 1.0 / 6000;
        var fast = new double[m];
        Periodogram.WindowForSearch(t, f0, df, fast);
        double err = 0;
        for (int k = 0; k < m; k += 7)
        {
            double f = f0 + k * df, re = 0, im = 0;
            foreach (double ti in t) { re += Math.Cos(2 * Math.PI * f * ti); im += Math.Sin(2 * Math.PI * f * ti); }
            re /= t.Length; im /= t.Length;
            err = Math.Max(err, Math.Abs(re * re + im * im - fast[k]));
        }
        output.WriteLine(FormattableString.Invariant($"window max |dW| = {err:E3}"));
        Assert.True(err <= 10 * Periodogram.SearchSumError, $"max |dW| = {err:E3}");
    }
}
