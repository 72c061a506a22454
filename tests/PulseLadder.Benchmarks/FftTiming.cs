using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// Times the internal FFT alone: fft-timing [log2 n ...] (default 21; several sizes may be given). Each round
/// transforms a fresh copy of the same O(1) input (the copy is not timed), so the values never grow to Inf/NaN; the
/// scalar path (no AVX2/FMA) and the plan's construction are timed beside the selected path.
/// With "gls N M" instead, one exact and one NUFFT periodogram of N random points on M frequencies (the star-sized
/// case the period search runs per band).
/// </summary>
internal static class FftTiming
{
    public static int Run(string[] args)
    {
        if (args.Length > 0 && args[0] == "gls") return Gls(args[1..]);
        int[] sizes = args.Length > 0 ? args.Select(s => int.Parse(s, CultureInfo.InvariantCulture)).ToArray() : [21];
        foreach (int bits in sizes)
        {
            int n = 1 << bits;
            var input = new double[2 * n];
            var rng = new Random(1);
            for (int i = 0; i < input.Length; i++) input[i] = rng.NextDouble() - 0.5;
            var a = new double[2 * n];
            double tv = BestOf(new Fft(n), input, a), ts = BestOf(new Fft(n, allowVector: false), input, a);
            double tc = double.MaxValue;
            for (int r = 0; r < 20; r++)
            {
                long t0 = Stopwatch.GetTimestamp();
                _ = new Fft(n);
                tc = Math.Min(tc, Stopwatch.GetElapsedTime(t0).TotalSeconds);
            }
            Console.WriteLine(FormattableString.Invariant(
                $"fft n=2^{bits}: best {tv * 1e3:F3} ms ({tv * 1e9 / ((double)n * bits):F3} ns per element and stage, {Fft.VectorPathName}); scalar path {ts * 1e3:F3} ms; plan {tc * 1e3:F3} ms"));
        }
        return 0;
    }

    private static int Gls(string[] args)
    {
        int n = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 300;
        int m = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 12_832;
        var rng = new Random(7);
        var t = new double[n]; var y = new double[n]; var w = new double[n];
        for (int i = 0; i < n; i++) { t[i] = 2000 * rng.NextDouble(); y[i] = Math.Sin(2 * Math.PI * t[i] / 5.3) + 0.1 * rng.NextDouble(); w[i] = 1; }
        Array.Sort(t);
        double df = 1.0 / (5 * 2000), f0 = 0.01;
        var exact = new double[m]; var fast = new double[m];
        var plan = new GlsNufftPlan(f0, df, m);
        double te = Best(() => Periodogram.Gls(t, y, w, f0, df, exact), 30);
        double tf = Best(() => plan.Execute(t, y, w, fast), 30);
        var fft = new Fft(plan.GridSize); var buf = new double[2 * plan.GridSize];
        for (int i = 0; i < buf.Length; i++) buf[i] = rng.NextDouble();
        double tfft = Best(() => fft.Transform(buf), 30);
        Console.WriteLine(FormattableString.Invariant($"fft alone {tfft * 1e3:F3} ms"));
        double maxd = 0;
        for (int k = 0; k < m; k++) maxd = Math.Max(maxd, Math.Abs(exact[k] - fast[k]));
        Console.WriteLine(FormattableString.Invariant(
            $"gls N={n} M={m}: exact ({Periodogram.GlsVariantName}) {te * 1e3:F3} ms, {plan.MethodName} {tf * 1e3:F3} ms (FFT 2^{Math.Log2(plan.GridSize):F0}), max |dp| {maxd:E1}"));
        var srch = new double[m];
        string method = Periodogram.GlsForSearch(t, y, w, f0, df, srch);
        double ts = Best(() => Periodogram.GlsForSearch(t, y, w, f0, df, srch), 30);
        double ds = 0;
        for (int k = 0; k < m; k++) ds = Math.Max(ds, Math.Abs(exact[k] - srch[k]));
        Console.WriteLine(FormattableString.Invariant($"  search path: {method} {ts * 1e3:F3} ms, max |dp| {ds:E1}"));
        foreach (double eps in new[] { 1e-6, 1e-8, 1e-9, 1e-10, 1e-12 })
        {
            var p2 = GlsNufftPlan.ForAccuracy(f0, df, m, eps);
            double t2 = Best(() => p2.Execute(t, y, w, fast), 30);
            double d2 = 0;
            for (int k = 0; k < m; k++) d2 = Math.Max(d2, Math.Abs(exact[k] - fast[k]));
            Console.WriteLine(FormattableString.Invariant(
                $"  target {eps:E0}: {p2.MethodName} FFT {p2.GridSize} (R {(double)p2.GridSize / (m + (m & 1)):F2}) {t2 * 1e3:F3} ms, max |dp| {d2:E1}"));
        }
        return 0;
    }

    private static double Best(Action a, int rounds)
    {
        a();
        double best = double.MaxValue;
        for (int r = 0; r < rounds; r++)
        {
            long t0 = Stopwatch.GetTimestamp();
            a();
            best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
        }
        return best;
    }

    private static double BestOf(Fft fft, double[] input, double[] a)
    {
        int rounds = Math.Clamp((1 << 24) / fft.Size, 5, 200);
        double best = double.MaxValue;
        for (int r = 0; r <= rounds; r++)
        {
            input.CopyTo(a, 0);
            long t0 = Stopwatch.GetTimestamp();
            fft.Transform(a);
            double dt = Stopwatch.GetElapsedTime(t0).TotalSeconds;
            if (r > 0) best = Math.Min(best, dt);   // round 0 is the warm-up
        }
        return best;
    }
}
