using System.Globalization;
using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using PulseLadder.Core.Calibration;
using PulseLadder.Web.Export;

namespace PulseLadder.Web.Tests;

/// <summary>
/// The field PL pass end to end, and administrator calibration files (PulseLadder:CalibrationDir, default
/// DataDir/calibrations). Synthetic Ks-band field: classical Cepheids on the registry's Benedict et al. 2007 K relation
/// (benedict2007_k, M_K = -5.71 - 3.32 (log P - 1)) and one Type II Cepheid on Matsunaga et al. 2006
/// (matsunaga2006_ks, M_Ks = -1.11 - 2.41 log P), 1.92 mag fainter at 5 d, all at mu = 14.0.
/// </summary>
public sealed class FieldPassAndCalibrationTests
{
    private const double Mu = 14.0;
    private static readonly (string Name, double P)[] Classical =
        [("F-01", 3.2), ("F-02", 4.1), ("F-03", 5.3), ("F-04", 6.6), ("F-05", 8.4), ("F-06", 10.7), ("F-07", 13.5), ("F-08", 17.2), ("F-09", 22.0)];

    private static async Task<JsonElement> Json(HttpResponseMessage r) => await r.Content.ReadFromJsonAsync<JsonElement>();

    private static string StarList()
    {
        var sb = new StringBuilder("star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh\n");
        foreach (var (n, _) in Classical) sb.Append(CultureInfo.InvariantCulture, $"{n},pl-field,80.5,-69.2,,0.0,0.01,\n");
        sb.Append("T2-01,pl-field,80.6,-69.3,,0.0,0.01,\n");
        return sb.ToString();
    }

    /// <summary>Ks light curve: 150 nights (JD_UTC - 2450000), m = mean + a1 sin + r21 a1 sin(2x + 1), errors 0.01.</summary>
    private static void Curve(StringBuilder sb, string star, double p, double mean, double a1, double r21, int seed)
    {
        var rng = new Random(seed);
        for (int i = 0; i < 150; i++)
        {
            double t = 8000.5 + 300 * rng.NextDouble();
            double ph = 2 * Math.PI * t / p;
            double noise = 0.01 * Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
            double m = mean + a1 * Math.Sin(ph) + r21 * a1 * Math.Sin(2 * ph + 1.0) + noise;
            sb.Append(CultureInfo.InvariantCulture, $"{star},{t:F5},Ks,{m:F4},0.010,cam\n");
        }
    }

    private static string Photometry()
    {
        var sb = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        int seed = 1;
        foreach (var (n, p) in Classical) Curve(sb, n, p, Mu - 5.71 - 3.32 * (Math.Log10(p) - 1), 0.16, 0.42, seed++);
        Curve(sb, "T2-01", 5.0, Mu - 1.11 - 2.41 * Math.Log10(5.0), 0.085, 0.30, 99);
        return sb.ToString();
    }

    private static async Task<JsonElement> WaitForAsync(TestApp t, string star, Func<JsonElement, bool> done)
    {
        var end = DateTime.UtcNow + TimeSpan.FromSeconds(90);
        while (true)
        {
            var d = await Json(await t.Client.GetAsync($"/api/v1/stars/by-name/{star}"));
            if (d.TryGetProperty("result", out var r) && r.ValueKind == JsonValueKind.Object && done(d)) return d;
            if (DateTime.UtcNow > end) return d;
            await Task.Delay(200);
        }
    }

    private static bool HasFieldContext(JsonElement d) => d.GetProperty("result").TryGetProperty("field_context", out var f) && f.ValueKind == JsonValueKind.Object;

    [Fact]
    public async Task FieldPass_RelabelsTypeIICepheid_AndReviewerClassStillWins()
    {
        await using var t = await TestApp.StartAsync();
        var up = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(StarList(), [("ks.csv", Photometry())]));
        Assert.True(up.IsSuccessStatusCode, await up.Content.ReadAsStringAsync());
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(90)));

        var d = await WaitForAsync(t, "T2-01", HasFieldContext);
        var result = d.GetProperty("result");
        Assert.Equal("t2cep", d.GetProperty("star").GetProperty("class").GetString());
        Assert.Equal("type_ii_cepheid", result.GetProperty("class").GetProperty("class").GetString());
        Assert.Equal("classical_cepheid_fundamental", result.GetProperty("light_curve_class").GetProperty("class").GetString());
        Assert.Contains(result.GetProperty("class").GetProperty("reasons").EnumerateArray(), r => r.GetString()!.Contains("PL position"));
        Assert.Equal("matsunaga2006_ks", d.GetProperty("star").GetProperty("relation_id").GetString());
        Assert.Equal(Mu, d.GetProperty("star").GetProperty("distance_modulus").GetDouble(), 0.15);
        var ctx = result.GetProperty("field_context");
        Assert.Equal(10, ctx.GetProperty("star_count").GetInt32());
        Assert.Equal(64, ctx.GetProperty("star_set_hash").GetString()!.Length);
        // The pass rewrote the row from a copy read without the plotted curves: they are back, whole.
        var search = result.GetProperty("search");
        int plotted = search.GetProperty("periodogram").GetProperty("x").GetArrayLength();
        Assert.True(plotted > 100, $"periodogram of {plotted} points after the field pass");
        Assert.Equal(plotted, search.GetProperty("window").GetProperty("y").GetArrayLength());

        // The field pass rebuilt the input hash from the digest the analysis recorded, without reading the observations.
        Assert.Equal(64, result.GetProperty("observations_digest").GetString()!.Length);
        // The stored analysis, with its field context, reproduces (same class, numbers and input hash).
        var rep = Reproduction.Run(t.Db, "T2-01", 0, CalibrationRegistry.Embedded);
        Assert.True(rep.Identical, string.Join("; ", rep.Differences.Select(x => $"{x.Quantity}: {x.Stored} vs {x.Rerun}")));

        // A classical star stays classical, with the PL reason.
        var f = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/F-05"));
        Assert.Equal("dcep_f", f.GetProperty("star").GetProperty("class").GetString());

        // The reviewer's class wins over the field pass, and distances follow it.
        long id = d.GetProperty("star").GetProperty("star_id").GetInt64();
        var dec = await t.Client.PostAsJsonAsync($"/api/v1/stars/{id}/decisions", new { action = "set_class", @class = "dcep_f" });
        Assert.Equal(HttpStatusCode.Created, dec.StatusCode);
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var after = await WaitForAsync(t, "T2-01", x => HasFieldContext(x) && x.GetProperty("result").GetProperty("class").GetProperty("source").GetString() == "reviewer");
        Assert.Equal("reviewer", after.GetProperty("result").GetProperty("class").GetProperty("source").GetString());
        Assert.Equal("dcep_f", after.GetProperty("star").GetProperty("class").GetString());
        Assert.Equal("benedict2007_k", after.GetProperty("star").GetProperty("relation_id").GetString());
    }

    private const string Header = "id,family,class,kind,mag,color1,color2,wesenheit_r,a,a_err,b,b_err,p0,gamma,gamma_err,metallicity_scale,z_ref,feh_default,feh_default_err,alpha_fe,scatter,logp_min,logp_max,period_mode,anchor,source,table,tag,notes";
    // A team's K relation: the benedict2007_k slope with a zero point 0.10 mag fainter (a test value, not a published one).
    private const string TeamRow = "team_k,team,dcep_f;dcep_1o,absolute,K,,,,-5.61,0.03,-3.32,0.12,1,0,0,feh,0,0,0,0,0.11,0.4,1.6,F,hst_fgs_parallax,\"Team calibration (test), 2026\",,X,test row";

    private static string NewDataDir() => Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"));

    [Fact]
    public async Task CalibrationDir_ServesAndUsesUserRelation_WhenFileIsValid()
    {
        string dataDir = NewDataDir();
        Directory.CreateDirectory(Path.Combine(dataDir, "calibrations"));
        File.WriteAllText(Path.Combine(dataDir, "calibrations", "team.csv"), Header + "\n" + TeamRow + "\n");
        await using var t = await TestApp.StartAsync(dataDir);

        var resp = await t.Client.GetAsync("/api/v1/calibrations");
        string hash = resp.Headers.GetValues("X-Calibration-Registry").Single();
        var list = (await Json(resp)).EnumerateArray().ToList();
        var team = Assert.Single(list, r => r.GetProperty("id").GetString() == "team_k");
        Assert.True(team.GetProperty("user_supplied").GetBoolean());
        Assert.Equal("team.csv", team.GetProperty("file").GetString());
        Assert.Equal("Team calibration (test), 2026", team.GetProperty("source").GetString());
        Assert.False(list.Single(r => r.GetProperty("id").GetString() == "benedict2007_k").GetProperty("user_supplied").GetBoolean());
        Assert.NotEqual(CalibrationRegistry.Embedded.Hash, hash);

        var up = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(StarList(), [("ks.csv", Photometry())]));
        Assert.True(up.IsSuccessStatusCode);
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(90)));
        var before = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/F-06"));
        long fieldId = before.GetProperty("star").GetProperty("field_id").GetInt64();
        var put = await t.Client.PutAsJsonAsync($"/api/v1/fields/{fieldId}/settings", new { calibration_id = "team_k" });
        Assert.Equal(HttpStatusCode.OK, put.StatusCode);
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(90)));
        var after = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/F-06"));
        Assert.Equal("team_k", after.GetProperty("star").GetProperty("relation_id").GetString());
        Assert.Equal(hash, after.GetProperty("result").GetProperty("calibration_registry_hash").GetString());
        // 0.10 mag fainter zero point -> modulus 0.10 smaller than with benedict2007_k (same star, same photometry).
        Assert.Equal(before.GetProperty("star").GetProperty("distance_modulus").GetDouble() - 0.10,
            after.GetProperty("star").GetProperty("distance_modulus").GetDouble(), 0.02);
    }

    [Fact]
    public async Task CalibrationDir_RefusesStartWithFileLineAndField_AndKeepsStoredResults()
    {
        string dataDir = NewDataDir();
        string cal = Path.Combine(dataDir, "calibrations");
        Directory.CreateDirectory(cal);
        File.WriteAllText(Path.Combine(cal, "team.csv"), Header + "\n" + TeamRow + "\n");
        string storedHash;
        await using (var t = await TestApp.StartAsync(dataDir))
        {
            await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9))]));
            Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
            storedHash = (await Json(await t.Client.GetAsync("/api/v1/stars/by-name/T-CEP-1"))).GetProperty("analysis").GetProperty("input_hash").GetString()!;
        }

        // Line 3 of bad.csv: the zero point "abc" is not a number.
        File.WriteAllText(Path.Combine(cal, "bad.csv"), Header + "\n" + TeamRow.Replace("team_k", "team_k2") + "\n" + TeamRow.Replace("team_k", "team_k3").Replace("-5.61", "abc") + "\n");
        var e = await Assert.ThrowsAsync<InvalidOperationException>(() => TestApp.StartAsync(dataDir));
        Assert.Contains("bad.csv, line 3, field 'a': 'abc' is not a finite number", e.Message);
        Assert.Contains(Jobs.Calibrations.Setting, e.Message);

        File.Delete(Path.Combine(cal, "bad.csv"));
        await using (var t = await TestApp.StartAsync(dataDir, runJobs: false))
        {
            Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(1)));
            var d = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/T-CEP-1"));
            Assert.Equal(storedHash, d.GetProperty("analysis").GetProperty("input_hash").GetString());
            Assert.True(d.GetProperty("analysis").GetProperty("current").GetBoolean());
        }
    }
}
