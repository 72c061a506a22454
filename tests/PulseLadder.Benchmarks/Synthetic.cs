namespace PulseLadder.Benchmarks;

/// <summary>Deterministic synthetic light curves for benchmarks.</summary>
internal static class Synthetic
{
    public static (double[] T, double[] Y, double[] W) Irregular(int n, int seed, double span)
    {
        var rng = new Random(seed);
        var t = new double[n];
        var y = new double[n];
        var w = new double[n];
        for (int i = 0; i < n; i++)
        {
            t[i] = span * (rng.NextDouble() - 0.5);
            double sigma = 0.01 + 0.05 * rng.NextDouble();
            double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
            double g = Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
            y[i] = 12.0 + 0.3 * Math.Sin(2 * Math.PI * 0.37 * t[i] + 0.4) + sigma * g;
            w[i] = 1.0 / (sigma * sigma);
        }
        return (t, y, w);
    }
}
