using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.LightCurves;

public sealed class ClippingAndOffsetTests
{
    private static readonly FitSettings Fit = new();
    private static readonly CleaningSettings Clean = new();

    // Skewed Cepheid-like curve, 1.0 mag peak to peak (steep rise, slow decline): common-practice shape.
    private static double Cepheid(double ph)
    {
        double m = 0.38 * Math.Cos(2 * Math.PI * ph) + 0.16 * Math.Cos(4 * Math.PI * ph + 0.9) + 0.07 * Math.Cos(6 * Math.PI * ph + 1.9);
        return 14 + m * 1.0 / 1.0;
    }

    private static List<LightCurvePoint> Noisy(Func<double, double> curve, double period, int n, int seed, double sigma, string observer = "", double offset = 0, long firstId = 1, double t0 = 2455000.0)
    {
        var rng = new Random(seed);
        var pts = FourierFitTests.Sample(curve, period, n, t0, observer: observer, err: sigma, firstId: firstId);
        return pts.Select(p => p with { Mag = p.Mag + offset + sigma * Gauss(rng) }).ToList();
    }

    private static double Gauss(Random r) => Math.Sqrt(-2 * Math.Log(1 - r.NextDouble())) * Math.Cos(2 * Math.PI * r.NextDouble());

    [Fact]
    public void FitBands_KeepsMinimaOfOneMagCepheid_WhileClippingRealOutliers()
    {
        // SCIENCE.md section 8: clipping raw magnitudes eats the extremes of large-amplitude stars; clipping
        // residuals from the model must not. 300 points, 0.01 mag noise, 6 outliers of 0.15-0.5 mag.
        const double period = 5.37;
        var pts = Noisy(Cepheid, period, 300, 7, 0.01);
        double amplitude = Enumerable.Range(0, 1000).Max(k => Cepheid(k / 1000.0)) - Enumerable.Range(0, 1000).Min(k => Cepheid(k / 1000.0));
        Assert.InRange(amplitude, 0.9, 1.2);
        var outlierIds = new HashSet<long> { 10, 50, 90, 130, 170, 210 };
        double[] kicks = [0.5, -0.3, 0.15, -0.45, 0.25, -0.2];
        int kIdx = 0;
        pts = pts.Select(p => outlierIds.Contains(p.ObservationId) ? p with { Mag = p.Mag + kicks[kIdx++] } : p).ToList();

        var outcome = LightCurveFitter.FitBands(pts, period, Fit, Clean);
        var clippedIds = outcome.Clipped.Where(r => r.Reason == "clipped").Select(r => r.ObservationId).ToHashSet();
        Assert.Superset(outlierIds, clippedIds);
        Assert.All(outcome.Clipped, r => Assert.Equal("clip", r.Stage));
        Assert.True(clippedIds.Count <= outlierIds.Count + 2, "clipped " + clippedIds.Count);
        // The faintest and brightest real points (minimum and maximum light) are all kept.
        var real = pts.Where(p => !outlierIds.Contains(p.ObservationId)).ToList();
        foreach (var p in real.OrderByDescending(p => p.Mag).Take(10).Concat(real.OrderBy(p => p.Mag).Take(10)))
            Assert.DoesNotContain(p.ObservationId, clippedIds);
        var fit = outcome.Fits.Single();
        Assert.Equal(amplitude, fit.Amplitude, 0.02);
    }

    [Fact]
    public void FitBands_KeepsExtremesOfOgleCep3126V_WhileClippingInjectedOutliers()
    {
        // Real data: OGLE-LMC-CEP-3126 V (77 points, 1.2 mag amplitude), with three injected outliers.
        var row = OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv").Single(r => r["star_id"] == "OGLE-LMC-CEP-3126");
        var pts = OgleData.ToPoints(OgleData.ReadLightCurve("lmc-cepheids", row["V_file"], "V"), row.D("ra_deg"), row.D("dec_deg"));
        var clean = LightCurveFitter.FitBands(pts, row.D("period_d"), Fit, Clean);
        var injected = new HashSet<long> { pts[5].ObservationId, pts[30].ObservationId, pts[60].ObservationId };
        var dirty = pts.Select(p => injected.Contains(p.ObservationId) ? p with { Mag = p.Mag + 0.4 } : p).ToList();
        var outcome = LightCurveFitter.FitBands(dirty, row.D("period_d"), Fit, Clean);
        var clipped = outcome.Clipped.Select(r => r.ObservationId).ToHashSet();
        Assert.Superset(clipped, injected);
        foreach (var p in pts.OrderByDescending(p => p.Mag).Take(5).Concat(pts.OrderBy(p => p.Mag).Take(5)))
            Assert.DoesNotContain(p.ObservationId, clipped);
        Assert.Equal(clean.Fits.Single().IntensityMeanMag, outcome.Fits.Single().IntensityMeanMag, 0.005);
    }

    [Fact]
    public void FitBands_RecoversObserverOffsets_WithErrors()
    {
        const double period = 3.1;
        var pts = Noisy(Cepheid, period, 150, 1, 0.01, "A")
            .Concat(Noisy(Cepheid, period, 60, 2, 0.01, "B", offset: 0.150, firstId: 1000, t0: 2455000.31))
            .Concat(Noisy(Cepheid, period, 40, 3, 0.02, "C", offset: -0.080, firstId: 2000, t0: 2455000.77))
            .ToList();
        var outcome = LightCurveFitter.FitBands(pts, period, Fit, Clean);
        var fit = outcome.Fits.Single();
        Assert.Equal("A", fit.ReferenceObserver);
        var b = outcome.Offsets.Single(o => o.Observer == "B");
        var c = outcome.Offsets.Single(o => o.Observer == "C");
        Assert.InRange(b.Offset - 0.150, -4 * b.Error, 4 * b.Error);
        Assert.InRange(c.Offset + 0.080, -4 * c.Error, 4 * c.Error);
        Assert.InRange(b.Error, 0.0005, 0.005);
        Assert.Equal(14.0, fit.A0, 0.01);
        // Kept points are unshifted; CorrectedMag applies the offset.
        var kb = outcome.Kept.First(p => p.Observer == "B");
        Assert.Equal(kb.Mag - b.Offset, outcome.CorrectedMag(kb), 1e-12);
        Assert.Equal(pts.Single(p => p.ObservationId == kb.ObservationId).Mag, kb.Mag);
    }

    [Fact]
    public void FitBands_RejectsBadNight_WhenOneNightIsFarNoisier()
    {
        // 25 nights of 6 points each by one observer (nights spread over the phases), 0.01 mag noise; one night
        // with 0.15 mag scatter.
        const double period = 7.3;
        var rng = new Random(11);
        var pts = new List<LightCurvePoint>();
        long id = 1;
        for (int night = 0; night < 25; night++)
        {
            for (int k = 0; k < 6; k++)
            {
                double t = 2455000.0 + night * 7.3 * 1.6180339887 + k * 0.02;
                double ph = ((t - 2455000.0) / period) % 1.0;
                double noise = (night == 5 ? 0.15 : 0.01) * Gauss(rng);
                pts.Add(new LightCurvePoint(id++, t, "V", Cepheid(ph) + noise, 0.01, "obs"));
            }
        }
        var outcome = LightCurveFitter.FitBands(pts, period, Fit, Clean);
        var bad = outcome.Clipped.Where(r => r.Reason == "bad_night").Select(r => r.ObservationId).ToHashSet();
        var night5 = Enumerable.Range(31, 6).Select(i => (long)i).ToHashSet();
        Assert.Equal(night5, bad);
        Assert.All(outcome.Clipped, r => Assert.Contains(r.ObservationId, night5));
        Assert.All(outcome.Clipped, r => Assert.Equal("clip", r.Stage));
    }

    [Fact]
    public void FitBands_UsesTemplate_ForBandWithFewPoints()
    {
        const double period = 4.4;
        var v = Noisy(Cepheid, period, 200, 4, 0.01);
        // Six B points with 1.4x the V amplitude: far too few for an own shape of order >= 2.
        var b = FourierFitTests.Sample(ph => 14.6 + 1.4 * (Cepheid(ph) - 14), period, 6, band: "B", err: 0.01, firstId: 5000);
        var outcome = LightCurveFitter.FitBands(v.Concat(b).ToList(), period, Fit, Clean);
        var fb = outcome.Fits.Single(f => f.Band == "B");
        Assert.Contains("template_fit:V", fb.Flags);
        Assert.Equal(1.4, fb.TemplateScale!.Value, 0.05);
        Assert.Null(fb.R21);
        // Same phase zero for both bands; Evaluate reproduces the B points.
        var fv = outcome.Fits.Single(f => f.Band == "V");
        Assert.Equal(fv.PhaseZeroBjd, fb.PhaseZeroBjd);
        foreach (var p in b)
        {
            double ph = ((p.Bjd - fb.PhaseZeroBjd) / period) % 1.0;
            Assert.Equal(p.Mag, fb.Evaluate(ph < 0 ? ph + 1 : ph), 0.03);
        }
    }

    [Fact]
    public void FitBands_NeverThrows_OnOddInput()
    {
        Assert.Empty(LightCurveFitter.FitBands([], 1.0, Fit, Clean).Fits);
        var three = FourierFitTests.Sample(ph => 10 + 0.3 * Math.Sin(2 * Math.PI * ph), 2.0, 3);
        var r3 = LightCurveFitter.FitBands(three, 2.0, Fit, Clean);
        Assert.Empty(r3.Fits);
        Assert.Equal(3, r3.Clipped.Count(r => r.Reason == "band_too_sparse"));
        Assert.Empty(LightCurveFitter.FitBands(three, double.NaN, Fit, Clean).Fits);
        Assert.Empty(LightCurveFitter.FitBands(three, -1, Fit, Clean).Fits);
        // Period longer than the baseline: fitted with a flag, no NaN.
        var shortSpan = Enumerable.Range(0, 20).Select(i => new LightCurvePoint(i, 2455000 + i * 0.5, "V", 10 + 0.01 * i, 0.01, "")).ToList();
        var longP = LightCurveFitter.FitBands(shortSpan, 40.0, Fit, Clean).Fits.Single();
        Assert.Contains("period_exceeds_baseline", longP.Flags);
        Assert.Contains("poor_phase_coverage", longP.Flags);
        Assert.True(double.IsFinite(longP.IntensityMeanMag) && double.IsFinite(longP.Amplitude) && double.IsFinite(longP.EpochOfMaxBjd));
        // Non-finite points are reported, not thrown on.
        var withNan = shortSpan.Append(new LightCurvePoint(99, double.NaN, "V", 10, 0.01, "")).ToList();
        Assert.Contains(LightCurveFitter.FitBands(withNan, 3.0, Fit, Clean).Clipped, r => r.ObservationId == 99 && r.Reason == "non_finite");
    }
}
