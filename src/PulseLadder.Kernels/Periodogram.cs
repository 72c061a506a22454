using System.Collections.Concurrent;

namespace PulseLadder.Kernels;

/// <summary>Entry point the rest of PulseLadder calls: the fastest variant this CPU supports.</summary>
public static class Periodogram
{
    /// <summary>Point-frequency evaluations above which one call is split over all cores.</summary>
    internal const long ParallelThreshold = 20_000_000;

    private static readonly ConcurrentBag<GlsPlan> SerialPlans = [];
    private static readonly ConcurrentBag<GlsPlan> ParallelPlans = [];

    /// <summary>
    /// Generalised Lomb-Scargle power on f0 + k df, k in [0, power.Length); same contract and definition as
    /// <see cref="GlsReference.Compute"/>, agreeing with it to 1e-10 in power. Thread-safe: concurrent callers get
    /// separate pooled plans, so steady-state calls allocate nothing on the serial path. Large calls
    /// (points x frequencies &gt; 2e7) use all cores; the result is bit-identical either way.
    /// </summary>
    public static void Gls(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, double f0, double df, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        bool parallel = Environment.ProcessorCount > 1 && (long)t.Length * power.Length > ParallelThreshold;
        ConcurrentBag<GlsPlan> pool = parallel ? ParallelPlans : SerialPlans;
        if (!pool.TryTake(out GlsPlan? plan))
            plan = new GlsPlan(f0, df, power.Length, GlsVariantPicker.Selected, parallel ? Environment.ProcessorCount : 1);
        else
            plan.Retarget(f0, df, power.Length);
        try { plan.Execute(t, y, w, power); }
        finally { pool.Add(plan); }
    }

    /// <summary>Name of the variant <see cref="Gls"/> uses (recorded with results), e.g. "gls-exact-avx512".</summary>
    public static string GlsVariantName { get; } = "gls-exact-" + GlsVariantPicker.Name(GlsVariantPicker.Selected);
}
