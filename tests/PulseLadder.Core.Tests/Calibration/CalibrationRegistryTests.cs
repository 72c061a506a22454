using PulseLadder.Core.Calibration;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Calibration;

public class CalibrationRegistryTests
{
    [Fact]
    public void ManifestResourceNames_ContainEveryCalibrationTable_WhenBuilt()
    {
        var names = typeof(CalibrationRegistry).Assembly.GetManifestResourceNames()
            .Select(n => n.Replace('\\', '/')).ToHashSet();
        foreach (var f in new[] { "relations.csv", "anchors.csv", "period_colour.csv", "extinction_coefficients.csv" })
            Assert.Contains("PulseLadder.Core.Data.calibration/" + f, names);
    }

    [Fact]
    public void Load_ReturnsRequiredRelations_FromEmbeddedTables()
    {
        var reg = CalibrationRegistry.Load();
        foreach (var id in new[]
                 {
                     "benedict2007_v", "benedict2007_i", "benedict2007_k", "benedict2007_wvi",
                     "fouque2007_v", "fouque2007_i", "fouque2007_k", "fouque2007_wvi",
                     "udalski1999_v", "udalski1999_i", "udalski1999_wi", "persson2004_j", "persson2004_h", "persson2004_k",
                     "matsunaga2006_ks", "cc2003_mv", "catelan2004_k", "muraveva2015_ks", "sesar2010_mv060",
                 })
            Assert.True(reg.TryGet(id, out _), id);
        Assert.All(reg.Relations, r => Assert.False(string.IsNullOrWhiteSpace(r.Source)));
    }

    // SCIENCE.md 3.1 row 1 (Benedict et al. 2007 M_V) and row 11 (Udalski 1999 W_I, published at log P = 0:
    // 15.815 - 3.277 log P; the registry stores it at pivot 1: 15.815 - 3.277 = 12.538).
    [Fact]
    public void TryGet_GivesPublishedCoefficients_ForBenedictVAndUdalskiWi()
    {
        var reg = CalibrationRegistry.Embedded;
        Assert.True(reg.TryGet("benedict2007_v", out var v));
        Assert.Equal(-4.05, v.A, 12);
        Assert.Equal(-2.43, v.B, 12);
        Assert.Equal(1.0, v.P0, 12);
        Assert.True(reg.TryGet("udalski1999_wi", out var w));
        Assert.Equal(15.815, w.RelationMagnitude(0.0, -0.35), 9);
        Assert.Equal(RelationKind.Apparent, w.Kind);
        Assert.Equal("W_I", w.BandLabel);
        Assert.Equal(1.55, w.WesenheitR, 12);
    }

    // SCIENCE.md CV-13 / section 3.1 note (a): LMC modulus 18.477 +- 0.004 (stat) +- 0.026 (sys), Pietrzynski et al. 2019.
    [Fact]
    public void Lmc_IsPietrzynski2019Anchor()
    {
        var lmc = CalibrationRegistry.Embedded.Lmc;
        Assert.Equal(18.477, lmc.Mu!.Value, 12);
        Assert.Equal(0.004, lmc.MuErrStat, 12);
        Assert.Equal(0.026, lmc.MuErrSys, 12);
    }

    // SCIENCE.md CV-30(b): Catelan et al. 2004 M_K at P = 0.566868 d, [Fe/H] = -1.50, [alpha/Fe] = +0.3:
    // [M/H] = -1.2865, log Z = -3.0515, M_K = -0.5510 [X].
    [Fact]
    public void RelationMagnitude_MatchesCv30b_ForCatelan2004K()
    {
        Assert.True(CalibrationRegistry.Embedded.TryGet("catelan2004_k", out var k));
        Assert.Equal(-3.0515, k.MetallicityVariable(-1.5), 1e-3);
        Assert.Equal(-0.5510, k.RelationMagnitude(Math.Log10(0.566868), -1.5), 1e-3);
    }

    // SCIENCE.md CV-30(c): M_V(RR) = 0.59 at [Fe/H] = -1.5 (Cacciari & Clementini 2003 [C]); slope 0.214 (Clementini 2003).
    [Fact]
    public void RelationMagnitude_Is059AtFehMinus15_ForCacciariClementini()
    {
        Assert.True(CalibrationRegistry.Embedded.TryGet("cc2003_mv", out var r));
        Assert.Equal(0.59, r.RelationMagnitude(Math.Log10(0.55), -1.5), 1e-9);
        Assert.Equal(0.59 + 0.214 * 0.5, r.RelationMagnitude(Math.Log10(0.55), -1.0), 1e-9);
    }

    [Fact]
    public void Default_PrefersWesenheit_ForCepheidWithVAndI()
    {
        var reg = CalibrationRegistry.Embedded;
        Assert.Equal("benedict2007_wvi", reg.Default(PulsatorClass.ClassicalCepheidFundamental, ["V", "I"]));
        Assert.Equal("benedict2007_k", reg.Default(PulsatorClass.ClassicalCepheidFundamental, ["Ks"]));
        Assert.Equal("benedict2007_v", reg.Default(PulsatorClass.ClassicalCepheidFirstOvertone, ["V", "B"]));
        Assert.Equal("cc2003_mv", reg.Default(PulsatorClass.RRLyraeAB, ["V"]));
        Assert.Equal("matsunaga2006_ks", reg.Default(PulsatorClass.TypeIICepheid, ["Ks", "J"]));
        Assert.Null(reg.Default(PulsatorClass.TypeIICepheid, ["V"]));
    }

    private const string Header = "id,family,class,kind,mag,color1,color2,wesenheit_r,a,a_err,b,b_err,p0,gamma,gamma_err,metallicity_scale,z_ref,feh_default,feh_default_err,alpha_fe,scatter,logp_min,logp_max,period_mode,anchor,source,table,tag,notes";

    [Fact]
    public void WithUserRelations_AddsRelation_WhenRowIsValid()
    {
        var csv = Header + "\n# my relation\nmy_w_vi,mine,dcep_f,absolute,V,V,I,2.5,-5.9,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,\"Me, 2026\",,C,\n";
        var res = CalibrationRegistry.Embedded.WithUserRelations(csv);
        Assert.True(res.Ok, string.Join("; ", res.Errors));
        Assert.True(res.Registry.TryGet("my_w_vi", out var r));
        Assert.Equal(2.5, r.WesenheitR, 12);
        Assert.Equal("Me, 2026", r.Source);
        Assert.False(CalibrationRegistry.Embedded.TryGet("my_w_vi", out _));
    }

    [Fact]
    public void WithUserRelations_ReportsLineAndField_WhenValuesAreBad()
    {
        var csv = Header + "\n"
            + "bad_a,mine,dcep_f,absolute,V,,,,abc,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,src,,C,\n"
            + "bad_band,mine,dcep_f,absolute,Q,,,,-4,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,src,,C,\n"
            + "benedict2007_v,mine,dcep_f,absolute,V,,,,-4,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,src,,C,\n"
            + "bad_anchor,mine,dcep_f,apparent,V,,,,-4,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,gc_distances,src,,C,\n"
            + "bad_class,mine,mira,absolute,V,,,,-4,0.03,-3.3,0.1,1,0,0,feh,0,0,0,0,0.08,0.3,1.8,F,hst_fgs_parallax,src,,C,\n"
            + "short,row\n";
        var res = CalibrationRegistry.Embedded.WithUserRelations(csv);
        Assert.Contains(res.Errors, e => e.Line == 2 && e.Field == "a");
        Assert.Contains(res.Errors, e => e.Line == 3 && e.Field == "mag");
        Assert.Contains(res.Errors, e => e.Line == 4 && e.Field == "id");
        Assert.Contains(res.Errors, e => e.Line == 5 && e.Field == "anchor");
        Assert.Contains(res.Errors, e => e.Line == 6 && e.Field == "class");
        Assert.Contains(res.Errors, e => e.Line == 7 && e.Field == "");
        Assert.Equal(CalibrationRegistry.Embedded.Relations.Count, res.Registry.Relations.Count);
        Assert.Equal("line 2, field 'a': 'abc' is not a finite number", res.Errors.First(e => e.Line == 2).ToString());
    }

    // SCIENCE.md CV-31: P1 = 3.000 d -> P0 = 4.2675 d; RRc P1 = 0.300 d -> P0 = 0.40190 d [relations M, values X].
    [Theory]
    [InlineData(PulsatorClass.ClassicalCepheidFirstOvertone, 3.000, 4.2675)]
    [InlineData(PulsatorClass.ClassicalCepheidFirstOvertone, 1.000, 1.3965)]
    [InlineData(PulsatorClass.RRLyraeC, 0.300, 0.40190)]
    [InlineData(PulsatorClass.ClassicalCepheidFundamental, 5.366249, 5.366249)]
    public void FundamentalPeriod_MatchesCv31(PulsatorClass cls, double p1, double p0)
        => Assert.Equal(p0, Fundamentalisation.FundamentalPeriod(cls, p1, out _), 1e-4);
}
