using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// Quick evaluations-per-second table: every variant, serial and all cores, best of several repetitions.
/// Usage: throughput [N M [reps]] (defaults 3000 100000 5).
/// </summary>
internal static class Throughput
{
    public static int Run(string[] args)
    {
        int n = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 3000;
        int m = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 100_000;
        int reps = args.Length > 2 ? int.Parse(args[2], CultureInfo.InvariantCulture) : 5;
        var (t, y, w) = Synthetic.Irregular(n, 42, 3000.0);
        double f0 = 0.01, df = 10.0 / m;
        var power = new double[m];
        Console.WriteLine(FormattableString.Invariant($"N={n} M={m} reps={reps} cores={Environment.ProcessorCount}"));
        foreach (GlsVariant v in Enum.GetValues<GlsVariant>().Where(_ => !(args.Length > 4 && args[4] == "only")))
        {
            if (!GlsVariantPicker.IsSupported(v)) continue;
            foreach (int threads in new[] { 1, Environment.ProcessorCount })
            {
                var plan = new GlsPlan(f0, df, m, v, threads);
                double best = double.MaxValue;
                for (int r = 0; r < reps; r++)
                {
                    long t0 = Stopwatch.GetTimestamp();
                    plan.Execute(t, y, w, power);
                    best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
                }
                double evals = (double)n * m / best;
                Console.WriteLine(FormattableString.Invariant(
                    $"{GlsVariantPicker.Name(v),-7} threads={threads} best={best:F4} s  {evals:E3} eval/s  {evals * GlsFlops.PerEvaluation / 1e9:F1} GFLOP/s"));
            }
        }
        if (args.Length > 3 && args[3] == "nufft")
        {
            var nu = new GlsNufftPlan(f0, df, m);
            double best = double.MaxValue;
            for (int r = 0; r < reps; r++)
            {
                long t0 = Stopwatch.GetTimestamp();
                nu.Execute(t, y, w, power);
                best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
            }
            Console.WriteLine(FormattableString.Invariant($"nufft   best={best:F4} s"));
        }
        return 0;
    }
}
