using Dapper;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Storage.Tests;

public sealed class StorageSuiteTests
{
    private static readonly TimeProvider Clock = TimeProvider.System;

    private static Database Fresh(string dialect)
    {
        var db = TestDatabases.Create(dialect);
        db.Migrate(Clock);
        return db;
    }

    private static StarListFile Stars(params string[] names) => new("stars.csv", "sha-stars-" + string.Join("-", names),
        names.Select((n, i) => new StarInfo(n, "Field A", SkyPosition.FromDegrees(10 + i, -20), PulsatorClass.ClassicalCepheidFundamental, 0.1, 0.01, -0.3)).ToList());

    private static PhotometryFile Photometry(string sha, string star, int n, double t0 = 2460000.5) => new("p.csv", sha, TimeScale.JdUtc, 0,
        Enumerable.Range(0, n).Select(i => new PhotometryRow(star,
            new Observation(0, t0 + i * 1.1, TimeScale.JdUtc, i % 2 == 0 ? "V" : "I", 15 + 0.001 * i, 0.02, "obs-" + (i % 3), i == 3 ? "cosmic" : null), i + 2)).ToList());

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Migrate_ReachesLatestVersionAndIsIdempotent_OnEmptyDatabase(string dialect)
    {
        var db = TestDatabases.Create(dialect);
        Assert.Equal(0, db.SchemaVersion());
        Assert.Throws<SchemaMismatchException>(db.EnsureSchemaIsCurrent);
        int v = db.Migrate(Clock);
        Assert.Equal(db.LatestVersion, v);
        Assert.Equal(v, db.Migrate(Clock));
        db.EnsureSchemaIsCurrent();
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_RoundTripsObservationsExactly_WhenUploadIsValid(string dialect)
    {
        var db = Fresh(dialect);
        var phot = Photometry("sha-1", "S1", 50);
        var outcome = UploadWriter.Store(db, Stars("S1", "S2"), [phot], "tester", Clock);
        Assert.Equal(2, outcome.StarsAdded);
        Assert.Equal(50, outcome.ObservationsAdded);
        using var c = db.Open();
        long id = StarStore.IdsByName(c)["S1"];
        var back = ObservationStore.ForStar(c, id);
        Assert.Equal(50, back.Count);
        for (int i = 0; i < 50; i++)
        {
            var want = phot.Rows[i].Observation;
            Assert.Equal(want.Time, back[i].Time);
            Assert.Equal(want.Mag, back[i].Mag);
            Assert.Equal(want.MagErr, back[i].MagErr);
            Assert.Equal(want.Band, back[i].Band);
            Assert.Equal(want.Observer, back[i].Observer);
            Assert.Equal(want.Flag, back[i].Flag);
            Assert.Equal(TimeScale.JdUtc, back[i].Scale);
        }
        var star = StarStore.Get(c, id)!;
        Assert.Equal("Field A", star.FieldName);
        Assert.Equal(0.1, star.Ebv);
        Assert.Equal("dcep_f", star.DeclaredClass);
        Assert.Single(outcome.StarsToAnalyse);
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_AddsNothing_WhenIdenticalContentIsUploadedAgain(string dialect)
    {
        var db = Fresh(dialect);
        UploadWriter.Store(db, Stars("S1"), [Photometry("sha-same", "S1", 20)], "tester", Clock);
        var again = UploadWriter.Store(db, Stars("S1"), [Photometry("sha-same", "S1", 20)], "tester", Clock);
        Assert.Equal(0, again.ObservationsAdded);
        Assert.Equal(2, again.DuplicateFiles.Count);
        using var c = db.Open();
        Assert.Equal(20, ObservationStore.Count(c));
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_LeavesDatabaseUnchanged_WhenTransactionFails(string dialect)
    {
        var db = Fresh(dialect);
        UploadWriter.Store(db, Stars("S1"), [Photometry("sha-a", "S1", 10)], "tester", Clock);
        // A row naming a star that is not in the database makes the writer throw mid-transaction.
        var bad = Photometry("sha-b", "S1", 10) with { Rows = [.. Photometry("sha-b", "S1", 10).Rows, new PhotometryRow("nobody", new Observation(0, 2460001, TimeScale.JdUtc, "V", 15, 0.02, "", null), 99)] };
        Assert.Throws<InvalidOperationException>(() => UploadWriter.Store(db, null, [bad], "tester", Clock));
        using var c = db.Open();
        Assert.Equal(10, ObservationStore.Count(c));
        Assert.Single(c.Query<long>("SELECT id FROM uploads WHERE kind = 'photometry'"));
    }

    // Rows of several stars interleaved, as in a nightly file sorted by time (common practice).
    private static PhotometryFile Interleaved(string sha, string[] stars, int n) => new("big.csv", sha, TimeScale.JdUtc, 0,
        Enumerable.Range(0, n).Select(i => new PhotometryRow(stars[i % stars.Length],
            new Observation(0, 2460000.5 + i * 1e-4, TimeScale.JdUtc, i % 2 == 0 ? "V" : "I", 15 + 0.001 * (i % 97), 0.02, "obs-" + (i % 3), null), i + 2)).ToList());

    private static List<string> ObservationIndexes(System.Data.Common.DbConnection c) =>
        c.Query<string>("SELECT sql FROM sqlite_master WHERE type = 'index' AND tbl_name = 'observations' AND sql IS NOT NULL ORDER BY name").ToList();

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_KeepsFileOrderPerStarAndTheIndexes_WhenABulkLoadIsLargerThanTheTable(string dialect)
    {
        var db = Fresh(dialect);
        List<string>? indexesBefore = null;
        if (dialect == "sqlite") using (var c0 = db.Open()) indexesBefore = ObservationIndexes(c0);
        UploadWriter.Store(db, Stars("S1", "S2", "S3"), [Photometry("sha-small", "S2", 10)], "tester", Clock);
        // Larger than the table and than ObservationStore's threshold: on SQLite the indexes are rebuilt after the rows.
        int n = (int)ObservationStore.MinRowsToRebuildIndexes + 1001;
        var big = Interleaved("sha-big", ["S1", "S2", "S3"], n);
        var outcome = UploadWriter.Store(db, null, [big], "tester", Clock);
        Assert.Equal(n, outcome.ObservationsAdded);
        using var c = db.Open();
        var ids = StarStore.IdsByName(c);
        foreach (var (name, k) in new[] { ("S1", 0), ("S2", 1), ("S3", 2) })
        {
            var back = ObservationStore.ForStar(c, ids[name]);
            var want = big.Rows.Where((_, i) => i % 3 == k).Select(r => r.Observation.Time).ToList();
            if (name == "S2") want = [.. Photometry("sha-small", "S2", 10).Rows.Select(r => r.Observation.Time), .. want];
            Assert.Equal(want, back.Select(o => o.Time).ToList());
        }
        Assert.Equal(n + 10, ObservationStore.Count(c));
        if (dialect == "sqlite")
        {
            Assert.Equal(indexesBefore, ObservationIndexes(c));
            Assert.Empty(c.Query("PRAGMA foreign_key_check"));
            Assert.Equal(1L, c.ExecuteScalar<long>("PRAGMA foreign_keys"));
            // The star index answers the per-star query again.
            Assert.Contains("ix_observations_star", c.Query("EXPLAIN QUERY PLAN SELECT id FROM observations WHERE star_id = 1").Select(r => (string)((IDictionary<string, object>)r)["detail"]).Single());
        }
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_RoundTripsEveryText_WhenFlagsBandsAndObserversChangeBetweenRows(string dialect)
    {
        // Several multi-row statements plus a remainder: each slot sees texts change, repeat and turn null.
        var db = Fresh(dialect);
        string[] observers = ["ann", "bob", "cy", ""];
        var phot = new PhotometryFile("mix.csv", "sha-mix", TimeScale.JdUtc, 0, Enumerable.Range(0, 203).Select(i => new PhotometryRow(i % 7 == 0 ? "S2" : "S1",
            new Observation(0, 2460000.5 + i, TimeScale.JdUtc, (i / 5) % 3 == 0 ? "V" : (i / 5) % 3 == 1 ? "I" : "B", 15 + 0.01 * i, 0.02,
                observers[(i / 3) % 4], i % 5 == 0 ? "flag-" + (i % 3) : i % 11 == 0 ? new string('x', i % 4 + 1) : null), i + 2)).ToList());
        UploadWriter.Store(db, Stars("S1", "S2"), [phot], "tester", Clock);
        using var c = db.Open();
        var ids = StarStore.IdsByName(c);
        foreach (var star in new[] { "S1", "S2" })
        {
            var want = phot.Rows.Where(r => r.Star == star).Select(r => (r.Observation.Time, r.Observation.Band, r.Observation.Observer, r.Observation.Flag)).ToList();
            var back = ObservationStore.ForStar(c, ids[star]).Select(o => (o.Time, o.Band, o.Observer, o.Flag)).ToList();
            Assert.Equal(want, back);
        }
    }

    [Fact]
    public async Task LargeSqliteLoad_IsReadableAtOnceAndFullyCheckpointable_AndTheConnectionsSettingsComeBack()
    {
        // SQLite's documented PRAGMA wal_checkpoint result row: (busy, frames in the log, frames checkpointed).
        var db = Fresh("sqlite");
        var big = Interleaved("sha-ckpt", ["S1", "S2", "S3"], (int)UploadWriter.MinRowsForBackgroundCheckpoint + 5);
        var outcome = UploadWriter.Store(db, Stars("S1", "S2", "S3"), [big], "tester", Clock);
        // Committed and readable before the checkpoint has necessarily run.
        using (var c0 = db.Open()) Assert.Equal(big.Rows.Count, ObservationStore.Count(c0));
        await UploadWriter.LastBackgroundCheckpoint.WaitAsync(TimeSpan.FromSeconds(60));
        using var c = db.Open();
        var (busy, log, done) = c.QuerySingle<(long, long, long)>("PRAGMA wal_checkpoint(PASSIVE)");
        Assert.Equal(0, busy);
        Assert.Equal(log, done);
        // The pooled connection the upload used is back to SQLite's defaults for everyone else.
        Assert.Equal(1000, c.ExecuteScalar<long>("PRAGMA wal_autocheckpoint"));
        Assert.Equal(1, c.ExecuteScalar<long>("PRAGMA foreign_keys"));
        Assert.Equal(big.Rows.Count, outcome.ObservationsAdded);
    }

    [Fact]
    public void ForStar_NativeSqlitePath_ReadsWhatTheAdoNetReaderReads()
    {
        // Reference: the same query through Microsoft.Data.Sqlite's data reader (ObservationStore.ForStarPortable).
        // Two uploads in different time scales, non-ASCII and empty observers, null and free-text flags.
        var db = Fresh("sqlite");
        string[] observers = ["Åsa", "obs-1", "", "천문대"];
        PhotometryFile Upload(string sha, TimeScale scale, double t0, int n) => new("u-" + sha + ".csv", sha, scale, 0,
            Enumerable.Range(0, n).Select(i => new PhotometryRow(i % 3 == 0 ? "S2" : "S1",
                new Observation(0, t0 + i * 0.37, scale, i % 2 == 0 ? "V" : "Ks", 14 + 0.003 * i, 0.01 + 1e-4 * i,
                    observers[i % observers.Length], i % 9 == 0 ? "saturated " + i : i % 4 == 0 ? "" : null), i + 2)).ToList());
        UploadWriter.Store(db, Stars("S1", "S2"), [Upload("a", TimeScale.JdUtc, 2460000.5, 150)], "tester", Clock);
        UploadWriter.Store(db, null, [Upload("b", TimeScale.BmjdTdb, 60100.25, 90)], "tester", Clock);
        using var c = db.Open();
        var ids = StarStore.IdsByName(c);
        foreach (long id in ids.Values)
        {
            var reference = ObservationStore.ForStarPortable(c, id, null);
            Assert.NotEmpty(reference);
            Assert.Equal(reference, ObservationStore.ForStar(c, id));
            // Inside an open transaction too (the job's field pass reads there).
            using var tx = c.BeginTransaction();
            Assert.Equal(reference, ObservationStore.ForStar(c, id, tx));
            tx.Commit();
        }
        Assert.Empty(ObservationStore.ForStar(c, 987654));
    }

    [Fact]
    public void Store_KeepsIndexesAndStoresNothing_WhenABulkLoadFailsAfterTheIndexesWereDropped()
    {
        var db = Fresh("sqlite");
        UploadWriter.Store(db, Stars("S1", "S2"), [Photometry("sha-a", "S1", 10)], "tester", Clock);
        List<string> before;
        using (var c0 = db.Open()) before = ObservationIndexes(c0);
        var big = Interleaved("sha-big", ["S1", "S2"], (int)ObservationStore.MinRowsToRebuildIndexes + 10);
        // The last row names a star missing from the database: the writer throws after most rows were inserted.
        var bad = big with { Rows = [.. big.Rows, new PhotometryRow("nobody", new Observation(0, 2461000, TimeScale.JdUtc, "V", 15, 0.02, "", null), 999_999)] };
        Assert.Throws<InvalidOperationException>(() => UploadWriter.Store(db, null, [bad], "tester", Clock));
        using var c = db.Open();
        Assert.Equal(10, ObservationStore.Count(c));
        Assert.Equal(before, ObservationIndexes(c));
        Assert.NotEmpty(before);
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void AnalysisUpsert_LeavesOneRow_WhenRunTwice(string dialect)
    {
        var db = Fresh(dialect);
        UploadWriter.Store(db, Stars("S1"), [Photometry("sha-1", "S1", 10)], "tester", Clock);
        using var c = db.Open();
        long id = StarStore.IdsByName(c)["S1"];
        var pending = StarStore.Pending(c, "test-version");
        Assert.Equal([(id, 1L)], pending);
        for (int run = 0; run < 2; run++)
        {
            using var tx = c.BeginTransaction();
            AnalysisStore.Upsert(c, tx, new AnalysisRow { StarId = id, Revision = 1, PipelineVersion = "test-version", Outcome = "ok", PeriodDays = 5.0 + run, ResultJson = "{}", InputHash = "h", CreatedAt = "now" });
            tx.Commit();
        }
        Assert.Equal(1, AnalysisStore.CountRowsForStar(c, id));
        Assert.Equal(6.0, AnalysisStore.Latest(c, id, "test-version")!.PeriodDays);
        Assert.Empty(StarStore.Pending(c, "test-version"));
        using (var tx = c.BeginTransaction()) { StarStore.BumpRevision(c, tx, [id]); tx.Commit(); }
        Assert.Single(StarStore.Pending(c, "test-version"));
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void AuditLog_RefusesUpdateAndDelete_Always(string dialect)
    {
        var db = Fresh(dialect);
        using var c = db.Open();
        AuditStore.Append(c, null, "t", "me", "test", "x", "y");
        Assert.ThrowsAny<Exception>(() => c.Execute("UPDATE audit_log SET actor = 'other'"));
        Assert.ThrowsAny<Exception>(() => c.Execute("DELETE FROM audit_log"));
        Assert.Single(AuditStore.Recent(c, 10));
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void StarListChange_BumpsRevision_OnlyWhenValuesChange(string dialect)
    {
        var db = Fresh(dialect);
        UploadWriter.Store(db, Stars("S1"), [], "tester", Clock);
        using var c = db.Open();
        long id = StarStore.IdsByName(c)["S1"];
        long r0 = StarStore.Get(c, id)!.Revision;
        var same = Stars("S1") with { Sha256 = "other-bytes-same-values" };
        UploadWriter.Store(db, same, [], "tester", Clock);
        Assert.Equal(r0, StarStore.Get(c, id)!.Revision);
        var changed = new StarListFile("s2.csv", "changed", [new StarInfo("S1", "Field A", SkyPosition.FromDegrees(10, -20), PulsatorClass.ClassicalCepheidFundamental, 0.2, 0.01, -0.3)]);
        var outcome = UploadWriter.Store(db, changed, [], "tester", Clock);
        Assert.Equal(1, outcome.StarsChanged);
        Assert.Equal(r0 + 1, StarStore.Get(c, id)!.Revision);
    }
}
