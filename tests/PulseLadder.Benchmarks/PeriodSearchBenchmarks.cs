using BenchmarkDotNet.Attributes;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Benchmarks;

/// <summary>
/// One star as in a demo campaign: V and I, ~340 points each over two seasons, nightly from one site, three
/// observers. "Kernel" is the part spent in Periodogram.Gls on the coarse grid (both bands), so the rest of
/// FindPeriods is the difference. Run: dotnet run -c Release --project tests/PulseLadder.Benchmarks -- --filter '*PeriodSearch*'
/// </summary>
[MemoryDiagnoser]
[ShortRunJob]
public class PeriodSearchBenchmarks
{
    private List<LightCurvePoint> _cepheid = [];
    private List<LightCurvePoint> _rrab = [];
    private readonly PeriodSearchSettings _settings = new();
    private PeriodSearchResult _sCep = new(), _sRr = new();

    [GlobalSetup]
    public void Setup()
    {
        _cepheid = Make(5.37, 0.8, 1);
        _rrab = Make(0.57, 0.9, 2);
        _sCep = PeriodFinder.FindPeriods(_cepheid, PulsatorClass.ClassicalCepheidFundamental, _settings);
        _sRr = PeriodFinder.FindPeriods(_rrab, PulsatorClass.RRLyraeAB, _settings);
    }

    private static List<LightCurvePoint> Make(double period, double amp, int seed)
    {
        var rng = new Random(seed);
        var pts = new List<LightCurvePoint>();
        string[] obs = ["a", "b", "c"];
        double[] zp = [0, 0.03, -0.02];
        for (int night = 0; night < 730; night++)
        {
            if (night % 365 > 240 || rng.NextDouble() < 0.3) continue;
            double t = 2_460_000.5 + night * 0.99727 + (rng.NextDouble() * 4 - 2) / 24;
            int o = rng.Next(3);
            for (int b = 0; b < 2; b++)
            {
                double ph = 2 * Math.PI * t / period;
                double a = b == 0 ? amp : 0.6 * amp;
                double m = 14 - 0.7 * b + 0.5 * a * (Math.Sin(ph) + 0.4 * Math.Sin(2 * ph + 2) + 0.2 * Math.Sin(3 * ph + 4)) + zp[o] + 0.02 * (rng.NextDouble() - 0.5) * 3.4;
                pts.Add(new LightCurvePoint(0, t + 0.004 * b, b == 0 ? "V" : "I", m, 0.02, obs[o]));
            }
        }
        return pts;
    }

    [Benchmark]
    public PeriodSearchResult FindPeriods_Cepheid() => PeriodFinder.FindPeriods(_cepheid, PulsatorClass.ClassicalCepheidFundamental, _settings);

    [Benchmark]
    public PeriodSearchResult FindPeriods_RRab() => PeriodFinder.FindPeriods(_rrab, PulsatorClass.RRLyraeAB, _settings);

    [Benchmark]
    public PeriodEstimate RefinePeriod_Cepheid() => PeriodFinder.RefinePeriod(_cepheid, _sCep.Peaks[0].Frequency, _sCep, _settings);

    [Benchmark]
    public PeriodEstimate RefinePeriod_RRab() => PeriodFinder.RefinePeriod(_rrab, _sRr.Peaks[0].Frequency, _sRr, _settings);

    [Benchmark]
    public double Kernel_Cepheid() => KernelOnly(_cepheid, PulsatorClass.ClassicalCepheidFundamental);

    [Benchmark]
    public double Kernel_RRab() => KernelOnly(_rrab, PulsatorClass.RRLyraeAB);

    private double KernelOnly(List<LightCurvePoint> pts, PulsatorClass cls)
    {
        var data = SearchData.Prepare(pts);
        var grid = FrequencyGrid.Build(data.Baseline, cls, _settings)!.Value;
        return PeriodSearchEngine.CombinedPower(data, grid)[0];
    }
}
