using PulseLadder.Core.Photometry;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>Invariants of the multiband search on synthetic data with known truth (SyntheticCampaign).</summary>
public class MultibandModelTests
{
    private static readonly PeriodSearchSettings S = new();

    [Fact]
    public void FindPeriods_RecoversInjectedObserverOffsets_WithinThreeSigma()
    {
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.Cepheid, 77);
        var r = PeriodFinder.FindPeriods(star.Points, PulsatorClass.ClassicalCepheidFundamental, S);
        var e = PeriodFinder.RefinePeriod(star.Points, r.Peaks[0].Frequency, r, S);
        foreach (var offsets in new[] { r.ObserverOffsets, e.ObserverOffsets })
        {
            Assert.Equal(6, offsets.Count);
            foreach (var o in offsets)
            {
                var truth = SyntheticCampaign.Observers.Single(x => x.Name == o.Observer);
                // Offsets are relative to the band's reference observer (the one with most points: alice, share 0.5).
                double expected = o.Band == "V" ? truth.V : truth.I;
                if (o.Observer == "alice") { Assert.Equal(0, o.Offset); continue; }
                Assert.InRange(o.Error, 1e-4, 0.01);
                Assert.True(Math.Abs(o.Offset - expected) < 3 * o.Error, $"{o.Band} {o.Observer}: {o.Offset} +- {o.Error} vs {expected}");
            }
        }
    }

    [Fact]
    public void FindPeriods_SearchesAgainWithOffsetsRemoved_WhenOffsetsAreLarge()
    {
        // bob's zero point pushed 0.15 mag further in both bands: comparable with an RRc amplitude.
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.RRc, 21);
        var pts = star.Points.Select(p => p.Observer == "bob" ? p with { Mag = p.Mag + 0.15 } : p).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.RRLyraeC, S with { Oversampling = 5 });
        Assert.Contains("offsets_removed_second_pass", r.Notes);
        Assert.Equal(1 / star.PeriodDays, r.Peaks[0].Frequency, 0.25 / r.BaselineDays);
        var bobV = r.ObserverOffsets.Single(o => o.Band == "V" && o.Observer == "bob");
        Assert.True(Math.Abs(bobV.Offset - (0.035 + 0.15)) < 3 * bobV.Error, $"{bobV.Offset} +- {bobV.Error}");
        // The unmodified star does not need the second pass.
        var plain = PeriodFinder.FindPeriods(star.Points, PulsatorClass.RRLyraeC, S with { Oversampling = 5 });
        Assert.DoesNotContain("offsets_removed_second_pass", plain.Notes);
    }

    [Fact]
    public void FindPeriods_UsesMultibandFap_WhenTwoBands()
    {
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.RRc, 5);
        var r = PeriodFinder.FindPeriods(star.Points, PulsatorClass.RRLyraeC, S with { Oversampling = 5 });
        Assert.Equal(["I", "V"], r.Bands);
        Assert.All(r.Peaks, p => Assert.Equal("multiband_beta_naive_neff", p.FapMethod));
        Assert.True(r.Peaks[0].Fap < 1e-10);
        Assert.True(r.Periodogram.X.Length <= 2000);
        // The plot keeps the highest grid value, which lies within one grid step of the refined best peak.
        int iMax = Array.IndexOf(r.Periodogram.Y, r.Periodogram.Y.Max());
        Assert.True(Math.Abs(r.Periodogram.X[iMax] - r.Peaks.MaxBy(p => p.Power)!.Frequency) <= r.FrequencyStep);
    }

    [Fact]
    public void FindPeriods_ReportsNoSignificantPeriod_WhenPureNoise()
    {
        var rng = new Random(12);
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.Cepheid, 9);
        // Same sampling and errors, magnitudes replaced by white noise of the stated errors.
        var pts = star.Points.Select(p => p with { Mag = 12 + p.MagErr * Gauss(rng) }).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.ClassicalCepheidFundamental, S);
        Assert.Equal("no_significant_period", r.FailureReason);
        // Peaks are still listed for a reviewer.
        Assert.Equal(S.TopPeaks, r.Peaks.Count);
    }

    [Fact]
    public void RefinePeriod_FindsPeakNearby_WhenReviewerFrequencyIsOffGrid()
    {
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.RRab, 31);
        var r = PeriodFinder.FindPeriods(star.Points, PulsatorClass.RRLyraeAB, S with { Oversampling = 5 });
        double fTrue = 1 / star.PeriodDays;
        // A reviewer types a period rounded to 3 decimals (not a grid point, not a listed peak).
        double typed = 1 / Math.Round(star.PeriodDays, 3);
        var e = PeriodFinder.RefinePeriod(star.Points, typed, r, S);
        Assert.Null(e.FailureReason);
        Assert.True(Math.Abs(e.Frequency - fTrue) < 4 * e.FrequencyErr, $"{e.Frequency} +- {e.FrequencyErr} vs {fTrue}");
    }

    [Fact]
    public void RefinePeriod_FlagsPdmDisagreement_WhenGivenAnAlias()
    {
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.RRab, 44);
        var r = PeriodFinder.FindPeriods(star.Points, PulsatorClass.RRLyraeAB, S with { Oversampling = 5 });
        double fTrue = 1 / star.PeriodDays;
        var alias = r.Peaks.FirstOrDefault(p => Math.Abs(Math.Abs(p.Frequency - fTrue) - 1.0027379) < 0.01);
        Assert.NotNull(alias);
        var e = PeriodFinder.RefinePeriod(star.Points, alias!.Frequency, r, S);
        Assert.True(e.PdmDisagrees);
        Assert.Equal(star.PeriodDays, e.PdmPreferredPeriodDays!.Value, 1e-3);
    }

    [Fact]
    public void FindPeriods_IsUnchanged_WhenTimesShiftByWholePeriods()
    {
        // Invariant (CONVENTIONS.md 5): shifting all times by a whole number of periods leaves the fold unchanged;
        // the best frequency must not move by more than the refinement tolerance.
        var d30 = D30.Points();
        var shifted = d30.Select(p => p with { Bjd = p.Bjd + 1000 * 5.37486 }).ToList();
        var s = S with { MinPeriodDays = 0.5, MaxPeriodDays = 50 };
        var a = PeriodFinder.FindPeriods(d30, PulsatorClass.Unknown, s);
        var b = PeriodFinder.FindPeriods(shifted, PulsatorClass.Unknown, s);
        Assert.Equal(a.Peaks[0].Frequency, b.Peaks[0].Frequency, 1e-7);
        Assert.Equal(a.Peaks[0].Power, b.Peaks[0].Power, 1e-9);
    }

    private static double Gauss(Random rng)
        => Math.Sqrt(-2 * Math.Log(1.0 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
}

public class DoublePeriodTests
{
    /// <summary>RV Tauri-like curve: deep and shallow minima alternate, so most power sits at twice the formal
    /// frequency (the usual description of RV Tau light curves; amplitudes chosen here).</summary>
    private static List<Pipeline.LightCurvePoint> RvTau(double period, int seed, double alternation)
    {
        var rng = new Random(seed);
        var pts = new List<Pipeline.LightCurvePoint>();
        for (int night = 0; night < 730; night++)
        {
            if (night % 365 > 240 || rng.NextDouble() < 0.3) continue;
            double t = 2_460_000.5 + night * 0.99727 + (rng.NextDouble() * 4 - 2) / 24;
            double ph = 2 * Math.PI * t / period;
            double m = 13 + 0.5 * Math.Sin(2 * ph) + 0.12 * Math.Sin(4 * ph + 1) + alternation * Math.Sin(ph + 0.5)
                + 0.02 * Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
            pts.Add(new Pipeline.LightCurvePoint(0, t, "I", m, 0.02, "a"));
        }
        return pts;
    }

    [Fact]
    public void FindPeriods_OffersFormalPeriod_WhenMinimaAlternate()
    {
        var pts = RvTau(36.5, 1, 0.1);
        // By default the double period is listed last for the reviewer...
        var listed = PeriodFinder.FindPeriods(pts, PulsatorClass.TypeIICepheid, new PeriodSearchSettings());
        Assert.Contains("double_period_favoured", listed.Notes);
        Assert.Equal(36.5 / 2, listed.Peaks[0].PeriodDays, 0.05);
        Assert.Equal(36.5, listed.Peaks[^1].PeriodDays, 0.1);
        Assert.Contains(listed.Peaks[^1].Aliases, a => a.StartsWith("double_period_of:", StringComparison.Ordinal));
        // ...and chosen when asked.
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.TypeIICepheid, new PeriodSearchSettings { PreferDoublePeriod = true });
        Assert.Null(r.FailureReason);
        Assert.Contains("double_period_preferred", r.Notes);
        Assert.Equal(36.5, r.Peaks[0].PeriodDays, 0.1);
        Assert.Contains(r.Peaks.Skip(1), p => p.Aliases.Any(a => a.StartsWith("half_period_of:", StringComparison.Ordinal)));
    }

    [Fact]
    public void FindPeriods_KeepsPeriod_WhenMinimaEqual()
    {
        var pts = RvTau(36.5, 2, 0.0);
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.TypeIICepheid, new PeriodSearchSettings());
        Assert.DoesNotContain("double_period_favoured", r.Notes);
        Assert.Equal(36.5 / 2, r.Peaks[0].PeriodDays, 0.05);
    }
}
