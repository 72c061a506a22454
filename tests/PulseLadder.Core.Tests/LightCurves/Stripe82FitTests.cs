using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;

namespace PulseLadder.Core.Tests.LightCurves;

/// <summary>
/// SDSS Stripe 82 RR Lyrae (tests/data/open/stripe82-rrlyrae; Sesar et al. 2010, ApJ 708, 717, Tables 2-3): about
/// 100-130 epochs over nine years in five bands, fitted at the catalogue period.
/// </summary>
public sealed class Stripe82FitTests
{
    public static TheoryData<string> Ids()
    {
        var d = new TheoryData<string>();
        foreach (var r in OgleData.Catalogue("stripe82-rrlyrae/catalogue.csv")) d.Add(r["id"]);
        return d;
    }

    [Theory]
    [MemberData(nameof(Ids))]
    public void FitBands_RIntensityMeanMatchesSesar2010_AfterTheirExtinction(string id)
    {
        var row = OgleData.Catalogue("stripe82-rrlyrae/catalogue.csv").Single(r => r["id"] == id);
        var fits = LightCurveFitter.FitBands(OgleData.Stripe82Points(row), row.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;
        Assert.Equal(5, fits.Count);
        var r = fits.Single(f => f.Band == "r");
        // Sesar's rF is flux-averaged and dereddened with A_r (SFD): add it back to compare with the observed mean.
        Assert.InRange(r.IntensityMeanMag - (row.D("rF") + row.D("A_r_SFD")), -0.02, 0.02);
        Assert.All(fits, f => Assert.Equal("fourier", f.Model));
        Assert.All(fits, f => Assert.True(f.Order >= 3));
    }
}
