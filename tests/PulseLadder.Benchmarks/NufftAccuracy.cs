using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// NUFFT error and time against the exact kernel for several Gaussian half-widths.
/// Usage: nufft-accuracy [N M] (defaults 3000 100000).
/// </summary>
internal static class NufftAccuracy
{
    public static int Run(string[] args)
    {
        int n = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 3000;
        int m = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 100_000;
        var (t, y, w) = Synthetic.Irregular(n, 42, 3000.0);
        double f0 = 0.01, df = 10.0 / m;
        var exact = new double[m];
        new GlsPlan(f0, df, m, GlsVariantPicker.Selected, Environment.ProcessorCount).Execute(t, y, w, exact);
        var fast = new double[m];
        Console.WriteLine(FormattableString.Invariant($"N={n} M={m}: NUFFT vs exact kernel"));
        foreach (int msp in new[] { 6, 8, 10, 12, 14, 16 })
        {
            var plan = new GlsNufftPlan(f0, df, m, msp);
            plan.Execute(t, y, w, fast);
            double best = double.MaxValue;
            for (int r = 0; r < 3; r++)
            {
                long t0 = Stopwatch.GetTimestamp();
                plan.Execute(t, y, w, fast);
                best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
            }
            double err = 0;
            for (int k = 0; k < m; k++) err = Math.Max(err, Math.Abs(fast[k] - exact[k]));
            Console.WriteLine(FormattableString.Invariant($"  Msp={msp,2}  max|dp|={err:E2}  time={best:F4} s"));
        }
        return 0;
    }
}
