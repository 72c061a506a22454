using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;

namespace PulseLadder.Web.Tests.Export;

/// <summary>
/// The audit trail travels with a field's results (issue 7, "exported with a field's results"): JSON inline, VOTable
/// as a second TABLE (read back by astropy's io.votable, Debian python3-astropy), CSV as a companion file.
/// </summary>
[Collection(ExportCollection.Name)]
public sealed class AuditExportTests(ExportFixture fx)
{
    [Fact]
    public async Task ExportJson_CarriesTheUploadAndTheReviewDecision_OfTheField()
    {
        var json = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/export?format=json");
        var audit = json.GetProperty("audit").EnumerateArray().ToList();
        // The fixture: one upload, then T-CEP-1 accepted, both by the test host's signed-in admin.
        Assert.Contains(audit, a => a.GetProperty("action").GetString() == "upload" && a.GetProperty("actor").GetString() == TestApp.AdminName
            && a.GetProperty("subject").GetString() == "batch 1" && a.GetProperty("detail").GetString()!.Contains("stars added 2"));
        Assert.Contains(audit, a => a.GetProperty("action").GetString() == "review:accept" && a.GetProperty("actor").GetString() == TestApp.AdminName
            && a.GetProperty("subject").GetString() == "star T-CEP-1");
        var ids = audit.Select(a => a.GetProperty("id").GetInt64()).ToList();
        Assert.Equal(ids.Order(), ids);
        Assert.All(audit, a => Assert.True(DateTimeOffset.TryParse(a.GetProperty("at").GetString(), System.Globalization.CultureInfo.InvariantCulture, System.Globalization.DateTimeStyles.None, out _)));
    }

    [Fact]
    public async Task ExportVoTable_HasAnAuditTableReadByAstropy()
    {
        const string python = "/usr/bin/python3";
        Assert.True(File.Exists(python), "Debian's /usr/bin/python3 with python3-astropy is required");
        string path = Path.Combine(fx.App.DataDir, "audit-test.vot");
        await File.WriteAllBytesAsync(path, await fx.App.Client.GetByteArrayAsync($"/api/v1/fields/{fx.FieldId}/export?format=votable"));
        var psi = new ProcessStartInfo(python) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add("-c");
        psi.ArgumentList.Add("""
            import json, sys
            from astropy.io.votable import parse
            vot = parse(sys.argv[1], verify='exception')
            tables = list(vot.iter_tables())
            t = [x for x in tables if x.name == 'audit'][0].to_table()
            print(json.dumps({"tables": [x.name for x in tables], "colnames": t.colnames,
                              "rows": [{c: (int(r[c]) if c == 'id' else str(r[c])) for c in t.colnames} for r in t]}))
            """);
        psi.ArgumentList.Add(path);
        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        Assert.True(p.ExitCode == 0, await stderr);
        var got = JsonDocument.Parse(await stdout).RootElement;
        Assert.Equal(["test-field-distances", "audit"], got.GetProperty("tables").EnumerateArray().Select(x => x.GetString()));
        Assert.Equal(["id", "at", "actor", "action", "subject", "detail"], got.GetProperty("colnames").EnumerateArray().Select(x => x.GetString()));
        var json = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/export?format=json");
        // astropy strips the trailing blank of a TD ("duplicates: " with none listed), so compare trimmed text.
        var want = json.GetProperty("audit").EnumerateArray().Select(a => (a.GetProperty("id").GetInt64(), a.GetProperty("action").GetString(), a.GetProperty("detail").GetString()!.TrimEnd())).ToList();
        var rows = got.GetProperty("rows").EnumerateArray().Select(a => (a.GetProperty("id").GetInt64(), a.GetProperty("action").GetString(), a.GetProperty("detail").GetString()!.TrimEnd())).ToList();
        Assert.Equal(want, rows);
    }

    [Fact]
    public async Task AuditCsv_ListsTheSameEntriesAsTheJsonExport()
    {
        using var resp = await fx.App.Client.GetAsync($"/api/v1/fields/{fx.FieldId}/audit");
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        Assert.Equal("test-field-audit.csv", resp.Content.Headers.ContentDisposition?.FileName?.Trim('"'));
        var lines = (await resp.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal("id,at,actor,action,subject,detail", lines[0]);
        var json = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/export?format=json");
        Assert.Equal(json.GetProperty("audit").EnumerateArray().Select(a => a.GetProperty("id").GetInt64().ToString(System.Globalization.CultureInfo.InvariantCulture)),
            lines[1..].Select(l => l.Split(',')[0]));
    }
}

/// <summary>Each field's export holds its own audit entries and no other field's.</summary>
public sealed class AuditExportIsolationTests
{
    [Fact]
    public async Task ExportAudit_HoldsOnlyTheFieldsOwnEntries_WhenTwoFieldsExist()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        string stars = "star,field,ra_deg,dec_deg\nA-1,field-a,10,10\nB-1,field-b,20,20\n";
        (await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(stars, [("a.csv", Fixtures.Photometry("A-1", 5.0, 13, nights: 20))]))).EnsureSuccessStatusCode();
        var second = Fixtures.Form(null, [("b.csv", Fixtures.Photometry("B-1", 7.0, 14, nights: 20))]);
        // The audit names the signed-in account: the second batch comes from an observer's token.
        using var observer = t.ClientFor("observer", "observer-b");
        (await observer.PostAsync("/api/v1/uploads", second)).EnsureSuccessStatusCode();
        var fields = (await t.Client.GetFromJsonAsync<JsonElement>("/api/v1/fields")).EnumerateArray().ToDictionary(f => f.GetProperty("name").GetString()!, f => f.GetProperty("field_id").GetInt64());
        (await t.Client.PutAsJsonAsync($"/api/v1/fields/{fields["field-b"]}/settings", new { default_ebv = 0.05 })).EnsureSuccessStatusCode();

        async Task<List<(string Action, string Subject, string Actor)>> Audit(string field) =>
            (await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fields[field]}/export?format=json")).GetProperty("audit").EnumerateArray()
                .Select(a => (a.GetProperty("action").GetString()!, a.GetProperty("subject").GetString()!, a.GetProperty("actor").GetString()!)).ToList();
        // Batch 1 (star list + A-1 photometry) touched both fields' stars; batch 2 only B-1; the settings change only field-b.
        Assert.Equal([("upload", "batch 1", TestApp.AdminName)], await Audit("field-a"));
        Assert.Equal([("upload", "batch 1", TestApp.AdminName), ("upload", "batch 2", "observer-b"), ("field:settings", "field field-b", TestApp.AdminName)], await Audit("field-b"));
        var campaign = (await t.Client.GetFromJsonAsync<JsonElement>("/api/v1/export?format=json")).GetProperty("audit");
        Assert.Equal(3, campaign.GetArrayLength());
    }
}
