using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.LightCurves;

public sealed class FourierFitTests
{
    private static readonly FitSettings Fit = new();
    private static readonly CleaningSettings Clean = new();

    // SCIENCE.md 7.1: the D30 light curve (all errors 0.030 mag).
    private static readonly double[] D30T =
    [
        0.44233, 1.44484, 3.42126, 4.34569, 5.31465, 6.40263, 8.36602, 9.31831, 11.37428, 12.30516,
        13.43640, 15.33882, 16.39938, 17.34676, 19.37801, 24.38201, 25.32773, 26.44544, 27.41627, 29.44092,
        30.43422, 31.38968, 32.43828, 33.31327, 35.32940, 37.30678, 39.34880, 41.35830, 42.34070, 43.42431,
    ];
    private static readonly double[] D30M =
    [
        8.1329, 8.3210, 7.6999, 7.6785, 7.9963, 8.3545, 7.9000, 7.6739, 8.2327, 8.3186,
        7.9462, 7.7611, 8.1153, 8.3356, 7.8105, 7.8784, 7.6813, 7.8561, 8.1903, 8.0278,
        7.7210, 7.7400, 8.1422, 8.3480, 7.9256, 7.8687, 8.2919, 7.6608, 7.7347, 8.2227,
    ];

    private static List<LightCurvePoint> D30() =>
        D30T.Select((t, i) => new LightCurvePoint(i + 1, t, "V", D30M[i], 0.030, "")).ToList();

    /// <summary>Points sampling m(phi) from <paramref name="t0"/> on over many cycles (phase origin 2455000.0), noiseless.</summary>
    internal static List<LightCurvePoint> Sample(Func<double, double> curve, double period, int n, double t0 = 2455000.0, string band = "V", string observer = "", double err = 0.01, long firstId = 1)
    {
        var pts = new List<LightCurvePoint>(n);
        for (int i = 0; i < n; i++)
        {
            // Irrational step in phase so the sampling is dense and not commensurate with the period.
            double t = t0 + i * period * 1.6180339887 + (i % 7) * 0.013;
            double ph = ((t - 2455000.0) / period) % 1.0;
            if (ph < 0) ph += 1;
            pts.Add(new LightCurvePoint(firstId + i, t, band, curve(ph), err, observer));
        }
        return pts;
    }

    private static double Cv23(double ph) =>
        10 + 0.4 * Math.Sin(2 * Math.PI * ph + 1.0) + 0.2 * Math.Sin(4 * Math.PI * ph + 2.5) + 0.1 * Math.Sin(6 * Math.PI * ph + 4.0);

    [Fact]
    public void FitBands_RecoversFourierParametersAndMeans_OfCv23Curve()
    {
        // SCIENCE.md CV-23 (analytic + astropy-era numpy check).
        const double period = 1.7;
        var fit = LightCurveFitter.FitBands(Sample(Cv23, period, 200), period, Fit, Clean).Fits.Single();
        Assert.Equal(3, fit.Order);
        Assert.Equal(0.5, fit.R21!.Value, 1e-6);
        Assert.Equal(0.25, fit.R31!.Value, 1e-6);
        Assert.Equal(0.5, fit.Phi21!.Value, 1e-6);
        Assert.Equal(1.0, fit.Phi31!.Value, 1e-6);
        Assert.Equal(2.070796, fit.Phi21Cosine!.Value, 1e-6);
        Assert.Equal(4.141593, fit.Phi31Cosine!.Value, 1e-6);
        Assert.Equal(1.08841, fit.Amplitude, 1e-4);
        Assert.Equal(10.000, fit.MagnitudeMean, 1e-4);
        Assert.Equal(9.949576, fit.IntensityMeanMag, 1e-4);
        double phaseOfMax = ((fit.EpochOfMaxBjd - 2455000.0) / period) % 1.0;
        Assert.Equal(0.67179, phaseOfMax, 1e-4);
    }

    [Theory]
    // SCIENCE.md CV-24: <m> - <m>_int = 2.5 log10 I0(0.4 ln10 A) for a sinusoid of semi-amplitude A.
    [InlineData(0.1, 0.002301)]
    [InlineData(0.25, 0.014344)]
    [InlineData(0.5, 0.056819)]
    public void FitBands_IntensityMeanOfSinusoid_MatchesBesselFormula(double semiAmplitude, double expected)
    {
        var fit = LightCurveFitter.FitBands(Sample(ph => 12 + semiAmplitude * Math.Sin(2 * Math.PI * ph), 3.3, 120), 3.3, Fit, Clean).Fits.Single();
        Assert.Equal(1, fit.Order);
        Assert.Equal(expected, fit.MagnitudeMean - fit.IntensityMeanMag, 1e-6);
        Assert.Equal(2 * semiAmplitude, fit.Amplitude, 1e-9);
    }

    [Fact]
    public void FitBands_ChoosesOrderOneByBic_OnD30()
    {
        // SCIENCE.md CV-21: orders 1..4 at f = 0.1860514: BIC 40.160, 45.379, 50.843, 55.546 -> n = 1;
        // A0 = 8.003205, p-p 0.674516, intensity mean 7.977171; epoch of max of n = 1 at t = 3.99660 (+ k P).
        double period = 1 / 0.1860514;
        var outcome = LightCurveFitter.FitBands(D30(), period, Fit, Clean);
        var fit = outcome.Fits.Single();
        Assert.Empty(outcome.Clipped);
        Assert.Equal(1, fit.Order);
        double[] bic = [40.160, 45.379, 50.843, 55.546];
        for (int n = 1; n <= 4; n++)
            Assert.Equal(bic[n - 1], fit.OrderScores.Single(s => s.Order == n).Bic, 1e-3);
        Assert.Equal(8.003205, fit.A0, 1e-4);
        Assert.Equal(0.674516, fit.Amplitude, 1e-4);
        Assert.Equal(7.977171, fit.IntensityMeanMag, 1e-4);
        double cycles = (fit.EpochOfMaxBjd - 3.99660) / period;
        Assert.Equal(Math.Round(cycles), cycles, 1e-4);
        // "nearest the middle of the data" (docs/light-curves.md)
        Assert.True(Math.Abs(fit.EpochOfMaxBjd - (0.44233 + 43.42431) / 2) <= period / 2);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(0.37)]
    [InlineData(13.21)]
    public void FitBands_FourierParametersInvariant_UnderTimeShift(double shiftDays)
    {
        // Invariant (CONVENTIONS.md 5): R_k1 and phi_k1 do not depend on the phase origin; a shift by whole
        // periods leaves everything unchanged, an arbitrary shift moves the epoch by the shift.
        const double period = 2.345;
        var basePts = Sample(Cv23, period, 150);
        var a = LightCurveFitter.FitBands(basePts, period, Fit, Clean).Fits.Single();
        foreach (double shift in new[] { 7 * period, shiftDays })
        {
            var moved = basePts.Select(p => p with { Bjd = p.Bjd + shift }).ToList();
            var b = LightCurveFitter.FitBands(moved, period, Fit, Clean).Fits.Single();
            Assert.Equal(a.R21!.Value, b.R21!.Value, 1e-9);
            Assert.Equal(a.R31!.Value, b.R31!.Value, 1e-9);
            Assert.Equal(0, OgleFitTests.AngleDiff(a.Phi21!.Value, b.Phi21!.Value), 1e-8);
            Assert.Equal(0, OgleFitTests.AngleDiff(a.Phi31!.Value, b.Phi31!.Value), 1e-8);
            Assert.Equal(a.IntensityMeanMag, b.IntensityMeanMag, 1e-9);
            double cycles = (b.EpochOfMaxBjd - a.EpochOfMaxBjd - shift) / period;
            Assert.Equal(Math.Round(cycles), cycles, 1e-7);
        }
    }

    [Fact]
    public void BandFitEvaluate_ReproducesModel_AtPhaseFromPhaseZero()
    {
        const double period = 1.7;
        var pts = Sample(Cv23, period, 200);
        var fit = LightCurveFitter.FitBands(pts, period, Fit, Clean).Fits.Single();
        foreach (var p in pts)
        {
            double ph = ((p.Bjd - fit.PhaseZeroBjd) / period) % 1.0;
            if (ph < 0) ph += 1;
            Assert.Equal(p.Mag, fit.Evaluate(ph), 1e-8);
        }
        // Phase zero is the epoch of maximum light (minimum magnitude) of the best-sampled band.
        double min = Enumerable.Range(0, 10000).Min(k => fit.Evaluate(k / 10000.0));
        Assert.True(fit.Evaluate(0.0) <= min + 1e-9);
        Assert.Equal(0, ((fit.EpochOfMaxBjd - fit.PhaseZeroBjd) / period) - Math.Round((fit.EpochOfMaxBjd - fit.PhaseZeroBjd) / period), 1e-9);
    }
}
