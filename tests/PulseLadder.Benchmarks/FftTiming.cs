using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// Times the internal FFT alone: fft-timing [log2 n ...] (default 21); several sizes may be given. Each round
/// transforms a fresh copy of the same O(1) input (the copy is not timed), so the values never grow to Inf/NaN.
/// The scalar path (no AVX2/FMA) is timed beside the selected one.
/// </summary>
internal static class FftTiming
{
    public static int Run(string[] args)
    {
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
