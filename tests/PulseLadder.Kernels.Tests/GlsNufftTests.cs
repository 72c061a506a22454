using Xunit.Abstractions;

namespace PulseLadder.Kernels.Tests;

/// <summary>The NUFFT approximation against the exact kernel (itself tested against GlsReference and astropy).</summary>
public class GlsNufftTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData(3000, 100_000, 3000.0, 0.001)]
    [InlineData(20_000, 200_000, 4000.0, 0.002)]
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
