using System.Globalization;
using System.Text;
using Dapper;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Storage.Tests;

/// <summary>
/// Issue 8: the schema migrates from an empty database and from each earlier schema version, on both databases, with
/// the data an earlier build stored kept row for row, and ends as the schema a new database gets.
/// </summary>
public sealed class MigrationTests
{
    private static readonly TimeProvider Clock = TimeProvider.System;

    public static TheoryData<string, int> EarlierVersions()
    {
        var data = new TheoryData<string, int>();
        foreach (var d in TestDatabases.Dialects().Select(x => (string)x[0]))
        {
            int latest = TestDatabases.Create("sqlite").LatestVersion;
            for (int v = 0; v < latest; v++) data.Add(d, v);
        }
        return data;
    }

    [Theory]
    [MemberData(nameof(EarlierVersions))]
    public void Migrate_FromEachEarlierVersion_KeepsEveryRowAndEndsAsANewDatabasesSchema(string dialect, int from)
    {
        var db = TestDatabases.Create(dialect);
        Assert.Equal(from, db.Migrate(Clock, from));
        Assert.Equal(from, db.SchemaVersion());
        // A worker of the newer build refuses the older schema until the web host has migrated it.
        Assert.Throws<SchemaMismatchException>(db.EnsureSchemaIsCurrent);
        if (from >= 1) StoreWhatVersionHad(db, from);
        var before = Dump(db);

        Assert.Equal(db.LatestVersion, db.Migrate(Clock));
        db.EnsureSchemaIsCurrent();

        // Every table the earlier version had, row for row (schema_version gains the new versions' rows only).
        var after = Dump(db);
        foreach (var (table, rows) in before)
        {
            if (table == "schema_version") Assert.Equal(rows, after[table].Take(rows.Count).ToList());
            else Assert.Equal(rows, after[table]);
        }
        Assert.Equal(Enumerable.Range(1, db.LatestVersion).Select(v => v.ToString(CultureInfo.InvariantCulture)),
            after["schema_version"].Select(r => r.Split('|')[0]));

        // The migrated schema is the one a new database gets.
        var fresh = TestDatabases.Create(dialect);
        fresh.Migrate(Clock);
        Assert.Equal(Schema(fresh), Schema(db));

        // And the current stores work on it: what the earlier build stored reads back, new kinds of rows go in.
        using var c = db.Open();
        if (from >= 1)
        {
            long id = StarStore.IdsByName(c)["M-CEP-1"];
            Assert.Equal(40, ObservationStore.ForStar(c, id).Count);
            Assert.Equal(5.37, AnalysisStore.Latest(c, id, "migration-test")!.PeriodDays);
        }
        using (var tx = c.BeginTransaction())
        {
            AccountStore.AddUser(c, tx, "after-migration", "observer", null, "stamp", "2026-12-02T00:00:00Z");
            tx.Commit();
        }
        Assert.NotNull(AccountStore.GetUser(c, "after-migration"));
    }

    [Fact]
    public void Version3_StoresNewResultsWithLz4_OnPostgres()
    {
        if (!TestDatabases.Dialects().Any(d => (string)d[0] == "postgres")) return; // SQLite only here: nothing to check.
        var db = TestDatabases.Create("postgres");
        db.Migrate(Clock, 2);
        StoreWhatVersionHad(db, 2);
        db.Migrate(Clock);
        StoreWhatVersionHad(db, 3, starName: "M-CEP-2");
        using var c = db.Open();
        // PostgreSQL's own record of the column's method ('l' = lz4, system catalog pg_attribute) and of each stored
        // value's (pg_column_compression): the row stored before the migration keeps pglz, the new one has lz4.
        Assert.Equal("l", c.ExecuteScalar<string>("SELECT attcompression::text FROM pg_attribute WHERE attrelid = 'analyses'::regclass AND attname = 'result_json'"));
        Assert.Equal("l", c.ExecuteScalar<string>("SELECT attcompression::text FROM pg_attribute WHERE attrelid = 'field_summaries'::regclass AND attname = 'result_json'"));
        var methods = c.Query<(string Name, string Method)>("""
            SELECT s.name, pg_column_compression(a.result_json) FROM analyses a JOIN stars s ON s.id = a.star_id ORDER BY s.name
            """).ToList();
        Assert.Equal([("M-CEP-1", "pglz"), ("M-CEP-2", "lz4")], methods);
        // Both read back exactly as stored.
        foreach (var name in new[] { "M-CEP-1", "M-CEP-2" })
            Assert.Equal(LargeResult(name), AnalysisStore.Latest(c, StarStore.IdsByName(c)[name], "migration-test")!.ResultJson);
    }

    /// <summary>Rows of every kind the given schema version holds, written through the stores.</summary>
    private static void StoreWhatVersionHad(Database db, int version, string starName = "M-CEP-1")
    {
        var stars = new StarListFile("stars.csv", "sha-stars-" + starName,
            [new StarInfo(starName, "Migration field", SkyPosition.FromDegrees(80.5, -69.2), PulsatorClass.ClassicalCepheidFundamental, 0.1, 0.02, -0.3)]);
        var phot = new PhotometryFile("p.csv", "sha-phot-" + starName, TimeScale.JdUtc, 0,
            Enumerable.Range(0, 40).Select(i => new PhotometryRow(starName,
                new Observation(0, 2460000.5 + i * 1.3, TimeScale.JdUtc, i % 2 == 0 ? "V" : "I", 14 + 0.01 * i, 0.02, "obs-" + (i % 3), i == 5 ? "cosmic" : null), i + 2)).ToList());
        UploadWriter.Store(db, stars, [phot], "migration-tester", Clock);
        using var c = db.Open();
        long id = StarStore.IdsByName(c)[starName];
        long fieldId = c.ExecuteScalar<long>("SELECT field_id FROM stars WHERE id = @id", new { id });
        using var tx = c.BeginTransaction();
        long analysisId = AnalysisStore.Upsert(c, tx, new AnalysisRow
        {
            StarId = id, Revision = 1, PipelineVersion = "migration-test", Outcome = "ok", Class = "dcep_f", PeriodDays = 5.37,
            PeriodErrDays = 0.001, Fap = 1e-9, DistanceModulus = 18.5, DistanceModulusErr = 0.1, DistancePc = 50_119, DistancePcErr = 2300,
            Flags = "none", SummaryJson = "{\"k\":1}", ResultJson = LargeResult(starName), InputHash = "hash-" + starName, CreatedAt = "2026-11-30T00:00:00Z",
        });
        ReviewStore.Insert(c, tx, new DecisionRow { StarId = id, AnalysisId = analysisId, Action = "accept", DecidedBy = "migration-tester", DecidedAt = "2026-11-30T01:00:00Z" });
        FieldSummaryStore.Upsert(c, tx, new FieldSummaryRow { FieldId = fieldId, PipelineVersion = "migration-test", NUsed = 1, Mu = 18.5, MuErr = 0.1, ResultJson = "{\"n\":1}", ComputedAt = "2026-11-30T02:00:00Z" });
        AuditStore.Append(c, tx, "2026-11-30T03:00:00Z", "migration-tester", "review:accept", starName, "accepted");
        if (version >= 2)
        {
            long user = AccountStore.AddUser(c, tx, "reviewer-" + starName, "reviewer", "hash", "stamp", "2026-11-30T04:00:00Z");
            AccountStore.AddToken(c, tx, user, "nightly", "token-hash-" + starName, "plx_abcd", "2026-11-30T05:00:00Z");
        }
        tx.Commit();
    }

    /// <summary>A result text of the size the pipeline stores (~90 KB), compressible as JSON is.</summary>
    private static string LargeResult(string star)
    {
        var sb = new StringBuilder("{\"star\":\"").Append(star).Append("\",\"power\":[");
        for (int i = 0; i < 9000; i++) sb.Append(i == 0 ? "" : ",").Append((Math.Sin(i * 0.37) * 0.5 + 0.5).ToString("F5", CultureInfo.InvariantCulture));
        return sb.Append("]}").ToString();
    }

    /// <summary>Every user table's rows, each row as its values joined in column order, rows in primary-key order.</summary>
    private static Dictionary<string, List<string>> Dump(Database db)
    {
        using var c = db.Open();
        var result = new Dictionary<string, List<string>>(StringComparer.Ordinal);
        foreach (var table in Tables(db, c))
        {
            var rows = c.Query($"SELECT * FROM {table} ORDER BY 1").Cast<IDictionary<string, object?>>()
                .Select(r => string.Join("|", r.Values.Select(v => Convert.ToString(v, CultureInfo.InvariantCulture))))
                .ToList();
            result[table] = table == "schema_version" ? rows.Select(r => string.Join("|", r.Split('|').Take(2))).ToList() : rows;
        }
        return result;
    }

    private static List<string> Tables(Database db, System.Data.Common.DbConnection c) => db.Dialect == Dialect.Sqlite
        ? c.Query<string>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").ToList()
        : c.Query<string>("SELECT table_name FROM information_schema.tables WHERE table_schema = current_schema() AND table_type = 'BASE TABLE' ORDER BY table_name").ToList();

    /// <summary>Tables, columns (type, nullability, default), indexes and, on PostgreSQL, each column's compression method.</summary>
    private static List<string> Schema(Database db)
    {
        using var c = db.Open();
        if (db.Dialect == Dialect.Sqlite)
            return c.Query<string>("SELECT type || ' ' || name || ': ' || COALESCE(sql, '') FROM sqlite_master WHERE name NOT LIKE 'sqlite_%' ORDER BY type, name").ToList();
        var columns = c.Query<string>("""
            SELECT table_name || '.' || column_name || ' ' || data_type || ' ' || is_nullable || ' ' || COALESCE(column_default, '')
            FROM information_schema.columns WHERE table_schema = current_schema() ORDER BY table_name, column_name
            """);
        var indexes = c.Query<string>("SELECT indexdef FROM pg_indexes WHERE schemaname = current_schema() ORDER BY indexname");
        var compression = c.Query<string>("""
            SELECT cl.relname || '.' || a.attname || ' compression ' || a.attcompression::text
            FROM pg_attribute a JOIN pg_class cl ON cl.oid = a.attrelid JOIN pg_namespace n ON n.oid = cl.relnamespace
            WHERE n.nspname = current_schema() AND cl.relkind = 'r' AND a.attnum > 0 AND NOT a.attisdropped
            ORDER BY cl.relname, a.attname
            """);
        return [.. columns, .. indexes, .. compression];
    }
}
