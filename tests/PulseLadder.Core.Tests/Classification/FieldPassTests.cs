using System.Text.Json;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.Tests.LightCurves;

namespace PulseLadder.Core.Tests.Classification;

/// <summary>
/// The field PL pass: a synthetic Ks-band field whose classical Cepheids follow the registry's Benedict et al. 2007
/// K relation (benedict2007_k: M_K = -5.71 - 3.32 (log P - 1)) and whose Type II Cepheid follows Matsunaga et al.
/// 2006 (matsunaga2006_ks: M_Ks = -1.11 - 2.41 log P), both at mu = 14.0: at P = 5 d the Type II star is
/// (-1.11 - 2.41 * 0.699) - (-5.71 - 3.32 * (0.699 - 1)) = 1.92 mag fainter. Its light-curve shape (R21 = 0.30,
/// Ks amplitude ~0.19 mag) is between the classical and the Type II/overtone rules, so only the PL position tells.
/// </summary>
public sealed class FieldPassTests
{
    private const double Mu = 14.0;
    private const double T2Period = 5.0;
    private static readonly SkyPosition Pos = SkyPosition.FromDegrees(80, -69);

    // Classical F Cepheids spanning log P 0.5-1.5 with +-0.08 mag offsets (a deterministic stand-in for the strip width).
    private static readonly (string Name, double P, double Offset)[] Classical =
    [
        ("F-01", 3.2, 0.05), ("F-02", 4.1, -0.07), ("F-03", 5.3, 0.02), ("F-04", 6.6, -0.03), ("F-05", 8.4, 0.08),
        ("F-06", 10.7, -0.05), ("F-07", 13.5, 0.04), ("F-08", 17.2, -0.08), ("F-09", 22.0, 0.01), ("F-10", 29.5, -0.02),
    ];

    private static double ClassicalKs(double p) => Mu + (-5.71 - 3.32 * (Math.Log10(p) - 1));
    private static double TypeIIKs(double p) => Mu + (-1.11 - 2.41 * Math.Log10(p));

    /// <summary>150 Ks points over 300 d (seeded), errors 0.01 mag: m = mean + a1 sin(2 pi phi) + r21 a1 sin(4 pi phi + 1).</summary>
    private static List<Observation> LightCurve(int seed, double period, double mean, double a1, double r21)
    {
        var rng = new Random(seed);
        var obs = new List<Observation>();
        for (int i = 0; i < 150; i++)
        {
            double t = 2_458_000.5 + 300 * rng.NextDouble();
            double phi = (t - 2_458_000.0) / period;
            double noise = 0.01 * Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
            double m = mean + a1 * Math.Sin(2 * Math.PI * phi) + r21 * a1 * Math.Sin(4 * Math.PI * phi + 1.0) + noise;
            obs.Add(new Observation(i + 1, t, TimeScale.BjdTdb, "Ks", m, 0.01, "synthetic", null));
        }
        return obs;
    }

    private sealed record Star(StarInfo Info, List<Observation> Obs);

    private static List<Star> Field(PulsatorClass? t2Declared = null)
    {
        var list = Classical.Select((c, i) => new Star(new StarInfo(c.Name, "syn", Pos, null, 0.0, 0.01),
            LightCurve(100 + i, c.P, ClassicalKs(c.P) + c.Offset, 0.16, 0.42))).ToList();
        list.Add(new Star(new StarInfo("T2-01", "syn", Pos, t2Declared, 0.0, 0.01), LightCurve(7, T2Period, TypeIIKs(T2Period), 0.085, 0.30)));
        return list;
    }

    private static readonly Lazy<List<(Star Star, StarAnalysis First)>> FirstPass = new(() =>
        Field().Select(s => (s, AnalysisPipeline.Run(s.Info, s.Obs, PipelineSettings.Default))).ToList());

    [Fact]
    public void Reclassify_TellsTypeIIApartByPlPosition_WhenShapeIsAmbiguous()
    {
        var first = FirstPass.Value;
        var t2 = first.Single(x => x.Star.Info.Name == "T2-01").First;
        Assert.Equal(T2Period, t2.Period!.PeriodDays, 0.01);
        // Light curve alone: not decided, the Type II alternative stated.
        Assert.Equal(PulsatorClass.ClassicalCepheidFundamental, t2.Class!.Class);
        Assert.Contains(t2.Class.Reasons, r => r.Contains("Type II Cepheid not excluded"));
        Assert.Equal("benedict2007_k", t2.Distance!.RelationId);

        var context = FieldPass.BuildContext(first.Select(x => x.First));
        Assert.NotNull(context);
        var line = Assert.Single(context!.PlLines());
        Assert.Equal("Ks", line.Band);
        Assert.Equal((10, 1), (line.Count, line.Rejected));   // the Type II star is clipped from the line it is tested against
        Assert.Equal("fitted", line.SlopeSource);
        Assert.Equal(-3.32, line.Slope, 0.1);                   // benedict2007_k slope
        Assert.Equal(Mu - 5.71, line.ZeroPoint + line.Slope, 0.06); // apparent Ks at log P = 1

        var again = FieldPass.Reclassify(t2, first.Single(x => x.Star.Info.Name == "T2-01").Star.Info, context, CalibrationRegistry.Embedded);
        Assert.Equal(PulsatorClass.TypeIICepheid, again.Class!.Class);
        Assert.True(again.Class.Confidence > t2.Class.Confidence);
        Assert.Contains(again.Class.Reasons, r => r.Contains("PL position") && r.Contains("+1.9"));
        Assert.Equal(PulsatorClass.ClassicalCepheidFundamental, again.LightCurveClass!.Class);
        Assert.Contains("class_from_field_pl", again.Flags);
        // Downstream follows the class: the Type II relation gives back the field's modulus.
        Assert.Null(again.Distance!.FailureReason);
        Assert.Equal("matsunaga2006_ks", again.Distance.RelationId);
        Assert.Equal(Mu, again.Distance.Mu, 0.1);
        Assert.Equal(CalibrationRegistry.Embedded.Hash, again.CalibrationRegistryHash);

        foreach (var (star, a) in first.Where(x => x.Star.Info.Name != "T2-01"))
        {
            var r = FieldPass.Reclassify(a, star.Info, context, CalibrationRegistry.Embedded);
            Assert.Equal(PulsatorClass.ClassicalCepheidFundamental, r.Class!.Class);
            Assert.Contains(r.Class.Reasons, x => x.Contains("on the fundamental-mode relation"));
            Assert.Equal(Mu, r.Distance!.Mu, 0.15);
        }
    }

    [Fact]
    public void Reclassify_KeptDistance_IsTheOneAFreshComputationGives()
    {
        // Every star of the field, through a stored (JSON) copy as the field job reads it: the pass that keeps an
        // unchanged class's distance must write exactly what recomputing it writes; the star whose class changes
        // (T2-01) gets a new distance either way.
        var context = FieldPass.BuildContext(FirstPass.Value.Select(x => x.First));
        int kept = 0;
        foreach (var (star, first) in FirstPass.Value)
        {
            var stored = JsonSerializer.Deserialize<StarAnalysis>(JsonSerializer.Serialize(first))!;
            var reused = FieldPass.Reclassify(stored, star.Info, context, CalibrationRegistry.Embedded);
            var fresh = FieldPass.Reclassify(stored, star.Info, context, CalibrationRegistry.Embedded, reuseDistance: false);
            Assert.Equal(JsonSerializer.Serialize(fresh), JsonSerializer.Serialize(reused));
            if (ReferenceEquals(reused.Distance, stored.Distance)) kept++;
        }
        Assert.Equal(FirstPass.Value.Count - 1, kept);
    }

    [Fact]
    public void Run_ReproducesFieldPassResult_WhenGivenTheStoredContext()
    {
        var (star, first) = FirstPass.Value.Single(x => x.Star.Info.Name == "T2-01");
        var context = FieldPass.BuildContext(FirstPass.Value.Select(x => x.First));
        var passed = FieldPass.Reclassify(first, star.Info, context, CalibrationRegistry.Embedded);
        // What a store keeps and a rerun reads: the JSON of the context alone, not the star set.
        var stored = JsonSerializer.Deserialize<FieldContext>(JsonSerializer.Serialize(passed.FieldContext));
        Assert.Empty(stored!.Stars);
        Assert.Equal(context!.StarSetHash, stored.StarSetHash);
        Assert.Equal(11, stored.StarCount);
        var rerun = AnalysisPipeline.Run(star.Info, star.Obs, PipelineSettings.Default, null, stored);
        Assert.Equal(JsonSerializer.Serialize(passed), JsonSerializer.Serialize(rerun));
    }

    [Fact]
    public void Reclassify_KeepsDeclaredAndReviewerClasses_WithFieldContext()
    {
        var (star, first) = FirstPass.Value.Single(x => x.Star.Info.Name == "T2-01");
        var context = FieldPass.BuildContext(FirstPass.Value.Select(x => x.First));
        var declared = star.Info with { DeclaredClass = PulsatorClass.ClassicalCepheidFundamental };
        var d = FieldPass.Reclassify(first, declared, context, CalibrationRegistry.Embedded);
        Assert.Equal((PulsatorClass.ClassicalCepheidFundamental, "star_list"), (d.Class!.Class, d.Class.Source));
        Assert.DoesNotContain("class_from_field_pl", d.Flags);

        var reviewed = first with { Overrides = new ReviewOverrides(null, PulsatorClass.ClassicalCepheidFirstOvertone) };
        var r = FieldPass.Reclassify(reviewed, star.Info, context, CalibrationRegistry.Embedded);
        Assert.Equal((PulsatorClass.ClassicalCepheidFirstOvertone, "reviewer"), (r.Class!.Class, r.Class.Source));
        // Downstream follows the reviewer's class: an overtone period is fundamentalised (SCIENCE.md 3.4).
        Assert.NotNull(r.Distance!.Fundamentalisation);
        Assert.True(r.Distance.PeriodUsedDays > T2Period);
    }

    [Fact]
    public void BuildContext_ReturnsNull_WhenFieldHasTooFewCepheids()
    {
        var few = FirstPass.Value.Take(FieldContext.MinStars - 1).Select(x => x.First).ToList();
        Assert.Null(FieldPass.BuildContext(few));
        Assert.Null(FieldPass.BuildContext([]));
        // Without a context the pass gives back the light-curve class and records no context.
        var (star, a) = FirstPass.Value[0];
        var r = FieldPass.Reclassify(a, star.Info, null, CalibrationRegistry.Embedded);
        Assert.Null(r.FieldContext);
        Assert.Equal(a.Class!.Class, r.Class!.Class);
    }

    // Shipped open data (tests/data/open; OGLE-III LMC, Soszynski et al. 2008): the 16 Cepheids and the Type II
    // Cepheid as one field, classes from their light curves first, then the field pass: every Cepheid keeps its OGLE
    // mode and the Type II star (35.66 d, ~2 mag below the I-band relation) is a Type II Cepheid.
    [Fact]
    public void Reclassify_KeepsOgleModes_ForShippedLmcField()
    {
        var ceps = OgleData.Catalogue("lmc-cepheids/catalogue/ogle3_values.csv");
        var analyses = new List<(StarInfo Info, StarAnalysis A, PulsatorClass Expected)>();
        foreach (var row in ceps)
        {
            var fits = LightCurveFitter.FitBands(OgleData.CepheidPoints(row), row.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;
            analyses.Add(Analysis(row["star_id"], row.D("period_d"), fits,
                row["mode"] == "F" ? PulsatorClass.ClassicalCepheidFundamental : PulsatorClass.ClassicalCepheidFirstOvertone));
        }
        var t2 = OgleData.Catalogue("lmc-rrlyrae-t2cep/catalogue.csv").Single(r => r["star_id"] == "OGLE-LMC-T2CEP-003");
        var t2Fits = LightCurveFitter.FitBands(OgleData.ToPoints(OgleData.ReadLightCurve("lmc-rrlyrae-t2cep", t2["I_file"], "I"), 80, -69),
            t2.D("period_d"), new FitSettings(), new CleaningSettings()).Fits;
        analyses.Add(Analysis("OGLE-LMC-T2CEP-003", t2.D("period_d"), t2Fits, PulsatorClass.TypeIICepheid));

        var context = FieldPass.BuildContext(analyses.Select(a => a.A));
        Assert.NotNull(context);
        Assert.Contains(context!.PlLines(), l => l.Band == "I" && l.Count >= FieldContext.MinStars);
        foreach (var (info, a, expected) in analyses)
        {
            var r = FieldPass.Reclassify(a, info, context, CalibrationRegistry.Embedded);
            Assert.True(expected == r.Class!.Class, $"{info.Name}: expected {expected}, got {r.Class.Class} ({string.Join("; ", r.Class.Reasons)})");
        }
    }

    private static (StarInfo, StarAnalysis, PulsatorClass) Analysis(string name, double period, IReadOnlyList<BandFit> fits, PulsatorClass expected)
    {
        var info = new StarInfo(name, "lmc", Pos);
        var p = new PeriodEstimate { PeriodDays = period };
        var cls = Classifier.Classify(info, p, null, fits, null);
        return (info, new StarAnalysis { Star = name, Field = "lmc", Outcome = "ok", Period = p, Fits = fits, Class = cls, LightCurveClass = cls }, expected);
    }
}
