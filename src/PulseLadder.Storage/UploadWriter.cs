using System.Data.Common;
using Dapper;
using Microsoft.Data.Sqlite;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Storage;

/// <summary>A validated star list file.</summary>
public sealed record StarListFile(string FileName, string Sha256, IReadOnlyList<StarInfo> Stars);

/// <summary>A validated photometry file with its declared time scale and offset.</summary>
public sealed record PhotometryFile(string FileName, string Sha256, TimeScale Scale, double TimeOffset, IReadOnlyList<Core.Ingest.PhotometryRow> Rows)
{
    /// <summary>
    /// Instead of <see cref="Rows"/>: pushes the validated rows in batches (e.g. a large upload re-read from its spool
    /// file), so the store never holds them all; <see cref="RowCount"/> must then give their number.
    /// </summary>
    public Action<Core.Ingest.RowBatchHandler<Core.Ingest.PhotometryRow>>? StreamRows { get; init; }

    /// <summary>Number of rows when they are streamed; null means Rows.Count.</summary>
    public long? RowCount { get; init; }

    /// <summary>Rows this file stores.</summary>
    public long Count => RowCount ?? Rows.Count;
}

/// <summary>What an upload stored.</summary>
public sealed record UploadOutcome(long BatchId, int StarsAdded, int StarsChanged, long ObservationsAdded,
    IReadOnlyList<string> DuplicateFiles, IReadOnlyList<(long StarId, long Revision)> StarsToAnalyse);

/// <summary>
/// Stores an upload whole, in one transaction, or not at all. Files whose exact bytes were uploaded before
/// (SHA-256) add nothing.
/// </summary>
public static class UploadWriter
{
    /// <summary>
    /// On SQLite the per-row foreign-key checks of the observations (two parent lookups per row, about a fifth of the
    /// insert time) are switched off for this transaction, which only writes references it read or created itself
    /// under the write lock; before committing, <see cref="VerifyReferences"/> checks every reference the upload wrote
    /// (per distinct star and upload, not per row), so a bug still rolls the whole upload back.
    /// </summary>
    public static UploadOutcome Store(Database db, StarListFile? starList, IReadOnlyList<PhotometryFile> photometry, string actor, TimeProvider clock)
    {
        using var c = db.Open();
        bool sqlite = c is SqliteConnection;
        // Connection settings for the load, set before its transaction begins (foreign_keys is a no-op inside one) and
        // restored for the pooled connection:
        // - no memory map: a bulk load (and the index rebuild after it) reads the whole table once, and through the
        //   map every page read would stay in this process's resident set;
        // - for a large load, no automatic checkpoint in the committing call (the copy of its pages from the
        //   write-ahead log into the database file, a quarter of a 1M-row store): a background connection does it
        //   right after the commit, so the upload's answer and the star jobs it queues need not wait; readers find the
        //   committed pages in the log meanwhile, and durability is the log's either way.
        bool deferCheckpoint = sqlite && photometry.Sum(f => f.Count) >= MinRowsForBackgroundCheckpoint;
        long autoCheckpoint = deferCheckpoint ? c.ExecuteScalar<long>("PRAGMA wal_autocheckpoint") : 0;
        if (sqlite) c.Execute("PRAGMA foreign_keys=OFF; PRAGMA mmap_size=0;" + (deferCheckpoint ? " PRAGMA wal_autocheckpoint=0;" : ""));
        try
        {
            var outcome = Store(c, sqlite, starList, photometry, actor, clock);
            if (deferCheckpoint) CheckpointInBackground(db);
            return outcome;
        }
        finally
        {
            if (sqlite && c.State == System.Data.ConnectionState.Open)
                c.Execute("PRAGMA foreign_keys=ON; " + Database.SqliteMmapPragma
                    + (deferCheckpoint ? " PRAGMA wal_autocheckpoint=" + autoCheckpoint.ToString(System.Globalization.CultureInfo.InvariantCulture) + ";" : ""));
        }
    }

    /// <summary>Observations in one upload from which the WAL checkpoint runs after the commit, in the background.</summary>
    internal const long MinRowsForBackgroundCheckpoint = 50_000;

    /// <summary>The last background checkpoint (tests and benchmarks wait for it).</summary>
    public static Task LastBackgroundCheckpoint { get; private set; } = Task.CompletedTask;

    private static void CheckpointInBackground(Database db)
    {
        LastBackgroundCheckpoint = Task.Run(() =>
        {
            try
            {
                using var c = db.Open();
                // PASSIVE: copies what no reader still needs, never waits for or blocks other connections; anything
                // left is copied by a later automatic checkpoint.
                c.Execute("PRAGMA wal_checkpoint(PASSIVE)");
            }
            catch (Exception e) when (e is SqliteException or IOException or InvalidOperationException)
            {
                // Nothing is lost: the committed pages stay in the log and a later checkpoint copies them.
            }
        });
    }

    private static UploadOutcome Store(DbConnection c, bool checkReferences, StarListFile? starList, IReadOnlyList<PhotometryFile> photometry, string actor, TimeProvider clock)
    {
        string now = clock.GetUtcNow().ToString("O");
        using var tx = c.BeginTransaction();
        var uploadIds = new List<long>();
        long batch = UploadStore.NextBatchId(c, tx);
        var duplicates = new List<string>();
        var touched = new HashSet<long>();
        int added = 0, changed = 0;
        long observations = 0;

        if (starList is not null)
        {
            if (UploadStore.FindByHash(c, "stars", starList.Sha256, tx) is not null) duplicates.Add(starList.FileName);
            else
            {
                var known = StarStore.IdsByName(c, tx);
                // Fields repeat across a list (one lookup each, not one per star), and a star not stored yet is
                // inserted without first being looked up (three statements per star became one).
                var fieldIds = new Dictionary<string, long>(StringComparer.Ordinal);
                foreach (var s in starList.Stars)
                {
                    if (!fieldIds.TryGetValue(s.Field, out long fieldId)) fieldIds.Add(s.Field, fieldId = FieldStore.GetOrCreate(c, tx, s.Field, now));
                    if (!known.ContainsKey(s.Name))
                    {
                        long id = StarStore.Insert(c, tx, s, fieldId, now);
                        known.Add(s.Name, id);
                        added++;
                        touched.Add(id);
                        continue;
                    }
                    var (existingId, didChange) = StarStore.Upsert(c, tx, s, fieldId, now);
                    if (didChange)
                    {
                        changed++;
                        touched.Add(existingId);
                    }
                }
                UploadStore.Insert(c, tx, new UploadRow
                {
                    Kind = "stars", FileName = starList.FileName, Sha256 = starList.Sha256, Rows = starList.Stars.Count,
                    UploadedBy = actor, UploadedAt = now, BatchId = batch,
                });
            }
        }

        var ids = StarStore.IdsByName(c, tx);
        // Ids by string instance: the parser hands out one instance per star name, so a row's star is found without
        // hashing its text (files interleaving many stars missed the previous-row shortcut on almost every row).
        var idsByInstance = new Dictionary<string, long>(ReferenceEqualityComparer.Instance);
        var deferredIndexes = ObservationStore.DeferIndexes(c, tx, photometry.Sum(f => f.Count));
        foreach (var f in photometry)
        {
            if (UploadStore.FindByHash(c, "photometry", f.Sha256, tx) is not null) { duplicates.Add(f.FileName); continue; }
            long uploadId = UploadStore.Insert(c, tx, new UploadRow
            {
                Kind = "photometry", FileName = f.FileName, Sha256 = f.Sha256, TimeScale = f.Scale.ToCode(), TimeOffset = f.TimeOffset,
                Rows = f.Count, UploadedBy = actor, UploadedAt = now, BatchId = batch,
            });
            uploadIds.Add(uploadId);
            var starIds = new HashSet<long>();
            idsByInstance.Clear();
            long stored = 0;
            using (var inserter = ObservationStore.BeginBulkInsert(c, tx, uploadId))
            {
                string? lastStar = null;
                long lastId = 0;
                void Add(in Core.Ingest.PhotometryRow r)
                {
                    // Files are usually grouped by star: skip the lookups while the star repeats.
                    if (!ReferenceEquals(r.Star, lastStar))
                    {
                        if (!idsByInstance.TryGetValue(r.Star, out lastId))
                        {
                            // The caller validated star names against the star list; a miss here is a bug.
                            lastId = ids.TryGetValue(r.Star, out var v) ? v : throw new InvalidOperationException($"Star '{r.Star}' is not in the star list.");
                            starIds.Add(lastId);
                            if (idsByInstance.Count < 1_000_000) idsByInstance.Add(r.Star, lastId);
                        }
                        lastStar = r.Star;
                    }
                    var o = r.Observation;
                    inserter.Add(new ObservationToStore(lastId, checked((int)r.Line), o.Time, o.Scale, o.Band, o.Mag, o.MagErr, o.Observer, o.Flag));
                    stored++;
                }
                if (f.StreamRows is { } stream) StoreWhileParsing(stream, batchRows => { foreach (ref readonly var r in batchRows) Add(r); });
                else foreach (var r in f.Rows) Add(r);
                inserter.Complete();
            }
            // A streamed file is parsed a second time here; it must give exactly the rows validated before.
            if (stored != f.Count) throw new InvalidOperationException($"File '{f.FileName}': {stored} rows stored, {f.Count} validated.");
            observations += stored;
            // New photometry makes the star's current result stale.
            StarStore.BumpRevision(c, tx, starIds.Where(s => !touched.Contains(s)));
            touched.UnionWith(starIds);
        }

        ObservationStore.RestoreIndexes(c, tx, deferredIndexes);
        UploadStore.LinkStars(c, tx, batch, touched);
        if (checkReferences) VerifyReferences(c, tx, starList is not null, touched, uploadIds);
        AuditStore.Append(c, tx, now, actor, "upload", $"batch {batch}",
            $"stars added {added}, changed {changed}; observations {observations}; duplicates: {string.Join(", ", duplicates)}");
        tx.Commit();

        var pending = StarStore.Pending(c, Core.Pipeline.PipelineVersion.Current).ToDictionary(p => p.StarId, p => p.Revision);
        var toAnalyse = touched.Where(pending.ContainsKey).Select(id => (id, pending[id])).ToList();
        return new UploadOutcome(batch, added, changed, observations, duplicates, toAnalyse);
    }

    /// <summary>Parsed batches waiting for the store: enough to keep both threads busy, a few MB at most.</summary>
    private const int BatchesInFlight = 3;

    /// <summary>
    /// A streamed file's rows are parsed on a helper thread while this thread (the connection's) stores the batch
    /// before: on two cores the second reading of a large upload then costs little wall time. Batches are copied out
    /// of the parser's reused buffer and handed over in order through a bounded queue, so memory stays bounded and ids
    /// keep the file order. A failure on either side stops both; the parser's exception is rethrown here as it was
    /// thrown, and the caller's transaction is never committed.
    /// </summary>
    private static void StoreWhileParsing(Action<Core.Ingest.RowBatchHandler<Core.Ingest.PhotometryRow>> stream,
        Core.Ingest.RowBatchHandler<Core.Ingest.PhotometryRow> store)
    {
        using var parsed = new System.Collections.Concurrent.BlockingCollection<(Core.Ingest.PhotometryRow[] Rows, int Count)>(BatchesInFlight);
        var free = new System.Collections.Concurrent.ConcurrentQueue<Core.Ingest.PhotometryRow[]>();
        using var stop = new CancellationTokenSource();
        System.Runtime.ExceptionServices.ExceptionDispatchInfo? failure = null;
        var parser = new Thread(() =>
        {
            try
            {
                stream(batch =>
                {
                    if (!free.TryDequeue(out var rows) || rows.Length < batch.Length) rows = new Core.Ingest.PhotometryRow[batch.Length];
                    batch.CopyTo(rows);
                    parsed.Add((rows, batch.Length), stop.Token);
                });
            }
            catch (OperationCanceledException) when (stop.IsCancellationRequested) { }
            catch (Exception e) { failure = System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(e); }
            finally { parsed.CompleteAdding(); }
        }) { IsBackground = true, Name = "upload parser" };
        parser.Start();
        try
        {
            foreach (var (rows, count) in parsed.GetConsumingEnumerable())
            {
                store(rows.AsSpan(0, count));
                free.Enqueue(rows);
            }
        }
        finally
        {
            // On a store failure the parser is stopped at its next batch; either way it has ended (and no longer
            // reads the spooled file) before this returns.
            stop.Cancel();
            parser.Join();
        }
        failure?.Throw();
    }

    /// <summary>
    /// What the foreign keys would have checked, for everything this upload wrote: the stars' fields (when a star list
    /// was stored; the stars table is small next to the observations), and the stars and uploads that observations and
    /// upload links name (<paramref name="starIds"/> holds every star id written to either). A failure is a bug.
    /// </summary>
    private static void VerifyReferences(DbConnection c, DbTransaction tx, bool starsWritten, IReadOnlyCollection<long> starIds, IReadOnlyList<long> uploadIds)
    {
        if (starsWritten && c.Query("PRAGMA foreign_key_check(stars)", transaction: tx).Any())
            throw new InvalidOperationException("A stored star names a field that does not exist.");
        long found = 0;
        foreach (var chunk in starIds.Chunk(500))
            found += c.ExecuteScalar<long>("SELECT COUNT(*) FROM stars WHERE id IN @chunk", new { chunk }, tx);
        if (found != starIds.Count) throw new InvalidOperationException($"{starIds.Count - found} star id(s) written by the upload do not exist.");
        foreach (long id in uploadIds)
            if (c.ExecuteScalar<long>("SELECT COUNT(*) FROM uploads WHERE id = @id", new { id }, tx) != 1)
                throw new InvalidOperationException($"Upload {id} does not exist.");
    }
}
