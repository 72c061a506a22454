using BenchmarkDotNet.Attributes;
using PulseLadder.Kernels;

namespace PulseLadder.Benchmarks;

/// <summary>
/// Exact GLS kernel: one periodogram of N points x M frequencies per operation; evaluations/s = N M / mean time.
/// Run: dotnet run -c Release --project tests/PulseLadder.Benchmarks -- --filter '*ExactGls*'
/// </summary>
[MemoryDiagnoser]
[WarmupCount(2)]
[IterationCount(5)]
[InvocationCount(1)]
public class ExactGlsBenchmarks
{
    private double[] _t = [], _y = [], _w = [], _power = [];
    private GlsPlan _plan = null!;

    [Params(300, 3000)]
    public int N { get; set; }

    [Params(100_000, 1_000_000)]
    public int M { get; set; }

    [ParamsSource(nameof(SupportedVariants))]
    public GlsVariant Variant { get; set; }

    [Params(1, 2)]
    public int Threads { get; set; }

    // The scalar variant is ~15x slower; it has its own smaller class below so a full run stays within minutes.
    public static IEnumerable<GlsVariant> SupportedVariants =>
        Enum.GetValues<GlsVariant>().Where(v => v != GlsVariant.Scalar && GlsVariantPicker.IsSupported(v));

    [GlobalSetup]
    public void Setup()
    {
        (_t, _y, _w) = Synthetic.Irregular(N, 42, 3000.0);
        _power = new double[M];
        _plan = new GlsPlan(0.01, 10.0 / M, M, Variant, Threads);
        _plan.Execute(_t, _y, _w, _power);
    }

    [Benchmark]
    public void Exact() => _plan.Execute(_t, _y, _w, _power);
}

/// <summary>Scalar variant of the exact kernel (portable fallback), one core, N = 3000, M = 1e5.</summary>
[WarmupCount(1)]
[IterationCount(3)]
[InvocationCount(1)]
public class ScalarGlsBenchmarks
{
    private double[] _t = [], _y = [], _w = [], _power = [];
    private GlsPlan _plan = null!;

    [GlobalSetup]
    public void Setup()
    {
        (_t, _y, _w) = Synthetic.Irregular(3000, 42, 3000.0);
        _power = new double[100_000];
        _plan = new GlsPlan(0.01, 1e-4, _power.Length, GlsVariant.Scalar, 1);
    }

    [Benchmark]
    public void Scalar() => _plan.Execute(_t, _y, _w, _power);
}

/// <summary>
/// NUFFT GLS (one core) at the sizes of issue 3.
/// Run: dotnet run -c Release --project tests/PulseLadder.Benchmarks -- --filter '*NufftGls*'
/// </summary>
[MemoryDiagnoser]
[WarmupCount(2)]
[IterationCount(5)]
[InvocationCount(1)]
public class NufftGlsBenchmarks
{
    private double[] _t = [], _y = [], _w = [], _power = [];
    private GlsNufftPlan _plan = null!;

    [ParamsSource(nameof(Sizes))]
    public (int N, int M) Size { get; set; }

    public static IEnumerable<(int N, int M)> Sizes => [(30_000, 1_000_000), (3000, 100_000), (300, 1_000_000)];

    [GlobalSetup]
    public void Setup()
    {
        (_t, _y, _w) = Synthetic.Irregular(Size.N, 42, 3000.0);
        _power = new double[Size.M];
        _plan = new GlsNufftPlan(0.01, 10.0 / Size.M, Size.M);
        _plan.Execute(_t, _y, _w, _power);
    }

    [Benchmark]
    public void Nufft() => _plan.Execute(_t, _y, _w, _power);
}
