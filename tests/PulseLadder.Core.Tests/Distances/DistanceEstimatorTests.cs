using System.Text.Json;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Distances;
using PulseLadder.Core.Extinction;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;
using static PulseLadder.Core.Tests.Distances.TestStars;

namespace PulseLadder.Core.Tests.Distances;

public class DistanceEstimatorTests
{
    private const double DeltaCepPeriod = 5.366249; // SCIENCE.md CV-26 [M]

    private static DistanceSettings BenedictV(int draws = 2000) => new()
    {
        CepheidRelationId = "benedict2007_v", RvErr = 0, FeHErr = 0, MonteCarloDraws = draws, EstimateEbvFromColour = false,
    };

    // SCIENCE.md CV-26: <V> = 3.954, E(B-V) = 0.075 -> A_V = 0.2325 (R_V = 3.1); log P = 0.729671; M_V = -3.3931;
    // mu0 = 7.1146; d = 264.8 pc [X]. External check there: HST parallax 273.2 pc (Benedict 2002 [C]).
    [Fact]
    public void EstimateDistance_MatchesCv26_ForDeltaCepWithBenedictV()
    {
        var r = DistanceEstimator.EstimateDistance(Star(ebv: 0.075, ebvErr: 0.02, feh: 0.0), PulsatorClass.ClassicalCepheidFundamental,
            DeltaCepPeriod, 0, [Fit("V", 3.954)], BenedictV());
        Assert.Null(r.FailureReason);
        Assert.Equal("benedict2007_v", r.RelationId);
        var route = Assert.Single(r.Routes);
        Assert.Equal(0.729671, r.LogPUsed, 1e-6);
        Assert.Equal(-3.3931, route.AbsoluteMag, 1e-4);
        Assert.Equal(0.2325, route.Extinction, 1e-4);
        Assert.Equal(7.1146, route.MuNominal, 1e-4);
        Assert.Equal(264.8, DistanceModulus.FromMagnitudes(route.MuNominal).ToParsecs(), 0.1);
        // Monte Carlo median within 0.01 mag of the analytic value (sigma_mu ~ 0.12, 2000 draws: median noise ~0.003).
        Assert.Equal(7.1146, r.Mu, 0.01);
        // External: HST parallax 3.66 +- 0.15 mas (Benedict 2002 [C]) -> 273.2 pc; agreement within 1 sigma of ours.
        Assert.InRange(Parallax.DistancePc(3.66), r.DistancePc16, r.DistancePc84);
    }

    // SCIENCE.md CV-27: sigma_a = 0.02, sigma_b = 0.12, sigma_<V> = 0.01, sigma_E = 0.02 -> sigma_mu = 0.0735,
    // 0.1241 with sigma_int = 0.10; sigma_d = 9.0 pc (15.1 pc) [X].
    [Fact]
    public void Budget_MatchesCv27_ForDeltaCepErrors()
    {
        var r = DistanceEstimator.EstimateDistance(Star(ebv: 0.075, ebvErr: 0.02, feh: 0.0), PulsatorClass.ClassicalCepheidFundamental,
            DeltaCepPeriod, 0, [Fit("V", 3.954, 0.01)], BenedictV());
        var b = r.Routes[0].Budget;
        double noScatter = Math.Sqrt(b.Measurement * b.Measurement + b.Systematic * b.Systematic);
        Assert.Equal(0.0735, noScatter, 1e-3);
        Assert.Equal(0.1241, b.Total, 1e-3);
        var dm = DistanceModulus.FromMagnitudes(r.Routes[0].MuNominal);
        Assert.Equal(9.0, dm.ParsecErrorFor(noScatter), 0.1);
        Assert.Equal(15.1, dm.ParsecErrorFor(b.Total), 0.1);
        // The Monte Carlo reproduces the linear budget (errors are small, so the model is close to linear).
        Assert.Equal(b.Total, r.MuErr, 0.006);
        Assert.Equal(b.Statistical, r.MuErrStat, 0.006);
        Assert.Equal(b.Systematic, r.MuErrSys, 0.003);
    }

    // Invariant: for small errors the Monte Carlo median equals the analytic (nominal) modulus.
    [Fact]
    public void EstimateDistance_MedianEqualsAnalytic_WhenErrorsAreSmall()
    {
        var reg = CalibrationRegistry.Embedded;
        var s = new DistanceSettings { RvErr = 0.001, FeHErr = 0.001, EstimateEbvFromColour = false, CepheidRelationId = "benedict2007_i" };
        var r = DistanceEstimator.EstimateDistance(Star(ebv: 0.30, ebvErr: 0.001, feh: 0.1), PulsatorClass.ClassicalCepheidFundamental,
            10.0, 0.001, [Fit("V", 9.0, 0.001), Fit("I", 8.0, 0.001)], s, reg);
        foreach (var route in r.Routes)
        {
            double analytic = route.MuNominal;
            Assert.Equal(analytic, route.Mu, 0.1 * route.Budget.Total + 1e-4);
            Assert.Equal(route.Budget.Total, route.MuErr, 0.05 * route.Budget.Total);
        }
    }

    // SCIENCE.md CV-12: I - 1.55 (V - I) = V - 2.55 (V - I) (algebra): two relations with the same coefficients on
    // the two spellings of the index give the same modulus to 1e-12.
    [Fact]
    public void EstimateDistance_SameMu_ForBothSpellingsOfWesenheitI()
    {
        const string header = "id,family,class,kind,mag,color1,color2,wesenheit_r,a,a_err,b,b_err,p0,gamma,gamma_err,metallicity_scale,z_ref,feh_default,feh_default_err,alpha_fe,scatter,logp_min,logp_max,period_mode,anchor,source,table,tag,notes";
        var csv = header + "\n"
            + "wi_from_i,test,dcep_f,absolute,I,V,I,1.55,-5.9,0.02,-3.3,0.05,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,CV-12 algebra,,X,\n"
            + "wi_from_v,test,dcep_f,absolute,V,V,I,2.55,-5.9,0.02,-3.3,0.05,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,CV-12 algebra,,X,\n";
        var load = CalibrationRegistry.Embedded.WithUserRelations(csv);
        Assert.True(load.Ok, string.Join("; ", load.Errors));
        var s = new DistanceSettings { CepheidRelationId = "wi_from_i", RoutesAcrossFamilies = false, MonteCarloDraws = 500 };
        var fits = new[] { Fit("V", 14.321), Fit("I", 13.587) };
        var r = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 7.3, 0.0001, fits, s, load.Registry);
        var a = r.Routes.Single(x => x.RelationId == "wi_from_i");
        var b = r.Routes.Single(x => x.RelationId == "wi_from_v");
        Assert.Equal(13.587 - 1.55 * (14.321 - 13.587), a.ApparentMag, 12);
        Assert.Equal(a.ApparentMag, b.ApparentMag, 12);
        Assert.Equal(a.MuNominal, b.MuNominal, 12);
        Assert.Equal(a.Budget.Photometry, b.Budget.Photometry, 12);
    }

    // SCIENCE.md 4.4: a Wesenheit index is reddening-free when R matches the law. With CCM89 at R_V = 3.1 and
    // I at 0.80 um, A_V/E(V-I) = 1/(1 - 0.5975) = 2.48 [X], so V - 2.45 (V - I) keeps a small residual.
    [Fact]
    public void EstimateDistance_ReportsSmallWesenheitResidual_ForBenedictWvi()
    {
        var r = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 10, 0.001,
            [Fit("V", 9.0), Fit("I", 8.0)], new DistanceSettings { EstimateEbvFromColour = false });
        Assert.Equal("benedict2007_wvi", r.RelationId);
        var w = r.Routes.Single(x => x.RelationId == "benedict2007_wvi");
        double kI = ExtinctionLaws.AOverAv(ExtinctionLaw.Ccm89, 0.80, 3.1);
        Assert.Equal(3.1 * (1 - 2.45 * (1 - kI)), w.WesenheitResidualPerEbv!.Value, 1e-9);
        Assert.InRange(Math.Abs(w.WesenheitResidualPerEbv!.Value), 0, 0.1);
        Assert.Null(r.Ebv);
        Assert.Equal("none", r.EbvSource);
    }

    [Fact]
    public void EstimateDistance_ComputesAllRoutes_AndReportsByPreference()
    {
        var fits = new[] { Fit("V", 9.0), Fit("I", 8.0), Fit("Ks", 7.0) };
        var star = Star(ebv: 0.2, ebvErr: 0.02);
        var wes = DistanceEstimator.EstimateDistance(star, PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits, new DistanceSettings { MonteCarloDraws = 200 });
        Assert.Equal(["benedict2007_i", "benedict2007_k", "benedict2007_v", "benedict2007_wvi"], wes.Routes.Select(r => r.RelationId).Order().ToArray());
        Assert.Equal("benedict2007_wvi", wes.RelationId);
        Assert.Contains("band_substituted:Ks->K", wes.Routes.Single(r => r.RelationId == "benedict2007_k").Flags);
        var red = DistanceEstimator.EstimateDistance(star, PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits,
            new DistanceSettings { MonteCarloDraws = 200, RoutePreference = RoutePreference.ReddeningCorrectedFirst });
        Assert.Equal("benedict2007_k", red.RelationId);
        var across = DistanceEstimator.EstimateDistance(star, PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits,
            new DistanceSettings { MonteCarloDraws = 200, RoutesAcrossFamilies = true });
        Assert.Contains(across.Routes, r => r.RelationId == "udalski1999_wi");
        Assert.Contains(across.Routes, r => r.RelationId == "persson2004_k");
    }

    // SCIENCE.md 4.5: Tammann et al. 2003 (B-V)0 = 0.366 log P + 0.361 -> 0.628 for delta Cep (log P = 0.7297) [X].
    // E(B-V) from an observed B-V of 0.728 is 0.1 / (R_V (A_B - A_V)/A_V) with CCM89 A_B/A_V = 1.3245 (CV-9).
    [Fact]
    public void EstimateDistance_EstimatesEbv_FromPeriodColour()
    {
        double bv0 = 0.366 * Math.Log10(DeltaCepPeriod) + 0.361;
        var fits = new[] { Fit("B", 3.954 + bv0 + 0.1), Fit("V", 3.954) };
        var r = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, DeltaCepPeriod, 0, fits,
            new DistanceSettings { CepheidRelationId = "benedict2007_v", MonteCarloDraws = 0 });
        Assert.Null(r.FailureReason);
        Assert.Equal("period_colour:tsr2003_bv", r.EbvSource);
        double kB = ExtinctionLaws.AOverAv(ExtinctionLaw.Ccm89, 0.44, 3.1);
        Assert.Equal(0.1 / (3.1 * (kB - 1)), r.Ebv!.Value, 1e-9);
        Assert.Equal(0.628, bv0, 1e-3);
        Assert.Contains("ebv_from_period_colour", r.Flags);
    }

    [Fact]
    public void EstimateDistance_UsesFieldDefaultEbv_WhenStarHasNone()
    {
        var r = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, DeltaCepPeriod, 0, [Fit("V", 3.954)],
            new DistanceSettings { CepheidRelationId = "benedict2007_v", DefaultEbv = 0.075, DefaultEbvErr = 0.01, MonteCarloDraws = 0 });
        Assert.Equal("field_default", r.EbvSource);
        Assert.Equal(7.1146, r.Mu, 1e-4); // CV-26 again, E(B-V) now from the field
    }

    // SCIENCE.md CV-31: 1O Cepheid P1 = 3.000 d is used as P0 = 4.2675 d; the result records it.
    [Fact]
    public void EstimateDistance_FundamentalisesAndRecords_ForFirstOvertoneCepheid()
    {
        var r = DistanceEstimator.EstimateDistance(Star(ebv: 0.1), PulsatorClass.ClassicalCepheidFirstOvertone, 3.0, 0.0001,
            [Fit("V", 12.0), Fit("I", 11.3)], new DistanceSettings { MonteCarloDraws = 100 });
        Assert.Equal(4.2675, r.PeriodUsedDays, 1e-4);
        Assert.Equal(Fundamentalisation.CepheidMethod, r.Fundamentalisation);
        Assert.Contains("period_fundamentalised:" + Fundamentalisation.CepheidMethod, r.Flags);
        var rrc = DistanceEstimator.EstimateDistance(Star(ebv: 0.0, ebvErr: 0.0), PulsatorClass.RRLyraeC, 0.300, 0.00001,
            [Fit("Ks", 12.0)], new DistanceSettings { MonteCarloDraws = 100 });
        Assert.Equal("catelan2004_k", rrc.RelationId);
        Assert.Equal(0.40190, rrc.PeriodUsedDays, 1e-4);
    }

    [Fact]
    public void EstimateDistance_FlagsExtrapolation_OutsidePeriodRange()
    {
        var r = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 1.5, 0.0001,
            [Fit("V", 12.0), Fit("I", 11.3)], new DistanceSettings { MonteCarloDraws = 100, EstimateEbvFromColour = false });
        Assert.Contains("period_extrapolated", r.Flags);
        var inside = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 10, 0.0001,
            [Fit("V", 12.0), Fit("I", 11.3)], new DistanceSettings { MonteCarloDraws = 100, EstimateEbvFromColour = false });
        Assert.DoesNotContain("period_extrapolated", inside.Flags);
    }

    [Theory]
    [InlineData(PulsatorClass.Unknown, "unclassified")]
    [InlineData(PulsatorClass.NotVariable, "not_variable")]
    [InlineData(PulsatorClass.OtherVariable, "no_relation_for_class")]
    public void EstimateDistance_FailsWithReason_ForClassesWithoutRelation(PulsatorClass cls, string reason)
    {
        var r = DistanceEstimator.EstimateDistance(Star(), cls, 5, 0.01, [Fit("V", 10)], new DistanceSettings());
        Assert.Equal(reason, r.FailureReason);
    }

    [Fact]
    public void EstimateDistance_FailsWithReason_WhenBandsOrReddeningMissing()
    {
        var s = new DistanceSettings { EstimateEbvFromColour = false };
        Assert.Equal("no_usable_band", DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 5, 0.01, [], s).FailureReason);
        Assert.Equal("no_usable_band", DistanceEstimator.EstimateDistance(Star(), PulsatorClass.TypeIICepheid, 5, 0.01, [Fit("V", 10)], s).FailureReason);
        Assert.Equal("no_reddening", DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 5, 0.01, [Fit("V", 10)], s).FailureReason);
        Assert.Equal("no_period", DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, double.NaN, 0.01, [Fit("V", 10)], s).FailureReason);
        var unknown = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.ClassicalCepheidFundamental, 5, 0.01, [Fit("V", 10)], s with { CepheidRelationId = "nope" });
        Assert.Equal("unknown_relation", unknown.FailureReason);
    }

    [Fact]
    public void EstimateDistance_IsDeterministic_AndSerialisesWithoutNaN()
    {
        var fits = new[] { Fit("V", 9.0), Fit("I", 8.0), Fit("Ks", 7.0) };
        var s = new DistanceSettings();
        var a = DistanceEstimator.EstimateDistance(Star(ebv: 0.2), PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits, s);
        var b = DistanceEstimator.EstimateDistance(Star(ebv: 0.2), PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits, s);
        var c = DistanceEstimator.EstimateDistance(Star(ebv: 0.2), PulsatorClass.ClassicalCepheidFundamental, 10, 0.001, fits, s with { Seed = 7 });
        string ja = JsonSerializer.Serialize(a), jb = JsonSerializer.Serialize(b);
        Assert.Equal(ja, jb);
        Assert.NotEqual(a.Mu, c.Mu);
        Assert.Contains("\"ExtinctionLaw\":\"ccm89\"", ja);
        var fail = DistanceEstimator.EstimateDistance(Star(), PulsatorClass.Unknown, 10, 0.001, fits, s);
        Assert.Contains("unclassified", JsonSerializer.Serialize(fail));
        Assert.Contains("\"RoutePreference\":\"WesenheitFirst\"", JsonSerializer.Serialize(s));
        Assert.Contains("\"ExtinctionLaw\":\"Ccm89\"", JsonSerializer.Serialize(s));
        Assert.Contains("\"Kind\":\"Absolute\"", ja);
        var back = JsonSerializer.Deserialize<DistanceResult>(ja)!;
        Assert.Equal(a.Mu, back.Mu);
        Assert.Equal(a.Relation!.A, back.Relation!.A);
        Assert.Equal(a.Routes.Count, back.Routes.Count);
        Assert.Equal(s, JsonSerializer.Deserialize<DistanceSettings>(JsonSerializer.Serialize(s)));
    }

    [Theory]
    [InlineData(ExtinctionLaw.Ccm89)]
    [InlineData(ExtinctionLaw.Odonnell94)]
    [InlineData(ExtinctionLaw.Fitzpatrick99)]
    public void EstimateDistance_UsesChosenLaw_ForExtinction(ExtinctionLaw law)
    {
        var r = DistanceEstimator.EstimateDistance(Star(ebv: 0.5, ebvErr: 0.01), PulsatorClass.ClassicalCepheidFundamental, 10, 0.001,
            [Fit("I", 8.0)], new DistanceSettings { ExtinctionLaw = law, MonteCarloDraws = 0 });
        Assert.Equal(BandWavelengths.AOverAv("I", law, 3.1) * 3.1 * 0.5, r.Routes[0].Extinction, 1e-12);
    }
}
