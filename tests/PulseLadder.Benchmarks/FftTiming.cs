using System.Diagnostics;
using System.Globalization;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>Times the internal FFT alone: fft-timing [log2 n] (default 21).</summary>
internal static class FftTiming
{
    public static int Run(string[] args)
    {
        int bits = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 21;
        int n = 1 << bits;
        var fft = new Fft(n);
        var a = new double[2 * n];
        var rng = new Random(1);
        for (int i = 0; i < a.Length; i++) a[i] = rng.NextDouble();
        double best = double.MaxValue;
        for (int r = 0; r < 5; r++)
        {
            long t0 = Stopwatch.GetTimestamp();
            fft.Transform(a);
            best = Math.Min(best, Stopwatch.GetElapsedTime(t0).TotalSeconds);
        }
        Console.WriteLine(FormattableString.Invariant($"fft n=2^{bits}: best {best:F4} s"));
        return 0;
    }
}
