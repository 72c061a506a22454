using System.Runtime.Intrinsics;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>
/// The four-points-at-a-time chi2, J^T W J and J^T W r of <see cref="FourierRefiner"/> against its scalar definition,
/// on random multiband data with several orders, observer counts and lengths that leave scalar remainders.
/// </summary>
public sealed class FourierRefinerVectorTests
{
    private static BandSeries Band(int n, int observers, Random rng, double drift = 0)
    {
        var t = new double[n]; var y = new double[n]; var w = new double[n]; var o = new int[n];
        double ws = 0, wy = 0;
        double phase = rng.NextDouble() * 6;
        for (int i = 0; i < n; i++)
        {
            t[i] = -300 + 600.0 * i / Math.Max(1, n - 1) + rng.NextDouble() * 0.3;
            o[i] = observers > 1 ? rng.Next(observers) : 0;
            double ph = 2 * Math.PI * t[i] / 5.37 + phase + drift * t[i] * t[i];
            y[i] = 15 + 0.4 * Math.Sin(ph) + 0.1 * Math.Sin(2 * ph + 1) + 0.03 * o[i] + 0.01 * (rng.NextDouble() - 0.5);
            double e = 0.005 + 0.02 * rng.NextDouble();
            w[i] = 1 / (e * e);
            ws += w[i]; wy += w[i] * y[i];
        }
        double mean = wy / ws, chi0 = 0;
        for (int i = 0; i < n; i++) chi0 += w[i] * (y[i] - mean) * (y[i] - mean);
        return new BandSeries
        {
            Band = "B" + n, T = t, Y = y, W = w, Obs = o,
            Observers = Enumerable.Range(0, observers).Select(k => "obs" + k).ToArray(),
            ObserverCounts = Enumerable.Range(0, observers).Select(k => o.Count(x => x == k)).ToArray(),
            Chi2Mean = chi0, YMean = mean,
        };
    }

    /// <summary>Parameters near, not at, a solution: residuals and all derivative columns are nonzero.</summary>
    private static double[] Theta(IReadOnlyList<BandSeries> bands, int[] orders, int[] offsets, int np, Random rng)
    {
        var theta = new double[np];
        theta[0] = 1 / 5.37 * (1 + 1e-5 * (rng.NextDouble() - 0.5));
        for (int b = 0; b < bands.Count; b++)
        {
            if (orders[b] <= 0) continue;
            int p = HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length);
            theta[offsets[b]] = 15 + 0.01 * rng.NextDouble();
            for (int j = 1; j < p; j++) theta[offsets[b] + j] = 0.3 * (rng.NextDouble() - 0.5) / (1 + j / 2);
        }
        return theta;
    }

    [Theory]
    [InlineData(new[] { 300, 300 }, new[] { 3, 2 }, new[] { 3, 6 })]
    [InlineData(new[] { 301, 299 }, new[] { 1, 3 }, new[] { 1, 4 })]
    [InlineData(new[] { 4, 7, 9 }, new[] { 2, 1, 3 }, new[] { 1, 1, 2 })]
    [InlineData(new[] { 5, 600 }, new[] { 1, 4 }, new[] { 0, 5 })]
    [InlineData(new[] { 1000 }, new[] { 5 }, new[] { 8 })]
    [InlineData(new[] { 123, 64, 37 }, new[] { 2, 3, 1 }, new[] { 3, 4, 6 })]
    public void Evaluate_VectorMatchesTheScalarDefinition(int[] lengths, int[] observers, int[] orders)
    {
        Assert.True(Vector256.IsHardwareAccelerated, "this machine runs the vector path; the test needs it");
        var rng = new Random(lengths.Sum() * 31 + orders.Sum());
        var bands = lengths.Select((n, i) => Band(n, observers[i], rng)).ToArray();
        var offsets = new int[bands.Length];
        int np = FourierRefiner.Offsets(bands, orders, offsets);
        var theta = Theta(bands, orders, offsets, np, rng);

        var jtjS = new double[np * np]; var jtrS = new double[np];
        var jtjV = new double[np * np]; var jtrV = new double[np];
        double chiS = FourierRefiner.Evaluate(bands, orders, offsets, theta, jtjS, jtrS, allowVector: false);
        double chiV = FourierRefiner.Evaluate(bands, orders, offsets, theta, jtjV, jtrV, allowVector: true);
        double chiOnly = FourierRefiner.Evaluate(bands, orders, offsets, theta, null, null, allowVector: true);

        Assert.True(chiS > 0);
        Assert.Equal(chiS, chiV, 1e-12 * chiS);
        Assert.Equal(chiS, chiOnly, 1e-12 * chiS);
        // Same sums in another order. Scale of each entry: Cauchy-Schwarz bounds |(J^T W J)_ij| by
        // sqrt((J^T W J)_ii (J^T W J)_jj) and |(J^T W r)_i| by sqrt((J^T W J)_ii chi2).
        for (int i = 0; i < np; i++)
        {
            Assert.True(jtjS[i * np + i] > 0, $"column {i} empty");
            for (int j = 0; j < np; j++)
            {
                double scale = Math.Sqrt(jtjS[i * np + i] * jtjS[j * np + j]);
                Assert.True(Math.Abs(jtjS[i * np + j] - jtjV[i * np + j]) <= 1e-12 * scale, $"jtj[{i},{j}]: {jtjS[i * np + j]} vs {jtjV[i * np + j]}");
            }
            double rs = Math.Sqrt(jtjS[i * np + i] * chiS);
            Assert.True(Math.Abs(jtrS[i] - jtrV[i]) <= 1e-12 * rs, $"jtr[{i}]: {jtrS[i]} vs {jtrV[i]}");
        }
    }

    [Fact]
    public void Fit_StopsWhereTheNextGaussNewtonStepIsFarBelowTheErrors_WithLargeResiduals()
    {
        // A period that drifts (quadratic phase, a few radians at the ends) fitted with a fixed one: chi2_red >> 1,
        // where Gauss-Newton converges only linearly and the stopping rule has to extrapolate the remaining steps.
        var rng = new Random(5);
        var bands = new[] { Band(300, 3, rng, 4e-5), Band(300, 2, rng, 4e-5) };
        int[] orders = [2, 2];
        var sol = FourierRefiner.Fit(bands, orders, 1 / 5.37 * (1 + 3e-6));
        Assert.NotNull(sol);
        Assert.True(sol!.Converged);
        Assert.True(sol.Chi2Reduced > 10, $"chi2_red {sol.Chi2Reduced}");

        var offsets = new int[bands.Length];
        int np = FourierRefiner.Offsets(bands, orders, offsets);
        var theta = new double[np];
        theta[0] = sol.Frequency;
        for (int b = 0; b < bands.Length; b++) sol.BandParams[b].CopyTo(theta, offsets[b]);
        var jtj = new double[np * np]; var jtr = new double[np];
        FourierRefiner.Evaluate(bands, orders, offsets, theta, jtj, jtr);
        var step = (double[])jtr.Clone();
        Assert.True(SmallMatrix.Cholesky(jtj, np));
        SmallMatrix.Solve(jtj, np, step);
        // Length of the next step in standard errors (sqrt(step^T J^T W J step)); it bounds every parameter's
        // step over its error. The rule stops at an estimated distance of StepTolerance = 1e-4; allow ten times that.
        double len = Math.Sqrt(step.Zip(jtr, (u, v) => u * v).Sum());
        Assert.True(len < 1e-3, $"next step {len:E2} standard errors after {sol.Iterations} iterations");
    }

    [Fact]
    public void Fit_VectorAndScalarPaths_ReachTheSameSolution()
    {
        var rng = new Random(11);
        var bands = new[] { Band(300, 3, rng), Band(300, 2, rng) };
        int[] orders = [4, 3];
        var v = FourierRefiner.Fit(bands, orders, 1 / 5.37 * (1 + 2e-6));
        var sc = FourierRefiner.Fit(bands, orders, 1 / 5.37 * (1 + 2e-6), allowVector: false);
        Assert.NotNull(v); Assert.NotNull(sc);
        // Both converge on the same minimum: they differ by far less than the frequency's standard error.
        Assert.True(Math.Abs(v!.Frequency - sc!.Frequency) <= 1e-6 * sc.FrequencyErr, $"{v.Frequency} vs {sc.Frequency} (err {sc.FrequencyErr})");
        Assert.Equal(sc.FrequencyErr, v.FrequencyErr, 1e-8 * sc.FrequencyErr);
        Assert.Equal(sc.Chi2, v.Chi2, 1e-10 * sc.Chi2);
        for (int b = 0; b < bands.Length; b++)
            for (int j = 0; j < sc.BandParams[b].Length; j++)
                Assert.True(Math.Abs(v.BandParams[b][j] - sc.BandParams[b][j]) <= 1e-6 * sc.BandParamErr[b][j], $"band {b} param {j}");
    }
}
