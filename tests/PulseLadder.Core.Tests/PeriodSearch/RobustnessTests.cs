using System.Text.Json;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>Odd input must give a reason, never an exception, and results must serialise (no NaN/Infinity).</summary>
public class RobustnessTests
{
    private static readonly PeriodSearchSettings S = new();
    private static readonly JsonSerializerOptions Json = new() { NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.Strict };

    private static void AssertSerialisable(object o) => JsonSerializer.Serialize(o, Json);

    private static LightCurvePoint P(double t, double m, double e = 0.02, string band = "V", string obs = "a") => new(0, t, band, m, e, obs);

    [Fact]
    public void FindPeriods_ReturnsTooFewPoints_WhenOnePoint()
    {
        var r = PeriodFinder.FindPeriods([P(2460000.5, 10)], PulsatorClass.Unknown, S);
        Assert.Equal("too_few_points", r.FailureReason);
        AssertSerialisable(r);
        var e = PeriodFinder.RefinePeriod([P(2460000.5, 10)], 0.2, r, S);
        Assert.Equal("too_few_points", e.FailureReason);
        AssertSerialisable(e);
    }

    [Fact]
    public void FindPeriods_ReturnsTooFewPoints_WhenEmptyOrAllNonFinite()
    {
        Assert.Equal("too_few_points", PeriodFinder.FindPeriods([], PulsatorClass.Unknown, S).FailureReason);
        var bad = Enumerable.Range(0, 30).Select(i => P(2460000 + i, double.NaN, double.PositiveInfinity)).ToList();
        Assert.Equal("too_few_points", PeriodFinder.FindPeriods(bad, PulsatorClass.Unknown, S).FailureReason);
    }

    [Fact]
    public void FindPeriods_ReturnsNoSignificantPeriod_WhenAllMagnitudesEqual()
    {
        var pts = Enumerable.Range(0, 40).Select(i => P(2460000 + i * 1.03, 12.5)).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.Unknown, S);
        Assert.Equal("no_significant_period", r.FailureReason);
        AssertSerialisable(r);
        var e = PeriodFinder.RefinePeriod(pts, 0.3, r, S);
        Assert.NotNull(e.FailureReason);
        AssertSerialisable(e);
    }

    [Fact]
    public void FindPeriods_ReturnsReason_WhenAllPointsAtOneTime()
    {
        var pts = Enumerable.Range(0, 20).Select(i => P(2460000.5, 10 + 0.01 * i)).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.Unknown, S);
        Assert.Equal("baseline_too_short", r.FailureReason);
        AssertSerialisable(r);
        AssertSerialisable(PeriodFinder.RefinePeriod(pts, 2, r, S));
    }

    [Fact]
    public void FindPeriods_DoesNotThrow_WhenSingleNight()
    {
        // 30 points in 0.3 d of an RR Lyrae-like 0.55 d sinusoid.
        var pts = Enumerable.Range(0, 30).Select(i => P(2460000.5 + i * 0.01, 15 + 0.4 * Math.Sin(2 * Math.PI * i * 0.01 / 0.55))).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.RRLyraeAB, S);
        // The class range is capped at the 0.29 d baseline: only 0.2-0.29 d is searched, the 0.55 d signal cannot be found.
        Assert.Equal(1 / 0.29, r.MinFrequency, 1e-9);
        AssertSerialisable(r);
        // A Cepheid hint asks for periods of days: nothing to search in one night.
        Assert.Equal("baseline_too_short", PeriodFinder.FindPeriods(pts, PulsatorClass.ClassicalCepheidFundamental, S).FailureReason);
        var unknown = PeriodFinder.FindPeriods(pts, PulsatorClass.Unknown, S);
        AssertSerialisable(unknown);
        AssertSerialisable(PeriodFinder.RefinePeriod(pts, 1 / 0.55, unknown, S));
    }

    [Fact]
    public void FindPeriods_CapsGrid_WhenBaselineHuge()
    {
        var rng = new Random(3);
        var pts = Enumerable.Range(0, 40).Select(i => P(2400000 + rng.NextDouble() * 60000, 10 + 0.3 * rng.NextDouble())).ToList();
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.ClassicalCepheidFirstOvertone, S with { MaxFrequencies = 20_000 });
        Assert.Equal(20_000, r.FrequencyCount);
        Assert.Contains("grid_capped", r.Notes);
        Assert.True(r.Periodogram.X.Length <= 2000);
        AssertSerialisable(r);
    }

    [Fact]
    public void FindPeriods_IgnoresBadPoints_WhenMixedWithGoodOnes()
    {
        var pts = D30.Points();
        pts.Add(P(2460010.3, double.NaN));
        pts.Add(P(2460011.3, 8.0, 0));
        pts.Add(P(2460012.3, 8.0, -1));
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.Unknown, S with { MinPeriodDays = 0.5, MaxPeriodDays = 50 });
        Assert.Equal(30, r.PointsUsed);
        Assert.Equal(0.1860514, r.Peaks[0].Frequency, 2e-6);
    }

    [Fact]
    public void RefinePeriod_ReturnsReason_WhenFrequencyInvalid()
    {
        var r = PeriodFinder.FindPeriods(D30.Points(), PulsatorClass.Unknown, S);
        foreach (double f in new[] { 0.0, -1.0, double.NaN, double.PositiveInfinity })
        {
            var e = PeriodFinder.RefinePeriod(D30.Points(), f, r, S);
            Assert.Equal("invalid_frequency", e.FailureReason);
            AssertSerialisable(e);
        }
    }

    [Fact]
    public void FindPeriods_SkipsBand_WhenItHasTooFewPoints()
    {
        var pts = D30.Points();
        pts.Add(P(2460001.1, 7.5, 0.03, "I"));
        pts.Add(P(2460002.1, 7.6, 0.03, "I"));
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.Unknown, S with { MinPeriodDays = 0.5, MaxPeriodDays = 50 });
        Assert.Equal(["I"], r.SkippedBands);
        Assert.Equal(0.1860514, r.Peaks[0].Frequency, 2e-6);
    }

    [Fact]
    public void FindPeriods_DoesNotThrow_WhenEveryPointHasItsOwnObserver()
    {
        // 60 observers with 2-5 points each: the offset model cannot be afforded and must step aside, not fail.
        var star = SyntheticCampaign.Make(SyntheticCampaign.Kind.RRc, 8);
        var pts = star.Points.Select((p, i) => p with { Observer = "o" + (i / 7 % 60) }).ToList();
        var s = S with { Oversampling = 5 };
        var r = PeriodFinder.FindPeriods(pts, PulsatorClass.RRLyraeC, s);
        AssertSerialisable(r);
        var e = PeriodFinder.RefinePeriod(pts, r.Peaks[0].Frequency, r, s);
        AssertSerialisable(e);
        Assert.Equal(1 / star.PeriodDays, r.Peaks[0].Frequency, 0.25 / r.BaselineDays);
    }

    [Fact]
    public void FindPeriods_ResultSerialises_WhenPeriodFound()
    {
        var r = PeriodFinder.FindPeriods(D30.Points(), PulsatorClass.Unknown, S);
        var e = PeriodFinder.RefinePeriod(D30.Points(), r.Peaks[0].Frequency, r, S);
        var json = JsonSerializer.Serialize(r, Json);
        Assert.Contains("\"Peaks\"", json);
        Assert.Equal(r.Peaks.Count, JsonSerializer.Deserialize<PeriodSearchResult>(json)!.Peaks.Count);
        AssertSerialisable(e);
    }
}
