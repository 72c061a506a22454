using Dapper;
using PulseLadder.Storage;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>The schema belongs to the web host: it migrates an empty database; workers never migrate and refuse what they cannot share.</summary>
public sealed class WorkerRefusalTests
{
    private static readonly TimeSpan Exit = TimeSpan.FromSeconds(90);

    [Fact]
    public async Task WebHost_MigratesEmptyDatabase_AndWorkerRefusesOtherSchemaVersions()
    {
        string cs = ScaleOutEnvironment.CreateDatabase();
        string setting = "postgres:" + cs;
        var db = Database.Postgres(cs);

        // Before the web host ran: schema version 0, the worker must not create it.
        using (var early = PulseLadderProcess.Start("worker-early", ["work", "--database", setting]))
        {
            Assert.Equal(2, early.WaitForExit(Exit));
            Assert.Contains("schema version is 0", early.Output, StringComparison.Ordinal);
            Assert.Contains("PulseLadder:Database", early.Output, StringComparison.Ordinal);
        }
        Assert.Equal(0, db.SchemaVersion());

        int port = ScaleOutEnvironment.FreePort();
        using (var web = PulseLadderProcess.Start("web", ["serve", "--urls", $"http://127.0.0.1:{port}", "--database", setting, "--jobs", "postgres", "--no-jobs"]))
        using (var http = new HttpClient { BaseAddress = new Uri($"http://127.0.0.1:{port}/") })
        {
            await ScaledModeTests.WaitForHealth(http, web);
        }
        Assert.Equal(db.LatestVersion, db.SchemaVersion());
        using (var c = db.Open())
        {
            Assert.Equal(1L, c.ExecuteScalar<long>("SELECT COUNT(*) FROM information_schema.tables WHERE table_name = 'observations' AND table_schema = 'public'"));
            // Hangfire's queue tables live beside the campaign's, in their own schema.
            Assert.True(c.ExecuteScalar<long>("SELECT COUNT(*) FROM information_schema.tables WHERE table_schema = 'hangfire'") > 0);
            // A newer build migrated this database: the old worker must refuse it too.
            c.Execute("INSERT INTO schema_version (version, name, applied_at) VALUES (@v, 'from_the_future.sql', 'x')", new { v = db.LatestVersion + 1 });
        }
        using var late = PulseLadderProcess.Start("worker-late", ["work", "--database", setting]);
        Assert.Equal(2, late.WaitForExit(Exit));
        Assert.Contains($"schema version is {db.LatestVersion + 1}, this build needs {db.LatestVersion}", late.Output, StringComparison.Ordinal);
    }

    [Fact]
    public void Worker_RefusesInMemoryJobStorage_NamingTheSetting()
    {
        string cs = ScaleOutEnvironment.CreateDatabase();
        // The database comes from the environment and the job storage is left at its in-memory default.
        using var p = PulseLadderProcess.Start("worker-inmemory", ["work"], new Dictionary<string, string> { ["PulseLadder__Database"] = "postgres:" + cs });
        Assert.Equal(2, p.WaitForExit(Exit));
        Assert.Contains("'PulseLadder:Jobs:Storage'", p.Output, StringComparison.Ordinal);
        Assert.Contains("in-memory", p.Output, StringComparison.Ordinal);
    }
}
