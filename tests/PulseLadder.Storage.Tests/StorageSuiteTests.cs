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
