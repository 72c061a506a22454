using System.Collections.Concurrent;

namespace PulseLadder.Kernels;

/// <summary>Entry point the rest of PulseLadder calls: the fastest variant this CPU supports.</summary>
public static class Periodogram
{
    /// <summary>Point-frequency evaluations above which one call is split over all cores.</summary>
    internal const long ParallelThreshold = 20_000_000;

    /// <summary>Exact-kernel throughput assumed by the cost model of <see cref="GlsAuto"/>, evaluations/s per core.</summary>
    internal const double ExactRatePerCore = 3.0e9;

    /// <summary>The fast method is chosen only when it is estimated at least this many times cheaper than the exact one.</summary>
    internal const double FastAdvantageRequired = 2.0;

    private const int MaxIdleNufftPlans = 2;

    // One serial plan per thread first: a worker thread calls the kernel dozens of times per star (grid, then peak
    // zooms of 33 frequencies) and the shared bag's take/add showed up as lock time in profiles.
    [ThreadStatic] private static GlsPlan? _threadPlan;
    private static readonly ConcurrentBag<GlsPlan> ParallelPlans = [];
    private static readonly ConcurrentQueue<GlsNufftPlan> NufftPlans = new();

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
        if (!parallel)
        {
            // Taken off the thread while in use, so a re-entrant call (none today) would get a plan of its own.
            GlsPlan? mine = _threadPlan;
            _threadPlan = null;
            if (mine is null) mine = new GlsPlan(f0, df, power.Length, GlsVariantPicker.Selected, 1);
            else mine.Retarget(f0, df, power.Length);
            try { mine.Execute(t, y, w, power); }
            finally { _threadPlan = mine; }
            return;
        }
        ConcurrentBag<GlsPlan> pool = ParallelPlans;
        if (!pool.TryTake(out GlsPlan? plan))
            plan = new GlsPlan(f0, df, power.Length, GlsVariantPicker.Selected, Environment.ProcessorCount);
        else
            plan.Retarget(f0, df, power.Length);
        try { plan.Execute(t, y, w, power); }
        finally { pool.Add(plan); }
    }

    /// <summary>Name of the variant <see cref="Gls"/> uses (recorded with results), e.g. "gls-exact-avx512".</summary>
    public static string GlsVariantName { get; } = "gls-exact-" + GlsVariantPicker.Name(GlsVariantPicker.Selected);

    /// <summary>
    /// Same power as <see cref="Gls"/>, choosing by estimated cost between the exact kernel and the NUFFT approximation
    /// (<see cref="GlsNufftPlan"/>, |dp| ~1e-11 measured against the exact kernel). The fast method is used only when
    /// estimated at least twice as cheap, i.e. for many points on long grids (e.g. N = 30000, M = 1e6).
    /// </summary>
    /// <returns>The method used, recorded with results: <see cref="GlsVariantName"/> or e.g. "gls-nufft-gauss12".</returns>
    public static string GlsAuto(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, double f0, double df, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        if (!ChooseFast(t.Length, power.Length, df))
        {
            Gls(t, y, w, f0, df, power);
            return GlsVariantName;
        }
        GlsNufftPlan? plan = null;
        for (int i = NufftPlans.Count; i > 0 && NufftPlans.TryDequeue(out GlsNufftPlan? p); i--)
        {
            if (p.Count == power.Length) { plan = p; break; }
            NufftPlans.Enqueue(p);
        }
        if (plan is null) plan = new GlsNufftPlan(f0, df, power.Length);
        else plan.Retarget(f0, df);
        try
        {
            plan.Execute(t, y, w, power);
            return plan.MethodName;
        }
        finally
        {
            NufftPlans.Enqueue(plan);
            while (NufftPlans.Count > MaxIdleNufftPlans && NufftPlans.TryDequeue(out _)) { }
        }
    }

    /// <summary>The cost model of <see cref="GlsAuto"/>: true when the NUFFT path is estimated clearly cheaper.</summary>
    internal static bool ChooseFast(int n, int count, double df)
    {
        if (count < 2 || n < 3 || !(df > 0)) return false;
        int cores = (long)n * count > ParallelThreshold ? Environment.ProcessorCount : 1;
        double exact = (double)n * count / (ExactRatePerCore * cores);
        return GlsNufftPlan.EstimatedSeconds(n, count) * FastAdvantageRequired < exact;
    }
}
