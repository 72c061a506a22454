using BenchmarkDotNet.Attributes;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.TimeScales;

namespace PulseLadder.Benchmarks;

/// <summary>
/// Per-star cost of the light-curve stages: FitBands for 2 bands x 300 points (Cepheid-like curve, 0.01 mag noise,
/// two observers per band, a few outliers), and the BJD_TDB conversion of 600 HJD_UTC values.
/// Run: dotnet run -c Release --project tests/PulseLadder.Benchmarks -- --filter '*LightCurveFit*'
/// </summary>
[MemoryDiagnoser]
public class LightCurveFitBenchmarks
{
    private List<LightCurvePoint> _points = [];
    private List<PulseLadder.Core.Photometry.Observation> _obs = [];
    private readonly FitSettings _fit = new();
    private readonly CleaningSettings _clean = new();
    private const double Period = 5.366;
    private static readonly SkyPosition Pos = SkyPosition.FromDegrees(337.29, 58.42);

    [GlobalSetup]
    public void Setup()
    {
        var rng = new Random(42);
        long id = 1;
        foreach (var (band, scale) in new[] { ("V", 1.0), ("I", 0.6) })
        {
            for (int i = 0; i < 300; i++)
            {
                double t = 2455000 + i * 0.731 + rng.NextDouble() * 0.2;
                double ph = (t - 2455000) / Period % 1.0;
                double m = 14 + scale * (0.38 * Math.Cos(2 * Math.PI * ph) + 0.16 * Math.Cos(4 * Math.PI * ph + 0.9) + 0.07 * Math.Cos(6 * Math.PI * ph + 1.9));
                m += 0.01 * (rng.NextDouble() + rng.NextDouble() + rng.NextDouble() - 1.5) * 2;
                if (i % 97 == 5) m += 0.4;
                string obs = i % 3 == 0 ? "B" : "A";
                if (obs == "B") m += 0.05;
                _points.Add(new LightCurvePoint(id++, t, band, m, 0.01, obs));
                _obs.Add(new(id, t, PulseLadder.Core.Photometry.TimeScale.HjdUtc, band, m, 0.01, obs, null));
            }
        }
    }

    [Benchmark]
    public int FitBands_2x300() => LightCurveFitter.FitBands(_points, Period, _fit, _clean).Fits.Count;

    [Benchmark]
    public int ToBjdTdb_600HjdUtc() => BarycentricTime.ToBjdTdb(_obs, Pos).Points.Count;
}
