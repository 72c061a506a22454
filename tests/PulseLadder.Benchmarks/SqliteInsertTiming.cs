using System.Diagnostics;
using System.Globalization;
using Dapper;
using PulseLadder.Core.Photometry;
using PulseLadder.Storage;

namespace PulseLadder.Benchmarks;

/// <summary>
/// The SQLite store's phases, repeated in one warm process on a shared machine: a fresh database per repetition,
/// rows as bench-throughput's ingest part makes them (1000 stars interleaved, 2 bands, 3 observers), the star index
/// deferred as UploadWriter does for a large load. Prints each repetition and the minimum of each phase (the least
/// disturbed by other load).
/// <code>dotnet tests/PulseLadder.Benchmarks/bin/Release/net10.0/PulseLadder.Benchmarks.dll sqlite-insert [rows] [reps]</code>
/// </summary>
public static class SqliteInsertTiming
{
    public static int Run(string[] args)
    {
        int rows = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 1_000_000;
        int reps = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 5;
        string[] bands = ["V", "I"], observers = ["o1", "o2", "o3"];
        var list = new List<ObservationToStore>(rows);
        for (int i = 0; i < rows; i++)
            list.Add(new ObservationToStore(1 + i % 1000, i + 2, 2460000 + i * 1e-3, TimeScale.JdUtc, bands[i & 1], 15 + (i % 97) * 1e-3, 0.01, observers[i % 3], null));
        string dir = Path.Combine(Path.GetTempPath(), "plx-sqlite-insert-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(dir);
        var best = new double[4];
        Array.Fill(best, double.MaxValue);
        try
        {
            for (int rep = 0; rep < reps; rep++)
            {
                var db = Database.Sqlite(Path.Combine(dir, rep + ".db"));
                db.Migrate(TimeProvider.System);
                using var c = db.Open();
                c.Execute("PRAGMA foreign_keys=OFF");
                c.Execute("INSERT INTO fields (id, name, created_at) VALUES (1, 'F', 'now')");
                c.Execute("INSERT INTO stars (id, name, field_id, ra_deg, dec_deg, created_at) VALUES (@Id, 'S' || @Id, 1, 1, 1, 'now')",
                    Enumerable.Range(1, 1000).Select(i => new { Id = i }));
                c.Execute("INSERT INTO uploads (id, kind, file_name, sha256, rows, uploaded_by, uploaded_at, batch_id) VALUES (1, 'photometry', 'p.csv', 'h', 0, 't', 'now', 1)");
                int gen0 = GC.CollectionCount(0);
                var sw = Stopwatch.StartNew();
                double insert, index, commit;
                using (var tx = c.BeginTransaction())
                {
                    var deferred = ObservationStore.DeferIndexes(c, tx, rows);
                    ObservationStore.BulkInsert(c, tx, 1, list);
                    insert = sw.Elapsed.TotalSeconds;
                    ObservationStore.RestoreIndexes(c, tx, deferred);
                    index = sw.Elapsed.TotalSeconds - insert;
                    tx.Commit();
                    commit = sw.Elapsed.TotalSeconds - insert - index;
                }
                double total = sw.Elapsed.TotalSeconds;
                double[] phases = [insert, index, commit, total];
                for (int k = 0; k < 4; k++) best[k] = Math.Min(best[k], phases[k]);
                Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"rep {rep}: insert {insert:F3} s ({insert * 1e6 / rows:F2} us/row), index {index:F3} s, commit {commit:F3} s, total {total:F3} s = {rows / total:F0} obs/s; gen0 {GC.CollectionCount(0) - gen0}"));
            }
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"min of {reps}: insert {best[0]:F3} s ({best[0] * 1e6 / rows:F2} us/row), index {best[1]:F3} s, commit {best[2]:F3} s, total {best[3]:F3} s = {rows / best[3]:F0} obs/s; load {File.ReadAllText("/proc/loadavg").Trim()}"));
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            Directory.Delete(dir, recursive: true);
        }
        return 0;
    }
}
