using Dapper;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Storage.Tests;

/// <summary>
/// Streamed photometry (<see cref="PhotometryFile.StreamRows"/>, parsed on a helper thread while the store writes):
/// the same stored rows as the in-memory list, in the same id order, and all or nothing when either side fails.
/// </summary>
public sealed class StreamedStoreTests
{
    private static readonly TimeProvider Clock = TimeProvider.System;

    private static StarListFile Stars(params string[] names) => new("stars.csv", "sha-stars-" + string.Join("-", names),
        names.Select((n, i) => new StarInfo(n, "Field A", SkyPosition.FromDegrees(10 + i, -20))).ToList());

    private static List<PhotometryRow> Rows(int n, string[] stars) => Enumerable.Range(0, n).Select(i => new PhotometryRow(stars[i % stars.Length],
        new Observation(0, 2460000.5 + i * 1e-3, TimeScale.JdUtc, i % 2 == 0 ? "V" : "I", 15 + 0.001 * (i % 97), 0.02, "obs-" + (i % 3), i % 11 == 0 ? "f" + i : null), i + 2)).ToList();

    /// <summary>Hands the rows over as a parser does: batches of a reused buffer, overwritten after each call.</summary>
    private static Action<RowBatchHandler<PhotometryRow>> Streamer(List<PhotometryRow> rows, int batch, int? throwAfter = null) => onBatch =>
    {
        var buffer = new PhotometryRow[batch];
        for (int i = 0; i < rows.Count; i += batch)
        {
            if (throwAfter is int t && i >= t) throw new InvalidDataException("disk read failed at row " + i);
            int n = Math.Min(batch, rows.Count - i);
            rows.CopyTo(i, buffer, 0, n);
            onBatch(buffer.AsSpan(0, n));
            Array.Clear(buffer);
        }
    };

    private static List<(long Star, long Line, double Time, string Band, string Observer, string? Flag)> Stored(System.Data.Common.DbConnection c) =>
        c.Query<(long, long, double, string, string, string?)>("SELECT star_id, line, time, band, observer, flag FROM observations ORDER BY id").ToList();

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_StoresTheSameRowsInTheSameOrder_WhenRowsAreStreamedInsteadOfListed(string dialect)
    {
        string[] names = ["S1", "S2", "S3"];
        var rows = Rows(60_007, names);
        var listed = TestDatabases.Create(dialect);
        var streamed = TestDatabases.Create(dialect);
        listed.Migrate(Clock);
        streamed.Migrate(Clock);
        UploadWriter.Store(listed, Stars(names), [new PhotometryFile("p.csv", "sha-p", TimeScale.JdUtc, 0, rows)], "t", Clock);
        var outcome = UploadWriter.Store(streamed, Stars(names),
            [new PhotometryFile("p.csv", "sha-p", TimeScale.JdUtc, 0, []) { StreamRows = Streamer(rows, 4096), RowCount = rows.Count }], "t", Clock);
        Assert.Equal(rows.Count, outcome.ObservationsAdded);
        using var a = listed.Open();
        using var b = streamed.Open();
        var want = Stored(a);
        Assert.Equal(rows.Count, want.Count);
        Assert.Equal(want, Stored(b));
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_StoresNothingAndRethrowsTheReadersError_WhenTheStreamFailsMidway(string dialect)
    {
        var db = TestDatabases.Create(dialect);
        db.Migrate(Clock);
        var rows = Rows(60_000, ["S1", "S2"]);
        var file = new PhotometryFile("p.csv", "sha-p", TimeScale.JdUtc, 0, []) { StreamRows = Streamer(rows, 4096, throwAfter: 40_000), RowCount = rows.Count };
        var e = Assert.Throws<InvalidDataException>(() => UploadWriter.Store(db, Stars("S1", "S2"), [file], "t", Clock));
        Assert.Equal("disk read failed at row 40960", e.Message);
        using var c = db.Open();
        Assert.Equal(0, ObservationStore.Count(c));
        Assert.Empty(StarStore.IdsByName(c));
    }

    [Theory]
    [MemberData(nameof(TestDatabases.Dialects), MemberType = typeof(TestDatabases))]
    public void Store_StopsTheReaderAndStoresNothing_WhenStoringARowFails(string dialect)
    {
        var db = TestDatabases.Create(dialect);
        db.Migrate(Clock);
        var rows = Rows(200_000, ["S1", "S2"]);
        // A star the list does not name, a third of the way in: the writer fails while the reader still has rows.
        rows[70_000] = rows[70_000] with { Star = "nobody" };
        int batchesRead = 0;
        var inner = Streamer(rows, 1024);
        var file = new PhotometryFile("p.csv", "sha-p", TimeScale.JdUtc, 0, [])
        {
            StreamRows = onBatch => inner(batch => { Interlocked.Increment(ref batchesRead); onBatch(batch); }),
            RowCount = rows.Count,
        };
        Assert.Throws<InvalidOperationException>(() => UploadWriter.Store(db, Stars("S1", "S2"), [file], "t", Clock));
        int afterReturn = Volatile.Read(ref batchesRead);
        // The reader was stopped a few batches past the failing one (the queue's bound), not run to the end of the file,
        // and it does not go on after Store has returned.
        Assert.InRange(afterReturn, 70_000 / 1024, 70_000 / 1024 + 8);
        Thread.Sleep(200);
        Assert.Equal(afterReturn, Volatile.Read(ref batchesRead));
        using var c = db.Open();
        Assert.Equal(0, ObservationStore.Count(c));
    }
}
