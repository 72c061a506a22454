using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using Microsoft.Extensions.DependencyInjection;

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

/// <summary>Issue 8 (queue cost per job): a settings change queues the field's stars in batches, as an upload does.</summary>
public sealed class FieldSettingsQueueTests
{
    [Fact]
    public async Task SetSettings_QueuesTheFieldsStarsInBatches_WithTheirNewRevisions()
    {
        // No job server: the queue keeps what was enqueued, to be read back.
        await using var t = await TestApp.StartAsync(runJobs: false);
        const int n = 20;
        var stars = new System.Text.StringBuilder("star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh\n");
        var phot = new List<(string, string)>();
        for (int i = 0; i < n; i++)
        {
            stars.Append(System.Globalization.CultureInfo.InvariantCulture, $"B-CEP-{i},batch-field,80.{i},-69.2,,0.10,0.02,\n");
            phot.Add(($"b{i}.csv", Fixtures.Photometry($"B-CEP-{i}", 4.0 + 0.1 * i, 14.0, nights: 30, seed: i)));
        }
        // A second field whose pending stars must not be queued again by the first field's change.
        stars.Append("O-CEP-1,other-field,81.0,-69.0,,0.10,0.02,\n");
        phot.Add(("o.csv", Fixtures.Photometry("O-CEP-1", 5.0, 14.0, nights: 30)));
        var up = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(stars.ToString(), phot));
        Assert.Equal(HttpStatusCode.Created, up.StatusCode);

        var monitor = t.App.Services.GetRequiredService<Hangfire.JobStorage>().GetMonitoringApi();
        var seen = monitor.EnqueuedJobs("analysis", 0, 10_000).Select(j => j.Key).ToHashSet();
        Dictionary<long, long> revisions;
        long fieldId;
        using (var c = t.Db.Open())
        {
            fieldId = Dapper.SqlMapper.ExecuteScalar<long>(c, "SELECT id FROM fields WHERE name = 'batch-field'");
            revisions = Dapper.SqlMapper.Query<(long Id, long Rev)>(c, "SELECT id, revision FROM stars WHERE field_id = @fieldId", new { fieldId })
                .ToDictionary(r => r.Id, r => r.Rev);
        }
        Assert.Equal(n, revisions.Count);

        var resp = await t.Client.PutAsJsonAsync($"/api/v1/fields/{fieldId}/settings", new { default_ebv = 0.2 });
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);

        var added = monitor.EnqueuedJobs("analysis", 0, 10_000).Where(j => !seen.Contains(j.Key)).Select(j => j.Value.Job).ToList();
        int batch = new PulseLadder.Jobs.JobsOptions().EffectiveBatchSize;
        Assert.Equal((n + batch - 1) / batch, added.Count);
        var queued = new Dictionary<long, long>();
        foreach (var job in added)
        {
            Assert.Equal("RunBatch", job.Method.Name);
            var (ids, revs) = ((long[])job.Args[0], (long[])job.Args[1]);
            for (int k = 0; k < ids.Length; k++) queued.Add(ids[k], revs[k]);
        }
        // Every star of the field once, at the revision the change gave it; none of the other field.
        Assert.Equal(revisions.Keys.Order(), queued.Keys.Order());
        Assert.All(queued, q => Assert.Equal(revisions[q.Key] + 1, q.Value));
    }
}
