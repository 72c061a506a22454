using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.LightCurves;

/// <summary>Reported errors against the scatter of the same quantities over simulated noise realisations (Monte Carlo).</summary>
public sealed class UncertaintyTests
{
    [Fact]
    public void FitBands_ReportedErrors_MatchMonteCarloScatter()
    {
        const double period = 2.9, sigma = 0.02;
        var clean = FourierFitTests.Sample(ph => 15 + 0.3 * Math.Sin(2 * Math.PI * ph + 0.4) + 0.12 * Math.Sin(4 * Math.PI * ph + 2.0) + 0.05 * Math.Sin(6 * Math.PI * ph + 3.5), period, 150, err: sigma);
        var rng = new Random(5);
        var settings = new FitSettings { MaxOrder = 3 };
        var noClip = new CleaningSettings { MaxClipIterations = 0 };
        var im = new List<double>(); var r21 = new List<double>(); var p21 = new List<double>(); var amp = new List<double>(); var ep = new List<double>();
        BandFit? last = null;
        for (int k = 0; k < 300; k++)
        {
            var pts = clean.Select(p => p with { Mag = p.Mag + sigma * Gauss(rng) }).ToList();
            var f = LightCurveFitter.FitBands(pts, period, settings, noClip).Fits.Single();
            Assert.Equal(3, f.Order);
            im.Add(f.IntensityMeanMag); r21.Add(f.R21!.Value); p21.Add(f.Phi21!.Value); amp.Add(f.Amplitude);
            ep.Add(((f.EpochOfMaxBjd - 2455000.0) / period + 0.5) % 1.0 * period);
            last = f;
        }
        // Sampling error of a standard deviation from 300 draws is ~4 %; allow 20 %.
        Assert.Equal(1.0, last!.IntensityMeanErr / Std(im), 0.2);
        Assert.Equal(1.0, last.R21Err!.Value / Std(r21), 0.2);
        Assert.Equal(1.0, last.Phi21Err!.Value / Std(p21), 0.2);
        Assert.Equal(1.0, last.AmplitudeErr / Std(amp), 0.2);
        Assert.Equal(1.0, last.EpochOfMaxErr / Std(ep), 0.25);
    }

    private static double Std(List<double> v)
    {
        double m = v.Average();
        return Math.Sqrt(v.Sum(x => (x - m) * (x - m)) / (v.Count - 1));
    }

    private static double Gauss(Random r) => Math.Sqrt(-2 * Math.Log(1 - r.NextDouble())) * Math.Cos(2 * Math.PI * r.NextDouble());
}
