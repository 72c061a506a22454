using System.Text.Json;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>FAP, multi-term power and period-error formulas against SCIENCE.md and the committed astropy reference.</summary>
public class SignificanceTests
{
    internal static string RepoFile(params string[] parts)
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine([dir.FullName, .. parts]))) dir = dir.Parent;
        Assert.NotNull(dir);
        return Path.Combine([dir!.FullName, .. parts]);
    }

    [Theory]
    // SCIENCE.md CV-17 [X] (own code = astropy 5.2.1): N = 100, t = 0..99, f_max = 2; 1e-4 relative.
    [InlineData(0.15, 0.20302)]
    [InlineData(0.20, 1.4170e-2)]
    [InlineData(0.25, 7.1993e-4)]
    [InlineData(0.30, 2.8757e-5)]
    public void Baluev_MatchesCv17_OnRegularSampling(double z, double expected)
    {
        var t = Enumerable.Range(0, 100).Select(i => (double)i).ToArray();
        var w = Enumerable.Repeat(1.0, 100).ToArray();
        double dt = PeriodSearchEngine.WeightedVariance(t, w);
        Assert.Equal(833.25, dt, 1e-9);
        Assert.InRange(FalseAlarm.Baluev(z, 100, dt, 2.0) / expected, 1 - 1e-4, 1 + 1e-4);
    }

    [Fact]
    public void BaluevSingle_MatchesCv17_AtZ020()
        // SCIENCE.md CV-17: FAP_single at z = 0.20 = 1.9946e-5.
        => Assert.InRange(FalseAlarm.BaluevSingle(0.20, 100) / 1.9946e-5, 1 - 1e-4, 1 + 1e-4);

    [Fact]
    public void Mo99_MatchesCv19()
    {
        // SCIENCE.md CV-19 [X]: N = 100, sigma_m = 0.02, T = 100 d, A = 0.3: sigma_f = 5.1980e-5 c/d;
        // sigma_P at P = 5.366249 d = 1.497e-3 d.
        double sf = PeriodSearchEngine.Mo99FrequencyError(100, 0.02, 100, 0.3);
        Assert.InRange(sf / 5.1980e-5, 1 - 1e-4, 1 + 1e-4);
        Assert.Equal(1.497e-3, sf * 5.366249 * 5.366249, 1e-6);
    }

    [Fact]
    public void Multiband_EqualsBaluevSingleTerm_WhenOneBand()
    {
        // With one band the beta-distribution single-frequency FAP reduces to (1 - z)^((N-3)/2) (SCIENCE.md 1.1).
        double z = 0.3, n = 80, nEff = 1.5 * 400;
        double single = Math.Pow(1 - z, (n - 3) / 2);
        double expected = 1 - Math.Pow(1 - single, nEff);
        Assert.Equal(expected, FalseAlarm.Multiband(z, 80, 1, 1.5, 400), 1e-12);
    }

    [Theory]
    [InlineData(0.05, 200, 2)]
    [InlineData(0.2, 90, 3)]
    [InlineData(0.4, 60, 2)]
    public void Multiband_MatchesIncompleteBeta_WhenSeveralBands(double z, int n, int bands)
    {
        // The closed-form series must equal the regularised incomplete beta I_{1-z}((N-3B)/2, B) evaluated by a
        // general-purpose library (MathNet.Numerics SpecialFunctions.BetaRegularized), then N_eff = f_max T applied.
        double single = MathNet.Numerics.SpecialFunctions.BetaRegularized((n - 3.0 * bands) / 2, bands, 1 - z);
        double nEff = 2.0 * 300;
        double expected = 1 - Math.Pow(1 - single, nEff);
        Assert.Equal(expected, FalseAlarm.Multiband(z, n, bands, 2.0, 300), 1e-9);
    }

    [Fact]
    public void Model_MatchesIncompleteBeta_ForSixFreeParameters()
    {
        // 3 harmonics in one band (6 free parameters, 9 in all with constant and two offsets), N = 120, z = 0.3:
        // single-frequency FAP = I_{1-z}((N-9)/2, 3) (MathNet.Numerics BetaRegularized), times 3 f_max T frequencies.
        double single = MathNet.Numerics.SpecialFunctions.BetaRegularized((120 - 9) / 2.0, 3, 0.7);
        double expected = 1 - Math.Pow(1 - single, 3 * 1.25 * 500);
        Assert.Equal(expected, FalseAlarm.Model(0.3, 120, 6, 9, 3, 1.25, 500), 1e-9);
    }

    [Fact]
    public void Baluev_MatchesAstropyReference_OnCommittedDatasets()
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(RepoFile("tests", "reference", "period", "astropy_reference.json")));
        int checkedValues = 0;
        foreach (var ds in doc.RootElement.GetProperty("datasets").EnumerateArray())
        {
            var t = ds.GetProperty("t").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var dy = ds.GetProperty("dy").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var w = dy.Select(e => 1 / (e * e)).ToArray();
            double fmax = ds.GetProperty("fmax_used").GetDouble();
            double dt = PeriodSearchEngine.WeightedVariance(t, w);
            foreach (var b in ds.GetProperty("baluev").EnumerateArray())
            {
                double z = b.GetProperty("z").GetDouble(), fap = b.GetProperty("fap").GetDouble();
                double mine = FalseAlarm.Baluev(z, t.Length, dt, fmax);
                // astropy 5.2.1 LombScargle.false_alarm_probability(method='baluev') (make_reference.py).
                Assert.True(Math.Abs(mine - fap) <= 1e-9 * fap + 1e-15, $"{ds.GetProperty("name")}: z={z} astropy {fap} mine {mine}");
                checkedValues++;
            }
        }
        Assert.True(checkedValues >= 15);
    }

    [Fact]
    public void HarmonicFit_MatchesAstropyTwoTermPeriodogram_OnCommittedDatasets()
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(RepoFile("tests", "reference", "period", "astropy_reference.json")));
        int checkedValues = 0;
        foreach (var ds in doc.RootElement.GetProperty("datasets").EnumerateArray())
        {
            var t = ds.GetProperty("t").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var y = ds.GetProperty("y").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var dy = ds.GetProperty("dy").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var pts = t.Select((ti, i) => new Pipeline.LightCurvePoint(i, ti, "V", y[i], dy[i], "o")).ToList();
            var data = SearchData.Prepare(pts);
            var band = data.Bands.Single();
            double chi0 = band.Chi2Mean;
            foreach (var p in ds.GetProperty("nterms2").EnumerateArray())
            {
                double f = p.GetProperty("f").GetDouble(), power = p.GetProperty("power").GetDouble();
                double mine = 1 - HarmonicFit.Fit(band, f, 2)!.Value / chi0;
                // astropy 5.2.1 LombScargle(nterms=2).power, standard normalisation (make_reference.py).
                Assert.True(Math.Abs(mine - power) < 1e-9, $"{ds.GetProperty("name")}: f={f} astropy {power} mine {mine}");
                checkedValues++;
            }
        }
        Assert.True(checkedValues >= 20);
    }
}
