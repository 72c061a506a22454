using PulseLadder.Core.Extinction;

namespace PulseLadder.Core.Tests.Extinction;

public class ExtinctionLawsTests
{
    // SCIENCE.md CV-9: CCM89 formula evaluated with Python (astropy 5.2.1 environment) [X];
    // CCM89 Table 3 quotes I 0.479, K 0.114, J 0.282, H 0.190 [M].
    [Theory]
    [InlineData(0.90, 0.4788)]
    [InlineData(2.20, 0.1135)]
    [InlineData(1.25, 0.2821)]
    [InlineData(1.60, 0.1896)]
    [InlineData(0.44, 1.3245)]
    [InlineData(0.5495, 1.0000)]
    public void AOverAv_MatchesCv9_ForCcm89AtRv31(double lambda, double expected)
        => Assert.Equal(expected, ExtinctionLaws.AOverAv(ExtinctionLaw.Ccm89, lambda, 3.1), 5e-4);

    // SCIENCE.md CV-10: O'Donnell 1994 optical polynomial [X].
    [Theory]
    [InlineData(0.44, 1.3222)]
    [InlineData(0.70, 0.7538)]
    [InlineData(0.80, 0.6079)]
    public void AOverAv_MatchesCv10_ForOdonnell94AtRv31(double lambda, double expected)
        => Assert.Equal(expected, ExtinctionLaws.AOverAv(ExtinctionLaw.Odonnell94, lambda, 3.1), 5e-4);

    // SCIENCE.md 4.2 table, O'Donnell column at U (0.365 um) and R (0.700) [X]; the infrared part is CCM89's.
    [Fact]
    public void AOverAv_EqualsCcm_InInfraredForOdonnell94()
        => Assert.Equal(ExtinctionLaws.AOverAv(ExtinctionLaw.Ccm89, 2.2, 3.1), ExtinctionLaws.AOverAv(ExtinctionLaw.Odonnell94, 2.2, 3.1), 12);

    // Reference: scipy 1.10.1 natural CubicSpline through the F99 anchors, script f99_reference.py beside this file.
    [Theory]
    [InlineData(0.15, 3.1, 2.602508)]
    [InlineData(0.22, 3.1, 3.053047)]
    [InlineData(0.365, 3.1, 1.528850)]
    [InlineData(0.44, 3.1, 1.309258)]
    [InlineData(0.5495, 3.1, 0.979047)]
    [InlineData(0.64, 3.1, 0.789745)]
    [InlineData(0.8, 3.1, 0.553337)]
    [InlineData(1.235, 3.1, 0.262057)]
    [InlineData(2.159, 3.1, 0.111970)]
    [InlineData(3.0, 3.1, 0.073157)]
    [InlineData(0.15, 2.5, 3.521695)]
    [InlineData(0.44, 2.5, 1.382428)]
    [InlineData(0.8, 2.5, 0.516932)]
    [InlineData(2.159, 2.5, 0.113310)]
    [InlineData(0.22, 5.0, 2.094978)]
    [InlineData(0.5495, 5.0, 0.987845)]
    [InlineData(1.235, 5.0, 0.261333)]
    public void AOverAv_MatchesScipySpline_ForFitzpatrick99(double lambda, double rv, double expected)
        => Assert.Equal(expected, ExtinctionLaws.AOverAv(ExtinctionLaw.Fitzpatrick99, lambda, rv), 2e-6);

    // F99 UV coefficients at R_V = 3.1: c2 = -0.824 + 4.717/3.1 = 0.6976, c1 = 2.030 - 3.007 c2 = -0.0677
    // (SCIENCE.md 4.1: "c1 ~ -0.07, c2 ~ 0.70", consistent with a public implementation's README [C]).
    // At the FM90 branch A/E(B-V) = c1 + c2 x + c3 D(x) + R_V; at x = 1/0.26 um^-1 the spline must join it.
    [Fact]
    public void AOverEbv_IsContinuous_AtFitzpatrick99SplineJoin()
    {
        double below = ExtinctionLaws.AOverEbv(ExtinctionLaw.Fitzpatrick99, 0.270001, 3.1);
        double above = ExtinctionLaws.AOverEbv(ExtinctionLaw.Fitzpatrick99, 0.269999, 3.1);
        Assert.Equal(below, above, 1e-3);
    }

    // SCIENCE.md CV-11: IRSA dust-service table (astroquery irsa_dust test data) [C], exact lookup.
    [Theory]
    [InlineData("CTIO", "V", 3.240, 2.682)]
    [InlineData("UKIRT", "K", 0.367, 0.302)]
    [InlineData("SDSS", "g", 3.793, 3.303)]
    public void TryGet_ReturnsIrsaCoefficients_ForCv11Bands(string system, string band, double sfd, double sf)
    {
        Assert.True(ExtinctionCoefficients.TryGet(system, band, CoefficientTable.Sfd98, out var a));
        Assert.True(ExtinctionCoefficients.TryGet(system, band, CoefficientTable.Sf11, out var b));
        Assert.Equal(sfd, a, 12);
        Assert.Equal(sf, b, 12);
    }

    [Fact]
    public void AOverAv_Throws_OutsideCcmRange()
        => Assert.Throws<ArgumentOutOfRangeException>(() => ExtinctionLaws.AOverAv(ExtinctionLaw.Ccm89, 5.0, 3.1));

    // Every accepted band has a documented effective wavelength (docs/calibrations.md) inside the laws' range.
    [Fact]
    public void BandWavelengths_CoverEveryKnownBand()
    {
        foreach (var band in PulseLadder.Core.Photometry.Bands.Known.Keys)
        {
            Assert.True(BandWavelengths.TryGet(band, out var lam), band);
            Assert.InRange(BandWavelengths.AOverAv(band, ExtinctionLaw.Ccm89, 3.1), 0.05, 1.7);
            Assert.InRange(lam, 0.3, 3.0);
        }
    }
}
