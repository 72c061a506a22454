using BenchmarkDotNet.Attributes;
using PulseLadder.Demo;

namespace PulseLadder.Benchmarks;

/// <summary>Default demo campaign: generation alone and generation plus rendering of every file (target: under 2 s).</summary>
[MemoryDiagnoser]
public class DemoBenchmarks
{
    [Benchmark]
    public int Generate() => DemoCampaign.Generate(new DemoOptions()).Measurements.Count;

    [Benchmark]
    public int GenerateAndRender() => DemoCampaign.Render(DemoCampaign.Generate(new DemoOptions())).Sum(f => f.Content.Length);
}
