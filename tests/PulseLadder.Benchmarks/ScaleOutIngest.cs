using System.Diagnostics;
using System.Globalization;
using Npgsql;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;
using PulseLadder.Storage;

namespace PulseLadder.Benchmarks;

/// <summary>
/// "scaleout-ingest ROWS [POSTGRES_ADMIN]": rows/s of storing one photometry upload (UploadWriter.Store: one
/// transaction, observations by bulk insert) into a fresh SQLite file and, given a server, a fresh PostgreSQL
/// database (binary COPY), plus PostgreSQL through the prepared-INSERT path for comparison. Best of 3.
/// </summary>
internal static class ScaleOutIngest
{
    public static int Run(string[] args)
    {
        int rows = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 200_000;
        string? admin = args.Length > 1 ? args[1] : null;
        const int stars = 100;
        var starList = new StarListFile("stars.csv", "bench-stars", Enumerable.Range(0, stars)
            .Select(i => new StarInfo($"S{i}", "Bench", SkyPosition.FromDegrees(i, -20), null, 0.1, 0.01, null)).ToList());
        var phot = new PhotometryFile("p.csv", "bench-phot", TimeScale.JdUtc, 0, Enumerable.Range(0, rows)
            .Select(i => new PhotometryRow($"S{i % stars}", new Observation(0, 2460000.5 + i * 0.01, TimeScale.JdUtc, i % 2 == 0 ? "V" : "I",
                15 + 0.001 * (i % 1000), 0.02, "obs-" + (i % 3), i % 97 == 0 ? "cosmic" : null), i + 2)).ToList());

        Report("sqlite (prepared INSERT)", rows, () =>
        {
            var db = Database.Sqlite(Path.Combine(Path.GetTempPath(), "plx-ingest-" + Guid.NewGuid().ToString("N") + ".db"));
            db.Migrate(TimeProvider.System);
            return () => UploadWriter.Store(db, starList, [phot], "bench", TimeProvider.System);
        });
        if (admin is null) return 0;
        Report("postgres (binary COPY)", rows, () =>
        {
            var db = FreshPostgres(admin);
            return () => UploadWriter.Store(db, starList, [phot], "bench", TimeProvider.System);
        });
        Report("postgres (prepared INSERT)", rows, () =>
        {
            var db = FreshPostgres(admin);
            UploadWriter.Store(db, starList, [], "bench", TimeProvider.System);
            return () =>
            {
                using var c = db.Open();
                using var tx = c.BeginTransaction();
                var ids = StarStore.IdsByName(c, tx);
                long upload = UploadStore.Insert(c, tx, new UploadRow
                {
                    Kind = "photometry", FileName = "p.csv", Sha256 = "bench-phot", TimeScale = "jd_utc", Rows = rows,
                    UploadedBy = "bench", UploadedAt = "2026-01-01T00:00:00Z", BatchId = 2,
                });
                ObservationStore.InsertPrepared(c, tx, upload, phot.Rows.Select(r => new ObservationToStore(ids[r.Star], (int)r.Line,
                    r.Observation.Time, r.Observation.Scale, r.Observation.Band, r.Observation.Mag, r.Observation.MagErr, r.Observation.Observer, r.Observation.Flag)));
                tx.Commit();
            };
        });
        return 0;
    }

    private static void Report(string name, int rows, Func<Action> prepare)
    {
        double best = double.MaxValue;
        for (int i = 0; i < 3; i++)
        {
            var run = prepare();
            var sw = Stopwatch.StartNew();
            run();
            best = Math.Min(best, sw.Elapsed.TotalSeconds);
        }
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{name}: {rows} rows in {best:F2} s = {rows / best:F0} rows/s (best of 3)"));
    }

    private static Database FreshPostgres(string admin)
    {
        string name = "plx_ingest_" + Guid.NewGuid().ToString("N")[..12];
        using (var c = new NpgsqlConnection(admin))
        {
            c.Open();
            using var cmd = c.CreateCommand();
            cmd.CommandText = $"CREATE DATABASE {name}";
            cmd.ExecuteNonQuery();
        }
        var db = Database.Postgres(new NpgsqlConnectionStringBuilder(admin) { Database = name }.ToString());
        db.Migrate(TimeProvider.System);
        return db;
    }
}
