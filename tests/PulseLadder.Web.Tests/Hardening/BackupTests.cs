using System.Globalization;
using Dapper;
using Microsoft.Data.Sqlite;
using PulseLadder.Cli;
using PulseLadder.Core.Pipeline;
using PulseLadder.Demo;
using PulseLadder.Storage;

namespace PulseLadder.Web.Tests.Hardening;

/// <summary>
/// `pulseladder backup` while the job server writes analyses, then restore by copying the file. The reference for
/// "consistent" is SQLite's own PRAGMA integrity_check and the source database's rows.
/// </summary>
public sealed class BackupTests
{
    private static readonly string[] Tables = ["schema_version", "fields", "stars", "uploads", "observations", "upload_stars", "analyses", "review_decisions", "field_summaries", "audit_log"];

    private static MultipartFormDataContent DemoUpload(string dir)
    {
        var form = new MultipartFormDataContent();
        form.Add(new ByteArrayContent(File.ReadAllBytes(Path.Combine(dir, "stars.csv"))), "stars", "stars.csv");
        foreach (var p in Directory.GetFiles(dir, "photometry-*.csv").Order(StringComparer.Ordinal))
            form.Add(new ByteArrayContent(File.ReadAllBytes(p)), "photometry", Path.GetFileName(p));
        form.Add(new StringContent(DemoCampaign.TimeScaleCode), "time_scale");
        form.Add(new StringContent(DemoCampaign.TimeOffset.ToString(CultureInfo.InvariantCulture)), "time_offset");
        return form;
    }

    /// <summary>Every row of a table as one text line per row, in primary-key order.</summary>
    private static List<string> Rows(SqliteConnection c, string table) => Lines(c, $"SELECT * FROM {table} ORDER BY 1");

    private static List<string> Lines(SqliteConnection c, string sql) =>
        c.Query(sql).Select(r =>
            string.Join("|", ((IDictionary<string, object?>)r).Select(kv => kv.Key + "=" + Convert.ToString(kv.Value, CultureInfo.InvariantCulture)))).ToList();

    private static SqliteConnection OpenReadOnly(string path)
    {
        var c = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = path, Mode = SqliteOpenMode.ReadOnly, Pooling = false }.ToString());
        c.Open();
        return c;
    }

    [Fact]
    public async Task Backup_IsConsistentSnapshotAndRestores_WhenTakenWhileJobsWrite()
    {
        string demo = Path.Combine(Path.GetTempPath(), "plx-backup-tests", Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(demo, new DemoOptions { StarCount = 30, Seed = 5 });
        string backups = Path.Combine(demo, "backups");
        var snapshots = new List<(string Path, long AnalysesAtSource)>();
        string sourceFile;
        List<string> sourceObservations;
        int latest;

        await using (var t = await TestApp.StartAsync(workers: 1))
        {
            sourceFile = Path.Combine(t.DataDir, "pulseladder.db");
            latest = t.Db.LatestVersion;
            var resp = await t.Client.PostAsync("/api/v1/uploads", DemoUpload(demo));
            Assert.Equal(System.Net.HttpStatusCode.Created, resp.StatusCode);
            using (var c = (SqliteConnection)t.Db.Open()) sourceObservations = Rows(c, "observations");
            Assert.NotEmpty(sourceObservations);

            // Snapshots while the single job worker stores analyses, one through the CLI command as an operator runs it.
            for (int i = 0; i < 6; i++)
            {
                string path = Path.Combine(backups, $"b{i}.db");
                if (i == 0) Assert.Equal(0, CliApp.Create().Run(["backup", "--data-dir", t.DataDir, "--out", path]));
                else Assert.True(Backup.ToFile(t.Db, path).Ok);
                using (var c = t.Db.Open()) snapshots.Add((path, c.ExecuteScalar<long>("SELECT COUNT(*) FROM analyses")));
                await Task.Delay(150);
            }
            Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(120)));
            // The field pass and summaries follow the last analysis: the final snapshot is taken once they are done too.
            Assert.True(await t.WaitForJobsIdleAsync(TimeSpan.FromSeconds(60)), "jobs still running after 60 s");
            string final = Path.Combine(backups, "final.db");
            var r = Backup.ToFile(t.Db, final);
            Assert.True(r.Ok, r.Message);
            Assert.Equal(latest, r.SchemaVersion);
            snapshots.Add((final, long.MaxValue));
            // An existing target is refused, not overwritten.
            Assert.Equal("target_exists", Backup.ToFile(t.Db, final).FailureReason);
        }

        // The field pass (run once a field is fully analysed) may rewrite a star's class, distance, input hash and
        // result afterwards, so a snapshot's analysis is compared with the final one on what the pass leaves alone.
        const string stable = "SELECT star_id, revision, pipeline_version, outcome, period_days, json_valid(result_json) AS whole FROM analyses ORDER BY star_id";
        List<string> finalAnalyses;
        using (var src = OpenReadOnly(sourceFile)) finalAnalyses = Lines(src, stable);
        bool sawMidAnalysis = false;
        foreach (var (path, _) in snapshots)
        {
            using var b = OpenReadOnly(path);
            Assert.Equal("ok", b.ExecuteScalar<string>("PRAGMA integrity_check"));
            Assert.Equal("delete", b.ExecuteScalar<string>("PRAGMA journal_mode"));
            Assert.Equal(latest, b.ExecuteScalar<int>("SELECT MAX(version) FROM schema_version"));
            // Every observation of the upload, exactly as stored.
            Assert.Equal(sourceObservations, Rows(b, "observations"));
            // Analyses: a subset of the source's final rows (a job's row is there whole or not at all), each for a known star.
            var analyses = Lines(b, stable);
            Assert.Empty(analyses.Except(finalAnalyses));
            Assert.Equal(0, b.ExecuteScalar<long>("SELECT COUNT(*) FROM analyses a LEFT JOIN stars s ON s.id = a.star_id WHERE s.id IS NULL"));
            if (analyses.Count < 30) sawMidAnalysis = true;
        }
        Assert.True(sawMidAnalysis, "no snapshot was taken while analyses were still being written");

        // Restore a mid-analysis snapshot: stop (the source is stopped), copy the file into a data folder, start.
        // The web host checks the schema version, and start-up recovery queues the stars the snapshot had not analysed.
        var mid = snapshots.First(s => s.AnalysesAtSource < 30);
        string restoredDir = Path.Combine(demo, "restored");
        Directory.CreateDirectory(restoredDir);
        File.Copy(mid.Path, Path.Combine(restoredDir, "pulseladder.db"));
        await using (var t = await TestApp.StartAsync(restoredDir, workers: 2))
        {
            Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(120)));
            using var c = (SqliteConnection)t.Db.Open();
            using var src = OpenReadOnly(sourceFile);
            foreach (var table in new[] { "fields", "stars", "uploads", "observations", "upload_stars" })
                Assert.Equal(Rows(src, table), Rows(c, table));
            // The recomputed analyses carry the same numbers as the source's (the pipeline is deterministic).
            const string key = "SELECT star_id, revision, outcome, class, period_days, distance_modulus, input_hash, result_json FROM analyses ORDER BY star_id";
            Assert.Equal(Lines(src, key), Lines(c, key));
        }

        // Restore the final snapshot: every table equals the source row by row.
        string restored2 = Path.Combine(demo, "restored2");
        Directory.CreateDirectory(restored2);
        File.Copy(snapshots[^1].Path, Path.Combine(restored2, "pulseladder.db"));
        await using (var t = await TestApp.StartAsync(restored2, runJobs: false))
        {
            Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(1)));
            using var c = (SqliteConnection)t.Db.Open();
            using var src = OpenReadOnly(sourceFile);
            foreach (var table in Tables.Where(x => x != "audit_log")) Assert.Equal(Rows(src, table), Rows(c, table));
            // The audit log is append-only and the restored host appends its own start-up entries (its test account,
            // its calibration registry): the source's log is a prefix of the restored one.
            var sourceLog = Rows(src, "audit_log");
            Assert.Equal(sourceLog, Rows(c, "audit_log").Take(sourceLog.Count));
        }
    }

    [Fact]
    public void Backup_PointsAtPgDump_WhenTheDatabaseIsPostgres()
    {
        var r = Backup.ToFile(Database.Postgres("Host=127.0.0.1;Port=1;Database=none"), Path.Combine(Path.GetTempPath(), "never.db"));
        Assert.Equal("postgres_use_pg_dump", r.FailureReason);
        Assert.Contains("pg_dump", r.Message);
    }
}
