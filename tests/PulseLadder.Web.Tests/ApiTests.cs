using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using Microsoft.AspNetCore.Mvc.Testing;
using PulseLadder.Storage;

namespace PulseLadder.Web.Tests;

public sealed class ApiTests
{
    private static async Task<JsonElement> Json(HttpResponseMessage r) => await r.Content.ReadFromJsonAsync<JsonElement>();

    [Fact]
    public async Task Upload_AnalysesStarsAndServesDetail_WhenFilesAreValid()
    {
        await using var t = await TestApp.StartAsync();
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList,
            [("night.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9) + Fixtures.Photometry("T-CEP-2", 11.2, 13.1, seed: 2).Split('\n', 2)[1])]));
        Assert.Equal(HttpStatusCode.Created, resp.StatusCode);
        var body = await Json(resp);
        long uploadId = body.GetProperty("upload_id").GetInt64();
        Assert.Equal(2, body.GetProperty("stars_queued").GetInt32());
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));

        var status = await Json(await t.Client.GetAsync($"/api/v1/uploads/{uploadId}"));
        Assert.Equal("done", status.GetProperty("state").GetString());
        Assert.Equal(2, status.GetProperty("stars_done").GetInt64());

        var fields = await Json(await t.Client.GetAsync("/api/v1/fields"));
        long fieldId = fields[0].GetProperty("field_id").GetInt64();
        var stars = await Json(await t.Client.GetAsync($"/api/v1/fields/{fieldId}/stars"));
        var cep1 = stars.GetProperty("items").EnumerateArray().Single(s => s.GetProperty("star").GetString() == "T-CEP-1");
        // The synthetic light curve was made with P = 5.37 d (Fixtures.Photometry).
        Assert.InRange(cep1.GetProperty("period_days").GetDouble(), 5.37 * 0.998, 5.37 * 1.002);
        Assert.Equal("dcep_f", cep1.GetProperty("class").GetString());

        var detail = await Json(await t.Client.GetAsync($"/api/v1/stars/{cep1.GetProperty("star_id").GetInt64()}"));
        Assert.True(detail.GetProperty("observations").GetArrayLength() > 100);
        var result = detail.GetProperty("result");
        Assert.True(result.GetProperty("search").GetProperty("peaks").GetArrayLength() >= 3);
        int plotted = result.GetProperty("search").GetProperty("periodogram").GetProperty("x").GetArrayLength();
        Assert.InRange(plotted, 100, 5000);
        Assert.True(result.GetProperty("fits").GetArrayLength() == 2);
    }

    [Fact]
    public async Task Upload_IsRefusedWithRowErrors_AndStoresNothing_WhenARowIsBad()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        string phot = "star,time,band,mag,mag_err\nT-CEP-1,11000.5,V,13.9,0.02\nT-CEP-1,11001.5,V,abc,0.02\nT-CEP-9,11002.5,V,13.9,0.02\n";
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("bad.csv", phot)]));
        Assert.Equal(HttpStatusCode.BadRequest, resp.StatusCode);
        var body = await Json(resp);
        var errors = body.GetProperty("errors").EnumerateArray().ToList();
        Assert.Contains(errors, e => e.GetProperty("file").GetString() == "bad.csv" && e.GetProperty("line").GetInt64() == 3 && e.GetProperty("column").GetString() == "mag");
        Assert.Contains(errors, e => e.GetProperty("line").GetInt64() == 4 && e.GetProperty("message").GetString()!.Contains("T-CEP-9"));
        using var c = t.Db.Open();
        Assert.Empty(StarStore.IdsByName(c));
        Assert.Equal(0, ObservationStore.Count(c));
    }

    [Fact]
    public async Task Upload_IsRefusedWith413NamingTheSetting_WhenRowsExceedMaxUploadRows()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:MaxUploadRows", "5"]);
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("a.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 10))]));
        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, resp.StatusCode);
        var body = await Json(resp);
        Assert.Equal(413, body.GetProperty("status").GetInt32());
        Assert.Contains("PulseLadder:MaxUploadRows", body.GetProperty("detail").GetString());
        using var c = t.Db.Open();
        Assert.Equal(0, ObservationStore.Count(c));
    }

    [Fact]
    public async Task Upload_IsRefusedWith413NamingTheSetting_WhenTheBodyExceedsMaxUploadBytes()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:MaxUploadBytes", "2048"]);
        var phot = Fixtures.Photometry("T-CEP-1", 5.37, 13.9);
        Assert.True(phot.Length > 2 * 2048, $"fixture of {phot.Length} bytes is not above the limit");
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("a.csv", phot)]));
        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, resp.StatusCode);
        var body = await Json(resp);
        Assert.Contains("PulseLadder:MaxUploadBytes", body.GetProperty("detail").GetString());
        using var c = t.Db.Open();
        Assert.Empty(StarStore.IdsByName(c));
    }

    [Fact]
    public async Task Upload_AddsNothing_WhenIdenticalContentIsSentAgain()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var phot = Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 30);
        Assert.Equal(HttpStatusCode.Created, (await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("a.csv", phot)]))).StatusCode);
        var again = await Json(await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("a-copy.csv", phot)])));
        Assert.True(again.GetProperty("duplicate").GetBoolean());
        Assert.Equal(0, again.GetProperty("observations_added").GetInt64());
    }

    [Fact]
    public async Task Upload_RequiresTimeScale_NeverGuessesIt()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("a.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 10))], timeScale: null));
        Assert.Equal(HttpStatusCode.BadRequest, resp.StatusCode);
        var body = await Json(resp);
        Assert.Contains(body.GetProperty("errors").EnumerateArray(), e => e.GetProperty("column").GetString() == "time_scale");
    }

    [Fact]
    public async Task Decision_ChoosingPeriod_RerunsStarAndUpdatesFieldSummary()
    {
        await using var t = await TestApp.StartAsync();
        await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9))]));
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var star = await Json(await t.Client.GetAsync("/api/v1/stars/by-name/T-CEP-1"));
        long id = star.GetProperty("star").GetProperty("star_id").GetInt64();
        var peaks = star.GetProperty("result").GetProperty("search").GetProperty("peaks");
        double alternate = peaks[1].GetProperty("period_days").GetDouble();

        var resp = await t.Client.PostAsJsonAsync($"/api/v1/stars/{id}/decisions", new { action = "choose_period", period_days = alternate, by = "someone-else", note = "alias check" });
        Assert.Equal(HttpStatusCode.Created, resp.StatusCode);
        Assert.True((await Json(resp)).GetProperty("queued").GetBoolean());
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));

        var after = await Json(await t.Client.GetAsync($"/api/v1/stars/{id}"));
        Assert.Equal("accepted", after.GetProperty("star").GetProperty("state").GetString());
        Assert.Equal("reviewer", after.GetProperty("result").GetProperty("period").GetProperty("method").GetString());
        Assert.InRange(after.GetProperty("star").GetProperty("period_days").GetDouble(), alternate * 0.99, alternate * 1.01);
        var decisions = after.GetProperty("decisions").EnumerateArray().ToList();
        Assert.Equal("choose_period", decisions[^1].GetProperty("action").GetString());
        // The signed-in account is recorded, not the body's "by" (which old clients may still send).
        Assert.Equal(TestApp.AdminName, decisions[^1].GetProperty("decided_by").GetString());

        // The field summary job follows the decision.
        long fieldId = after.GetProperty("star").GetProperty("field_id").GetInt64();
        HttpResponseMessage summary = new(HttpStatusCode.NotFound);
        for (int i = 0; i < 100 && summary.StatusCode != HttpStatusCode.OK; i++) { await Task.Delay(100); summary = await t.Client.GetAsync($"/api/v1/fields/{fieldId}/summary"); }
        Assert.Equal(HttpStatusCode.OK, summary.StatusCode);
        Assert.Equal(1, (await Json(summary)).GetProperty("n_used").GetInt64());
    }

    [Fact]
    public async Task Decision_IsRefused_WhenActionIsUnknown()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, []));
        var resp = await t.Client.PostAsJsonAsync("/api/v1/stars/1/decisions", new { action = "approve" });
        Assert.Equal(HttpStatusCode.BadRequest, resp.StatusCode);
    }

    [Fact]
    public async Task Export_RoundTripsNumbers_AsCsvAndJson()
    {
        await using var t = await TestApp.StartAsync();
        await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9))]));
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var json = await Json(await t.Client.GetAsync("/api/v1/fields/1/export?format=json"));
        var csvResp = await t.Client.GetAsync("/api/v1/fields/1/export?format=csv");
        Assert.Equal("test-field-distances.csv", csvResp.Content.Headers.ContentDisposition!.FileNameStar ?? csvResp.Content.Headers.ContentDisposition.FileName);
        var lines = (await csvResp.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries);
        var head = lines[0].Split(',');
        var row = json.GetProperty("rows").EnumerateArray().Single(r => r.GetProperty("star").GetString() == "T-CEP-1");
        var cells = lines.Single(l => l.StartsWith("T-CEP-1,", StringComparison.Ordinal)).Split(',');
        double Csv(string col) => double.Parse(cells[Array.IndexOf(head, col)], System.Globalization.CultureInfo.InvariantCulture);
        Assert.Equal(row.GetProperty("period_days").GetDouble(), Csv("period_days"));
        Assert.Equal(row.GetProperty("distance_modulus").GetDouble(), Csv("distance_modulus"));
        Assert.Equal(row.GetProperty("mean_mag_V").GetDouble(), Csv("mean_mag_V"));
    }

    [Fact]
    public async Task OpenApiDocument_ListsTheVersionedRoutes()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var doc = await Json(await t.Client.GetAsync("/openapi/v1.json"));
        var paths = doc.GetProperty("paths").EnumerateObject().Select(p => p.Name).ToList();
        Assert.Contains("/api/v1/uploads", paths);
        Assert.Contains("/api/v1/stars/{starId}/decisions", paths);
        Assert.Contains("/api/v1/fields/{fieldId}/export", paths);
    }

    [Fact]
    public async Task WebApplicationFactory_ServesHealth_WithProgramEntryPoint()
    {
        string dir = Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"));
        await using var factory = new WebApplicationFactory<PulseLadder.Web.PulseLadderOptions>().WithWebHostBuilder(b =>
        {
            b.UseSetting("PulseLadder:DataDir", dir);
            b.UseSetting("PulseLadder:Jobs:RunServer", "false");
        });
        using var client = factory.CreateClient();
        var resp = await client.GetAsync("/health");
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        Assert.Equal("nosniff", resp.Headers.GetValues("X-Content-Type-Options").Single());
        Assert.Equal("DENY", resp.Headers.GetValues("X-Frame-Options").Single());
        Assert.True(File.Exists(Path.Combine(dir, "pulseladder.db")));
        // Without credentials the API answers 401 with ProblemDetails (security.md).
        var problem = await client.GetAsync("/api/v1/stars/999");
        Assert.Equal(HttpStatusCode.Unauthorized, problem.StatusCode);
        Assert.Equal("application/problem+json", problem.Content.Headers.ContentType!.MediaType);
    }
}
