using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// The PulseLadder half of tests/reference/kernels/side_by_side.sh.
/// Usage: side-by-side &lt;datafile&gt; --f0 F --df D --m M --out PREFIX [--reps R] [--no-serial]
/// The data file has one "t y dy" line per point (invariant culture). Runs the exact kernel on all cores and on one,
/// and the NUFFT path, best of R runs after one warm-up; prints "pl &lt;method&gt; &lt;seconds&gt;" lines and writes the
/// powers as raw little-endian float64 to PREFIX.exact.f64 and PREFIX.nufft.f64 for the script to compare.
/// </summary>
internal static class SideBySide
{
    public static int Run(string[] args)
    {
        if (args.Length < 1) { Console.Error.WriteLine("usage: side-by-side <datafile> --f0 F --df D --m M --out PREFIX [--reps R]"); return 2; }
        string file = args[0];
        double f0 = 0, df = 0; int m = 0, reps = 3; string? prefix = null; bool serial = true;
        for (int i = 1; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--f0": f0 = double.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--df": df = double.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--m": m = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--reps": reps = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--out": prefix = args[++i]; break;
                case "--no-serial": serial = false; break;
                default: Console.Error.WriteLine($"unknown option {args[i]}"); return 2;
            }
        }
        if (m <= 0 || !(df > 0) || prefix is null) { Console.Error.WriteLine("--m, --df and --out are required"); return 2; }

        var t = new List<double>(); var y = new List<double>(); var w = new List<double>();
        foreach (string line in File.ReadLines(file))
        {
            string[] p = line.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            if (p.Length < 3 || p[0].StartsWith('#')) continue;
            t.Add(double.Parse(p[0], CultureInfo.InvariantCulture));
            y.Add(double.Parse(p[1], CultureInfo.InvariantCulture));
            double dy = double.Parse(p[2], CultureInfo.InvariantCulture);
            w.Add(1.0 / (dy * dy));
        }
        double[] ta = [.. t], ya = [.. y], wa = [.. w];
        int cores = Environment.ProcessorCount;
        Console.WriteLine(FormattableString.Invariant($"pl info N={ta.Length} M={m} cores={cores} variant={Periodogram.GlsVariantName} auto-would-use={(Periodogram.ChooseFast(ta.Length, m, df) ? "nufft" : "exact")}"));

        var exact = new double[m];
        var plan = new GlsPlan(f0, df, m, GlsVariantPicker.Selected, cores);
        Console.WriteLine(FormattableString.Invariant($"pl exact-{cores}core {Best(() => plan.Execute(ta, ya, wa, exact), reps):F4}"));
        if (serial)
        {
            var plan1 = new GlsPlan(f0, df, m, GlsVariantPicker.Selected, 1);
            var tmp = new double[m];
            Console.WriteLine(FormattableString.Invariant($"pl exact-1core {Best(() => plan1.Execute(ta, ya, wa, tmp), reps):F4}"));
        }
        var fast = new double[m];
        var nplan = new GlsNufftPlan(f0, df, m);
        Console.WriteLine(FormattableString.Invariant($"pl nufft-1core {Best(() => nplan.Execute(ta, ya, wa, fast), reps):F4}"));
        Write(prefix + ".exact.f64", exact);
        Write(prefix + ".nufft.f64", fast);
        return 0;
    }

    private static double Best(Action run, int reps)
    {
        run(); // warm-up (tiering, page faults of the plan buffers)
        double best = double.MaxValue;
        for (int r = 0; r < reps; r++)
        {
            long t0 = Stopwatch.GetTimestamp();
            run();
            best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
        }
        return best;
    }

    private static void Write(string path, double[] values)
    {
        using var fs = File.Create(path);
        var bytes = new byte[values.Length * sizeof(double)];
        Buffer.BlockCopy(values, 0, bytes, 0, bytes.Length);
        if (!BitConverter.IsLittleEndian) throw new PlatformNotSupportedException("raw output assumes little-endian");
        fs.Write(bytes);
    }
}
