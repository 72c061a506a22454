using BenchmarkDotNet.Attributes;
using PulseLadder.Core.Distances;
using PulseLadder.Core.Extinction;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Benchmarks;

/// <summary>Per-star distance stage (docs/PERFORMANCE.md, section "Distances"). Target: under 2 ms per star.</summary>
[MemoryDiagnoser]
public class DistanceBenchmarks
{
    private readonly StarInfo _star = new("bench", "F", SkyPosition.FromDegrees(10, 10), null, 0.3, 0.03, null);
    private readonly BandFit[] _vik =
    [
        new() { Band = "V", IntensityMeanMag = 12.1, IntensityMeanErr = 0.01 },
        new() { Band = "I", IntensityMeanMag = 11.2, IntensityMeanErr = 0.01 },
        new() { Band = "Ks", IntensityMeanMag = 10.3, IntensityMeanErr = 0.02 },
    ];

    [Params(ExtinctionLaw.Ccm89, ExtinctionLaw.Fitzpatrick99)]
    public ExtinctionLaw Law { get; set; }

    [Params(0, 2000)]
    public int Draws { get; set; }

    [Benchmark]
    public DistanceResult CepheidFourRoutes()
        => DistanceEstimator.EstimateDistance(_star, PulsatorClass.ClassicalCepheidFundamental, 9.3, 0.001, _vik,
            new DistanceSettings { ExtinctionLaw = Law, MonteCarloDraws = Draws });
}
