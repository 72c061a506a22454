using MathNet.Numerics.Optimization;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>
/// The one-dimensional minimisers of the search against Math.NET Numerics' golden-section minimiser (a general-purpose
/// reference from NuGet) on a chi2-like valley: 1 - the power of a sinc^2 peak of width w, plus a small asymmetric term.
/// </summary>
public class LocalMinimumTests
{
    private const double W = 1.0, X0 = 0.237;

    private static double Valley(double x)
    {
        double u = Math.PI * (x - X0) / W;
        double sinc = Math.Abs(u) < 1e-12 ? 1 : Math.Sin(u) / u;
        return 1 - sinc * sinc + 0.01 * (x - X0) * (x - X0) * (x - X0);
    }

    private static double Reference(double lo, double hi)
        => GoldenSectionMinimizer.Minimum(ObjectiveFunction.ScalarValue(Valley), lo, hi, 1e-10, 1000).MinimizingPoint;

    [Theory]
    [InlineData(0.0)]   // start 0.24 W off: within one step of h = W/10 after two shifts
    [InlineData(0.2)]
    [InlineData(0.45)]
    public void ParabolicNear_LandsWithinTheEstimatedErrorOfTheMinimum(double start)
    {
        double h = 0.1 * W;
        int calls = 0;
        double Counted(double x) { calls++; return Valley(x); }
        var (x, v) = Brent.ParabolicNear(Counted, start, Valley(start), h, 4);
        double reference = Reference(X0 - 0.5, X0 + 0.5);
        // The vertex of a parabola through three points h apart is off by ~h^2/(6 W) for a peak of width W.
        Assert.True(Math.Abs(x - reference) < h * h / W, $"x {x} reference {reference}");
        Assert.True(v <= Valley(start));
        Assert.True(calls <= 7, $"{calls} evaluations");
        // A second zoom at h/16 from there: within (h/16)^2 / W.
        var (x2, _) = Brent.ParabolicNear(Valley, x, v, h / 16, 4);
        Assert.True(Math.Abs(x2 - reference) < h * h / (256 * W), $"x2 {x2} reference {reference}");
    }

    [Fact]
    public void Minimize_MatchesTheReferenceToItsTolerance()
    {
        var (x, _) = Brent.Minimize(Valley, X0 - 0.4, X0 + 0.3, 1e-9);
        Assert.Equal(Reference(X0 - 0.4, X0 + 0.3), x, 1e-7);
    }
}
