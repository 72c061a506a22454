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

    /// <summary>Error of the transformed sums in <see cref="GlsForSearch"/>, relative to sum |h|: the power is then within
    /// a few 1e-10 of the exact kernel (measured: GlsSearchPathTests, docs/PERFORMANCE.md), far below what a period search ranks on or a plot shows.</summary>
    public const double SearchSumError = 1e-9;

    /// <summary>
    /// Cost of one FFT butterfly element per stage relative to one exact-kernel evaluation (point x frequency), used by
    /// <see cref="PreferNufftForSearch"/>. Measured on the 2-core AMD Zen 3 (AVX2) machine of docs/PERFORMANCE.md
    /// (session 4: 2^15-point FFT 0.17 ms = 0.35 ns per element and stage with the vector FFT, exact kernel 0.70 ns per
    /// evaluation); a fixed constant rather than a timing at start-up so the method chosen, which is recorded with every
    /// result, depends on the input only.
    /// </summary>
    internal const double FftElementCost = 0.5;

    [ThreadStatic] private static GlsNufftPlan?[]? _threadSearchPlans;

    /// <summary>
    /// The period search's grid periodogram: the NUFFT at <see cref="SearchSumError"/> when the operation count
    /// says it is clearly cheaper than the exact kernel (a few hundred points or more on thousands of
    /// frequencies), otherwise the exact kernel. Deterministic: the choice depends on (N, M) only. Each thread keeps
    /// one plan per FFT length, so a worker's successive stars reuse tables (FFT twiddles, deconvolution factors).
    /// </summary>
    /// <returns>The method used, recorded with results: <see cref="GlsVariantName"/> or e.g. "gls-nufft-gauss20".</returns>
    public static string GlsForSearch(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, double f0, double df, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        if (!PreferNufftForSearch(t.Length, power.Length) || !(df > 0) || !double.IsFinite(df) || !double.IsFinite(f0))
        {
            Gls(t, y, w, f0, df, power);
            return GlsVariantName;
        }
        var (plan, slot) = TakeSearchPlan(f0, df, power.Length);
        try
        {
            plan.Execute(t, y, w, power);
            return plan.MethodName;
        }
        finally { _threadSearchPlans![slot] = plan; }
    }

    /// <summary>This thread's search-grade plan for the FFT length of a grid of <paramref name="count"/>, taken off the
    /// thread while in use (as for the exact plan); the caller puts it back in slot <c>Slot</c>.</summary>
    private static (GlsNufftPlan Plan, int Slot) TakeSearchPlan(double f0, double df, int count)
    {
        var (capacity, spread, ratio) = GlsNufftPlan.ChooseKernel(count, SearchSumError);
        int slot = System.Numerics.BitOperations.Log2((uint)GlsNufftPlan.FftLength(capacity, spread, ratio));
        var plans = _threadSearchPlans ??= new GlsNufftPlan?[31];
        GlsNufftPlan? plan = plans[slot];
        plans[slot] = null;
        if (plan is null) plan = GlsNufftPlan.ForAccuracy(f0, df, count, SearchSumError);
        else plan.Retarget(f0, df, count);
        return (plan, slot);
    }

    /// <summary>
    /// Spectral window |(1/N) sum exp(2 pi i f t)|^2 on the whole grid f0 + k df by the NUFFT at <see cref="SearchSumError"/>
    /// (one transform), from the same per-thread plans as <see cref="GlsForSearch"/>. For plotting next to a search
    /// periodogram; callers that need a few frequencies only are better served by direct sums.
    /// </summary>
    public static void WindowForSearch(ReadOnlySpan<double> t, double f0, double df, Span<double> window)
    {
        if (window.Length == 0) return;
        var (plan, slot) = TakeSearchPlan(f0, df, window.Length);
        try { plan.Window(t, window); }
        finally { _threadSearchPlans![slot] = plan; }
    }

    /// <summary>Cost of <see cref="WindowForSearch"/> on a grid of <paramref name="count"/> frequencies in the units of
    /// <see cref="PreferNufftForSearch"/> (one transform, spreading, output) for <paramref name="n"/> points.</summary>
    public static double WindowForSearchCost(int n, int count)
    {
        var (capacity, spread, ratio) = GlsNufftPlan.ChooseKernel(Math.Max(1, count), SearchSumError);
        double mr = GlsNufftPlan.FftLength(capacity, spread, ratio);
        return mr * Math.Log2(mr) * FftElementCost + 2.0 * n * spread + 4.0 * capacity;
    }

    /// <summary>The cost model of <see cref="GlsForSearch"/> in exact-kernel evaluations: the NUFFT's three transforms,
    /// spreading and output against N M; the NUFFT is taken when it costs less than 0.7 of the exact kernel.</summary>
    internal static bool PreferNufftForSearch(int n, int count)
    {
        if (count < 1024 || n < 16) return false;
        var (capacity, spread, ratio) = GlsNufftPlan.ChooseKernel(count, SearchSumError);
        double mr = GlsNufftPlan.FftLength(capacity, spread, ratio);
        double nufft = 3 * mr * Math.Log2(mr) * FftElementCost + 3.0 * n * 2 * spread + 12.0 * capacity;
        return nufft < 0.7 * n * (double)count;
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
