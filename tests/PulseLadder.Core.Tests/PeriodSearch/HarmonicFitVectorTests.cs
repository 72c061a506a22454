using System.Runtime.Intrinsics;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>
/// The four-points-at-a-time normal equations of <see cref="HarmonicFit"/> against the scalar definition, at awkward
/// lengths (below, at and around the vector width, large) and with several observers (indicator columns).
/// </summary>
public sealed class HarmonicFitVectorTests
{
    private static BandSeries Band(int n, int observers, int seed)
    {
        var rng = new Random(seed);
        var t = new double[n]; var y = new double[n]; var w = new double[n]; var o = new int[n];
        double ws = 0, wy = 0;
        for (int i = 0; i < n; i++)
        {
            t[i] = -300 + 600.0 * i / Math.Max(1, n - 1) + rng.NextDouble() * 0.3;
            o[i] = observers > 1 ? rng.Next(observers) : 0;
            y[i] = 15 + 0.4 * Math.Sin(2 * Math.PI * t[i] / 5.37) + 0.03 * o[i] + 0.01 * (rng.NextDouble() - 0.5);
            double e = 0.005 + 0.02 * rng.NextDouble();
            w[i] = 1 / (e * e);
            ws += w[i]; wy += w[i] * y[i];
        }
        double mean = ws > 0 ? wy / ws : 0, chi0 = 0;
        for (int i = 0; i < n; i++) chi0 += w[i] * (y[i] - mean) * (y[i] - mean);
        return new BandSeries
        {
            Band = "V", T = t, Y = y, W = w, Obs = o,
            Observers = Enumerable.Range(0, observers).Select(k => "obs" + k).ToArray(),
            ObserverCounts = Enumerable.Range(0, observers).Select(k => o.Count(x => x == k)).ToArray(),
            Chi2Mean = chi0, YMean = mean,
        };
    }

    [Theory]
    [InlineData(4, 1, 1)]
    [InlineData(5, 2, 1)]
    [InlineData(7, 3, 2)]
    [InlineData(8, 3, 3)]
    [InlineData(9, 1, 0)]
    [InlineData(301, 3, 3)]
    [InlineData(1000, 4, 6)]
    public void AccumulateVector_MatchesTheScalarDefinition_AtAwkwardLengths(int n, int observers, int harmonics)
    {
        Assert.True(Vector256.IsHardwareAccelerated, "this machine runs the vector path; the test needs it");
        var b = Band(n, observers, n);
        int p = HarmonicFit.ParamCount(harmonics, observers);
        var ataS = new double[p * p]; var atyS = new double[p]; var row = new double[p];
        var ataV = new double[p * p]; var atyV = new double[p];
        double f = 1 / 5.37;
        double yyS = HarmonicFit.AccumulateScalar(b, f, harmonics, observers, p, 0, ataS, atyS, row);
        double yyV = HarmonicFit.AccumulateVector(b, f, harmonics, observers, p, ataV, atyV);

        // Same sums in another order: agreement to rounding, relative to the largest term of each kind.
        double scaleA = ataS.Max(Math.Abs), scaleY = atyS.Max(Math.Abs);
        for (int i = 0; i < p; i++)
            for (int j = i; j < p; j++)
                Assert.True(Math.Abs(ataS[i * p + j] - ataV[i * p + j]) <= 1e-12 * scaleA, $"ata[{i},{j}]: {ataS[i * p + j]} vs {ataV[i * p + j]}");
        for (int i = 0; i < p; i++) Assert.True(Math.Abs(atyS[i] - atyV[i]) <= 1e-12 * Math.Max(scaleY, 1e-300), $"aty[{i}]");
        Assert.Equal(yyS, yyV, 1e-12 * Math.Max(1, yyS));
    }

    [Theory]
    [InlineData(4, 1, 1)]
    [InlineData(13, 3, 2)]
    [InlineData(9, 1, 0)]
    [InlineData(301, 3, 3)]
    [InlineData(1000, 4, 6)]
    public void ResidualSumOfSquares_VectorMatchesTheScalarDefinition(int n, int observers, int harmonics)
    {
        Assert.True(Vector256.IsHardwareAccelerated, "this machine runs the vector path; the test needs it");
        var b = Band(n, observers, n + 1);
        int p = HarmonicFit.ParamCount(harmonics, observers);
        // A fitted model, then perturbed so the residuals are not only noise.
        var x = new double[p];
        double f = 1 / 5.37;
        Assert.NotNull(HarmonicFit.Fit(b, f, harmonics, x));
        for (int j = 1; j < p; j++) x[j] *= 1.05;
        double s = HarmonicFit.ResidualSumOfSquares(b, f, harmonics, x, allowVector: false);
        double v = HarmonicFit.ResidualSumOfSquares(b, f, harmonics, x, allowVector: true);
        Assert.True(s > 0);
        Assert.Equal(s, v, 1e-12 * s);
    }

    [Fact]
    public void Fit_GivesTheSameChi2AsTheScalarNormalEquations_WithObserverOffsets()
    {
        var b = Band(600, 3, 7);
        int k = 3, p = HarmonicFit.ParamCount(k, 3);
        var ata = new double[p * p]; var aty = new double[p]; var row = new double[p];
        double f = 1 / 5.37;
        double yy = HarmonicFit.AccumulateScalar(b, f, k, 3, p, 0, ata, aty, row);
        SmallMatrix.Symmetrize(ata, p);
        var x = (double[])aty.Clone();
        Assert.True(SmallMatrix.Cholesky(ata, p));
        SmallMatrix.Solve(ata, p, x);
        double chi2Scalar = yy - x.Zip(aty, (a, c) => a * c).Sum();

        double? chi2 = HarmonicFit.Fit(b, f, k);
        Assert.NotNull(chi2);
        Assert.Equal(chi2Scalar, chi2!.Value, 1e-9 * chi2Scalar);
    }
}
