using System.Diagnostics;
using System.Globalization;
using Dapper;
using Npgsql;
using PulseLadder.Core.Pipeline;
using PulseLadder.Demo;
using PulseLadder.Storage;
using Xunit.Abstractions;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>
/// The scaled mode as deployed: a web host without a job server, worker processes sharing the PostgreSQL queue,
/// and the faults a deployment meets (a worker killed mid-job, the database restarted).
/// </summary>
public sealed class ScaledModeTests(ITestOutputHelper output)
{
    /// <summary>
    /// Stars in the fault test: the 2,000 (about 2.5 minutes on this 2-core machine since uploads stream and
    /// stars travel in batches); PULSELADDER_SCALEOUT_STARS sets another size (e.g. 80 for a quick local run).
    /// </summary>
    private static int StarCount =>
        int.TryParse(Environment.GetEnvironmentVariable("PULSELADDER_SCALEOUT_STARS"), NumberStyles.Integer, CultureInfo.InvariantCulture, out int n) ? n : 2000;

    [Fact]
    public async Task Workers_StoreExactlyOneCurrentResultPerStar_WhenAWorkerIsKilledAndPostgresRestarts()
    {
        string cs = ScaleOutEnvironment.CreateDatabase();
        string setting = "postgres:" + cs;
        string dir = Path.Combine(Path.GetTempPath(), "plx-scaleout-" + Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = StarCount });
        var all = new List<PulseLadderProcess>();
        PulseLadderProcess Start(string name, params string[] args)
        {
            var p = PulseLadderProcess.Start(name, args);
            all.Add(p);
            return p;
        }
        try
        {
            int port = ScaleOutEnvironment.FreePort();
            string url = $"http://127.0.0.1:{port}";
            var web = Start("web", "serve", "--urls", url, "--database", setting, "--jobs", "postgres", "--no-jobs");
            using var http = new HttpClient { BaseAddress = new Uri(url + "/"), Timeout = TimeSpan.FromMinutes(5) };
            await WaitForHealth(http, web);
            // Nothing answers without an account: a token-only admin and its token, made with the CLI on the database.
            Assert.Equal(System.Net.HttpStatusCode.Unauthorized, (await http.GetAsync("api/v1/progress")).StatusCode);
            http.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", CreateAdminToken(setting));
            // The account store's and audit log's SQL on PostgreSQL: the CLI's entries, filtered and paged.
            foreach (var q in new[] { "api/v1/audit?limit=5&action=token:", "api/v1/audit?limit=5&action=token:&before=999999999" })
            {
                var page = System.Text.Json.JsonDocument.Parse(await http.GetStringAsync(q)).RootElement.GetProperty("items");
                Assert.Equal("token:create", Assert.Single(page.EnumerateArray()).GetProperty("action").GetString());
            }

            var sw = Stopwatch.StartNew();
            await UploadDemoCampaign(http, dir);
            var db = Database.Postgres(cs);
            int stars;
            using (var c = db.Open()) stars = (int)StarStore.CountWithObservations(c);
            Assert.True(stars >= StarCount * 0.9, $"only {stars} stars with photometry were stored");
            output.WriteLine($"{stars} stars uploaded in {sw.Elapsed.TotalSeconds:F1} s");

            var a = Start("worker-a", "work", "--database", setting, "--workers", "1");
            var b = Start("worker-b", "work", "--database", setting, "--workers", "1");

            // Generous per-phase limits (about 1 s per star, at least 3 minutes) for a loaded 2-core machine.
            TimeSpan Phase(int n) => TimeSpan.FromSeconds(Math.Max(180, n));
            await WaitUntil(() => Done(db) >= stars / 4, Phase(stars / 4), "a quarter of the stars", all);
            // Worker A dies mid-batch, while it runs a job (Hangfire's Processing state names the server, which
            // carries the pid): that job must be handed to another worker, not lost.
            long? inFlight = null;
            var until = DateTime.UtcNow + TimeSpan.FromSeconds(60);
            while (inFlight is null && DateTime.UtcNow < until) inFlight = ProcessingOn(db, a.Pid);
            a.Kill();
            bool interrupted = inFlight is { } jid && JobState(db, jid) == "Processing";
            output.WriteLine($"killed worker-a at {Done(db)} of {stars} ({sw.Elapsed.TotalSeconds:F1} s); job {inFlight} interrupted: {interrupted}");

            await WaitUntil(() => Done(db) >= stars / 2, Phase(stars / 4), "half of the stars", all);
            // The database goes away under running jobs and Hangfire's polling connections.
            ScaleOutEnvironment.RestartPostgres();
            NpgsqlConnection.ClearAllPools();
            output.WriteLine($"restarted PostgreSQL at {Done(db)} of {stars} ({sw.Elapsed.TotalSeconds:F1} s)");
            Start("worker-c", "work", "--database", setting, "--workers", "1");

            // At the default size this is well under the old fixed 5-minute invisibility timeout: the killed worker's
            // job must come back quickly.
            await WaitUntil(() => Done(db) >= stars, Phase(stars / 2), "every star", all);
            output.WriteLine($"all {stars} stars analysed after {sw.Elapsed.TotalSeconds:F1} s");
            // The killed worker's job itself comes back once its invisibility timeout (30 s, sliding) passes, even when
            // a restarted worker's recovery has meanwhile queued its stars again: it must then succeed, storing nothing
            // twice (checked below, after it ran).
            if (inFlight is { } k)
                await WaitUntil(() => JobState(db, k) == "Succeeded", TimeSpan.FromSeconds(180), $"the interrupted job {k} to succeed", all);
            Assert.False(web.HasExited, "web host exited:\n" + web.Output);
            Assert.False(b.HasExited, "worker-b exited:\n" + b.Output);

            using var conn = db.Open();
            AssertOneCurrentResultPerStar(conn, stars);
            Assert.Empty(StarStore.Pending(conn, PipelineVersion.Current));
            if (inFlight is { } j) Assert.Equal("Succeeded", JobState(db, j));
        }
        finally
        {
            foreach (var p in all) p.Dispose();
            foreach (var p in all) output.WriteLine($"--- {p.Name} ---\n{Tail(p.Output)}");
            try { Directory.Delete(dir, recursive: true); } catch (IOException) { }
        }
    }

    private static long? ProcessingOn(Database db, int pid)
    {
        using var c = new NpgsqlConnection(db.ConnectionString);
        c.Open();
        return c.ExecuteScalar<long?>("""
            SELECT j.id FROM hangfire.job j JOIN hangfire.state s ON s.id = j.stateid
            WHERE j.statename = 'Processing' AND s.data::json->>'ServerId' LIKE @p LIMIT 1
            """, new { p = $"%:{pid}:%" });
    }

    private static string? JobState(Database db, long jobId)
    {
        using var c = new NpgsqlConnection(db.ConnectionString);
        c.Open();
        return c.ExecuteScalar<string?>("SELECT statename FROM hangfire.job WHERE id = @jobId", new { jobId });
    }

    /// <summary>Exactly one result per star with photometry: none missing, none stored twice, none for a revision the star does not have.</summary>
    internal static void AssertOneCurrentResultPerStar(System.Data.Common.DbConnection conn, long stars)
    {
        var perStar = conn.Query<(long StarId, long Current, long Total)>("""
            SELECT s.id,
                   (SELECT COUNT(*) FROM analyses a WHERE a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @v),
                   (SELECT COUNT(*) FROM analyses a WHERE a.star_id = s.id)
            FROM stars s WHERE EXISTS (SELECT 1 FROM observations o WHERE o.star_id = s.id)
            """, new { v = PipelineVersion.Current }).AsList();
        Assert.Equal(stars, perStar.Count);
        Assert.All(perStar, r => Assert.Equal((1L, 1L), (r.Current, r.Total)));
    }

    /// <summary>Stars with a current result; -1 while the server cannot be reached (it may be restarting).</summary>
    internal static long Done(Database db)
    {
        using var c = new NpgsqlConnection(db.ConnectionString);
        try
        {
            c.Open();
            return c.ExecuteScalar<long>("""
                SELECT COUNT(*) FROM stars s
                WHERE EXISTS (SELECT 1 FROM analyses a WHERE a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @v)
                """, new { v = PipelineVersion.Current });
        }
        catch (NpgsqlException)
        {
            // The server may be restarting; ask again on the next poll.
            return -1;
        }
    }

    /// <summary>`pulseladder user add ci-admin --role admin --no-password`, then `user token`: returns the printed token.</summary>
    internal static string CreateAdminToken(string setting)
    {
        using (var add = PulseLadderProcess.Start("user-add", ["user", "add", "ci-admin", "--role", "admin", "--no-password", "--database", setting]))
            Assert.True(add.WaitForExit(TimeSpan.FromSeconds(90)) == 0, "user add failed:\n" + add.Output);
        using var token = PulseLadderProcess.Start("user-token", ["user", "token", "ci-admin", "--label", "scale-out tests", "--database", setting]);
        Assert.True(token.WaitForExit(TimeSpan.FromSeconds(90)) == 0, "user token failed:\n" + token.Output);
        // The token is the only line starting with the token prefix (the note goes to standard error).
        return token.Output.Split('\n').Select(l => l.Trim()).Single(l => l.StartsWith("plx_", StringComparison.Ordinal));
    }

    /// <summary>POST /api/v1/uploads with a demo campaign folder's star list and photometry files (JD_UTC with its offset).</summary>
    internal static async Task UploadDemoCampaign(HttpClient http, string dir)
    {
        using var form = new MultipartFormDataContent();
        form.Add(new StringContent("jd_utc"), "time_scale");
        form.Add(new StringContent(DemoCampaign.TimeOffset.ToString(CultureInfo.InvariantCulture)), "time_offset");
        form.Add(new ByteArrayContent(File.ReadAllBytes(Path.Combine(dir, "stars.csv"))), "stars", "stars.csv");
        foreach (var f in Directory.GetFiles(dir, "photometry-*.csv").Order(StringComparer.Ordinal))
            form.Add(new ByteArrayContent(File.ReadAllBytes(f)), "photometry", Path.GetFileName(f));
        using var resp = await http.PostAsync("api/v1/uploads", form);
        Assert.True(resp.IsSuccessStatusCode, $"upload: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync()}");
    }

    internal static async Task WaitForHealth(HttpClient http, PulseLadderProcess web)
    {
        var deadline = DateTime.UtcNow + TimeSpan.FromSeconds(90);
        while (DateTime.UtcNow < deadline)
        {
            if (web.HasExited) throw new InvalidOperationException("web host exited:\n" + web.Output);
            try
            {
                using var r = await http.GetAsync("health");
                if (r.IsSuccessStatusCode) return;
            }
            catch (HttpRequestException) { }
            await Task.Delay(250);
        }
        throw new TimeoutException("web host did not answer /health in 90 s:\n" + web.Output);
    }

    private static async Task WaitUntil(Func<bool> done, TimeSpan timeout, string what, IEnumerable<PulseLadderProcess> processes)
    {
        var deadline = DateTime.UtcNow + timeout;
        while (DateTime.UtcNow < deadline)
        {
            if (done()) return;
            await Task.Delay(200);
        }
        throw new TimeoutException($"waited {timeout} for {what}:\n" + string.Join("\n", processes.Select(p => $"--- {p.Name} ---\n{Tail(p.Output)}")));
    }

    internal static string Tail(string s) => s.Length <= 4000 ? s : "..." + s[^4000..];
}
