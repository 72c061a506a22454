using System.Net;
using System.Net.Http.Json;
using System.Text.Json;

namespace PulseLadder.Web.Tests;

public sealed class FieldSettingsTests
{
    private static async Task<JsonElement> Json(HttpResponseMessage r) => await r.Content.ReadFromJsonAsync<JsonElement>();

    [Fact]
    public async Task SetSettings_ReanalysesStarsWithTheFieldsRelation_WhenCalibrationIsChosen()
    {
        await using var t = await TestApp.StartAsync();
        await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9))]));
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var relations = (await Json(await t.Client.GetAsync("/api/v1/calibrations"))).EnumerateArray().ToList();
        Assert.Contains(relations, r => r.GetProperty("id").GetString() == "benedict2007_v" && r.GetProperty("source").GetString()!.Contains("Benedict"));

        var before = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/T-CEP-1"));
        long fieldId = before.GetProperty("star").GetProperty("field_id").GetInt64();
        var resp = await t.Client.PutAsJsonAsync($"/api/v1/fields/{fieldId}/settings", new { calibration_id = "fouque2007_v", default_ebv = 0.05 });
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var after = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/T-CEP-1"));
        Assert.True(after.GetProperty("analysis").GetProperty("revision").GetInt64() > before.GetProperty("analysis").GetProperty("revision").GetInt64());
        Assert.Equal("fouque2007_v", after.GetProperty("result").GetProperty("settings").GetProperty("distance").GetProperty("cepheid_relation_id").GetString());

        var bad = await t.Client.PutAsJsonAsync($"/api/v1/fields/{fieldId}/settings", new { calibration_id = "no_such_relation" });
        Assert.Equal(HttpStatusCode.BadRequest, bad.StatusCode);
    }
}
