using PulseLadder.Core.Classification;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.Tests.LightCurves;

namespace PulseLadder.Core.Tests.Classification;

/// <summary>Classes of the open OGLE-III LMC stars (tests/data/open; Soszynski et al. 2008, 2009) at their catalogue periods.</summary>
public sealed class ClassifierTests
{
    private static readonly StarInfo Anon = new("x", "f", SkyPosition.FromDegrees(80, -69));

    public static TheoryData<string, string> Cepheids()
    {
        var d = new TheoryData<string, string>();
        foreach (var r in OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv")) d.Add(r["star_id"], r["mode"]);
        return d;
    }

    private static IReadOnlyList<BandFit> FitCepheid(Dictionary<string, string> row) =>
        LightCurveFitter.FitBands(OgleData.CepheidPoints(row), row.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;

    [Theory]
    [MemberData(nameof(Cepheids))]
    public void Classify_SuggestsOgleMode_ForShippedCepheids(string id, string mode)
    {
        var row = OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv").Single(r => r["star_id"] == id);
        var s = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = row.D("period_d") }, null, FitCepheid(row), null);
        Assert.Equal("suggested", s.Source);
        Assert.Equal(mode == "F" ? PulsatorClass.ClassicalCepheidFundamental : PulsatorClass.ClassicalCepheidFirstOvertone, s.Class);
        Assert.InRange(s.Confidence, 0.5, 1.0);
        Assert.NotEmpty(s.Reasons);
    }

    [Theory]
    [InlineData("OGLE-LMC-RRLYR-00003", PulsatorClass.RRLyraeAB)]
    [InlineData("OGLE-LMC-RRLYR-00032", PulsatorClass.RRLyraeC)]
    [InlineData("OGLE-LMC-T2CEP-003", PulsatorClass.TypeIICepheid)]
    public void Classify_SuggestsOgleType_ForShippedRRLyraeAndTypeII(string id, PulsatorClass expected)
    {
        var row = OgleData.Catalogue("lmc-rrlyrae-t2cep/catalogue.csv").Single(r => r["star_id"] == id);
        var pts = OgleData.ToPoints(OgleData.ReadLightCurve("lmc-rrlyrae-t2cep", row["I_file"], "I"), 80, -69);
        var fits = LightCurveFitter.FitBands(pts, row.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;
        var s = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = row.D("period_d") }, null, fits, null);
        Assert.Equal(expected, s.Class);
        Assert.InRange(s.Confidence, 0.5, 1.0);
    }

    [Fact]
    public void Classify_UsesFieldPlPosition_ForTypeIICepheid()
    {
        // Field: the OGLE-III F-mode Cepheids with I means; the Type II star lies ~2 mag below their PL relation.
        var field = OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv")
            .Where(r => r["mode"] == "F" && r.Has("mean_I_mag"))
            .Select(r => new FieldStar(r["star_id"], PulsatorClass.ClassicalCepheidFundamental, r.D("period_d"), "I", r.D("mean_I_mag")))
            .ToList();
        var row = OgleData.Catalogue("lmc-rrlyrae-t2cep/catalogue.csv").Single(r => r["star_id"] == "OGLE-LMC-T2CEP-003");
        var pts = OgleData.ToPoints(OgleData.ReadLightCurve("lmc-rrlyrae-t2cep", row["I_file"], "I"), 80, -69);
        var fits = LightCurveFitter.FitBands(pts, row.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;
        var without = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = row.D("period_d") }, null, fits, null);
        var with = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = row.D("period_d") }, null, fits, null, new FieldContext(field));
        Assert.Equal(PulsatorClass.TypeIICepheid, with.Class);
        Assert.True(with.Confidence > without.Confidence);
        Assert.Contains(with.Reasons, r => r.Contains("PL position"));

        // A classical F star of the field stays classical with the PL test.
        var f = OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv").Single(r => r["star_id"] == "OGLE-LMC-CEP-1184");
        var fs = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = f.D("period_d") }, null, FitCepheid(f), null, new FieldContext(field));
        Assert.Equal(PulsatorClass.ClassicalCepheidFundamental, fs.Class);
    }

    [Fact]
    public void Classify_ReviewerWins_ThenStarList()
    {
        var fits = new[] { new BandFit { Band = "I", Points = 100, Order = 3, Amplitude = 0.5, R21 = 0.45 } };
        var p = new PeriodEstimate { PeriodDays = 0.6 };
        var listed = Anon with { DeclaredClass = PulsatorClass.TypeIICepheid };
        var r = Classifier.Classify(listed, p, null, fits, PulsatorClass.OtherVariable);
        Assert.Equal((PulsatorClass.OtherVariable, "reviewer"), (r.Class, r.Source));
        var l = Classifier.Classify(listed, p, null, fits, null);
        Assert.Equal((PulsatorClass.TypeIICepheid, "star_list"), (l.Class, l.Source));
        Assert.Equal(PulsatorClass.RRLyraeAB, Classifier.Classify(Anon, p, null, fits, null).Class);
    }

    [Fact]
    public void Classify_SaysNotVariable_WithoutSignificantPeriodOrAmplitude()
    {
        var none = new PeriodSearchResult { FailureReason = "no_significant_period" };
        Assert.Equal(PulsatorClass.NotVariable, Classifier.Classify(Anon, null, none, [], null).Class);
        var weak = new PeriodSearchResult { Peaks = [new PeriodPeak(1.0, 0.1, 0.3, "baluev", [])] };
        Assert.Equal(PulsatorClass.NotVariable, Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = 1.0 }, weak, [], null).Class);
        var tiny = new[] { new BandFit { Band = "V", Points = 50, Order = 1, Amplitude = 0.01, AmplitudeErr = 0.004 } };
        Assert.Equal(PulsatorClass.NotVariable, Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = 3.0 }, null, tiny, null).Class);
        var few = new PeriodSearchResult { FailureReason = "too_few_points" };
        var u = Classifier.Classify(Anon, null, few, [], null);
        Assert.Equal(PulsatorClass.Unknown, u.Class);
        Assert.Equal(0.0, u.Confidence);
    }

    [Fact]
    public void Classify_HonoursReviewerPeriod_WhenSearchFoundNothing()
    {
        var none = new PeriodSearchResult { FailureReason = "no_significant_period" };
        var fits = new[] { new BandFit { Band = "I", Points = 100, Order = 3, Amplitude = 0.45, AmplitudeErr = 0.01, R21 = 0.46 } };
        var s = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = 0.62, Method = "reviewer" }, none, fits, null);
        Assert.Equal(PulsatorClass.RRLyraeAB, s.Class);
        Assert.Contains(s.Reasons, r => r.Contains("reviewer"));
    }

    [Fact]
    public void Classify_NeverThrows_OnOddInput()
    {
        Assert.Equal(PulsatorClass.Unknown, Classifier.Classify(Anon, null, null, [], null).Class);
        Assert.Equal(PulsatorClass.Unknown, Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = double.NaN }, null, [], null).Class);
        var s = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = 0.05 }, null, [], null);
        Assert.Equal(PulsatorClass.OtherVariable, s.Class);
        Assert.InRange(s.Confidence, 0, 1);
        var c = Classifier.Classify(Anon, new PeriodEstimate { PeriodDays = 5 }, null, [], null);
        Assert.InRange(c.Confidence, 0, 0.4);
    }
}
