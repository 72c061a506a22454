namespace PulseLadder.Kernels.Tests;

/// <summary>Deterministic synthetic light curves (irregular sampling, unequal weights, sinusoid plus noise).</summary>
internal static class TestData
{
    public static (double[] T, double[] Y, double[] W) Irregular(int n, int seed, double span = 400.0, double freq = 0.37)
    {
        var rng = new Random(seed);
        var t = new double[n];
        var y = new double[n];
        var w = new double[n];
        for (int i = 0; i < n; i++)
        {
            // Times spread over the span with gaps, centred near zero as callers subtract an epoch.
            t[i] = span * (rng.NextDouble() - 0.5);
            double sigma = 0.01 + 0.05 * rng.NextDouble();
            y[i] = 12.0 + 0.3 * Math.Sin(2 * Math.PI * freq * t[i] + 0.4) + sigma * Gauss(rng);
            w[i] = 1.0 / (sigma * sigma);
        }
        return (t, y, w);
    }

    public static double Gauss(Random rng)
    {
        double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }

    public static double MaxAbsDiff(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        Assert.Equal(a.Length, b.Length);
        double m = 0;
        for (int i = 0; i < a.Length; i++) m = Math.Max(m, Math.Abs(a[i] - b[i]));
        return m;
    }

    public static IEnumerable<GlsVariant> SupportedVariants =>
        Enum.GetValues<GlsVariant>().Where(GlsVariantPicker.IsSupported);
}
