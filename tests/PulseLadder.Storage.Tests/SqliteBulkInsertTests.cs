using Dapper;
using Microsoft.Data.Sqlite;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Storage.Tests;

/// <summary>
/// The SQLite bulk inserter (native statements, multi-row INSERT, cached texts) against the reference: the plain
/// ADO.NET path through Microsoft.Data.Sqlite (<see cref="ObservationStore.InsertPrepared"/>). Same rows into two fresh
/// databases; every stored column must be identical, down to the storage class, the bits of each double and the bytes
/// of each text.
/// </summary>
public sealed class SqliteBulkInsertTests
{
    private static Database Fresh()
    {
        var db = TestDatabases.Create("sqlite");
        db.Migrate(TimeProvider.System);
        return db;
    }

    // Texts that exercise the binding: empty (a zero-length text must stay '' and not become NULL), non-ASCII, one
    // longer than a cache line, equal contents as distinct string instances (cached by instance and by content).
    private static readonly string[] Texts = ["", "V", "I", "o1", "Ségolène Ø", "観測者", "x" + new string('y', 300), "cosmic ray"];

    private static List<ObservationToStore> Rows(int n, int seed)
    {
        var rng = new Random(seed);
        double[] specials = [0.0, -0.0, double.Epsilon, -double.Epsilon, double.MaxValue, double.MinValue, 1e-310, 2460000.123456789];
        var scales = Enum.GetValues<TimeScale>();
        var rows = new List<ObservationToStore>(n);
        for (int i = 0; i < n; i++)
        {
            // Runs of repeated values (as in files grouped by star and band) mixed with changes on every row.
            string Text(int k) => rng.Next(4) == 0 ? new string(Texts[k].AsSpan()) : Texts[k];
            double D() => rng.Next(10) == 0 ? specials[rng.Next(specials.Length)] : (rng.NextDouble() - 0.5) * Math.Pow(10, rng.Next(-20, 20));
            int textIndex = i / 7 % Texts.Length;
            string? flag = rng.Next(3) switch { 0 => null, 1 => Text(rng.Next(Texts.Length)), _ => "f" + rng.Next(100000) };
            rows.Add(new ObservationToStore(1 + rng.Next(5), i % 50 == 0 ? int.MaxValue - i : i + 2, D(), scales[rng.Next(scales.Length)],
                Text(textIndex), D(), Math.Abs(D()), Text(rng.Next(Texts.Length)), flag));
        }
        return rows;
    }

    private static void Prepare(System.Data.Common.DbConnection c)
    {
        // Parents for the references (the foreign keys are on, as in service use).
        c.Execute("INSERT INTO fields (id, name, created_at) VALUES (1, 'F', 'now')");
        for (int s = 1; s <= 5; s++)
            c.Execute("INSERT INTO stars (id, name, field_id, ra_deg, dec_deg, created_at) VALUES (@s, 'S' || @s, 1, 1, 1, 'now')", new { s });
        c.Execute("INSERT INTO uploads (id, kind, file_name, sha256, rows, uploaded_by, uploaded_at, batch_id) VALUES (7, 'photometry', 'p.csv', 'h', 0, 't', 'now', 1)");
    }

    private static List<object?[]> Stored(System.Data.Common.DbConnection c)
    {
        using var cmd = c.CreateCommand();
        // typeof() gives the storage class; the blob casts give a double's 8 bytes and a text's UTF-8 bytes.
        cmd.CommandText = """
            SELECT id, typeof(upload_id), upload_id, star_id, line, typeof(time), time, time_scale, CAST(band AS BLOB), typeof(band),
                   mag, mag_err, CAST(observer AS BLOB), typeof(observer), typeof(flag), CAST(flag AS BLOB)
            FROM observations ORDER BY id
            """;
        using var r = cmd.ExecuteReader();
        var list = new List<object?[]>();
        while (r.Read())
        {
            var v = new object?[r.FieldCount];
            for (int i = 0; i < v.Length; i++)
                v[i] = r.IsDBNull(i) ? null : r.GetValue(i) is double d ? BitConverter.DoubleToInt64Bits(d) : r.GetValue(i);
            list.Add(v);
        }
        return list;
    }

    [Theory]
    [InlineData(1)]
    [InlineData(31)]
    [InlineData(32)]
    [InlineData(1000)]
    [InlineData(5003)]
    public void BulkInsert_StoresExactlyWhatTheAdoNetPathStores_ForEveryColumn(int n)
    {
        var rows = Rows(n, seed: n);
        var reference = Fresh();
        var fast = Fresh();
        using var a = (SqliteConnection)reference.Open();
        using var b = (SqliteConnection)fast.Open();
        Prepare(a);
        Prepare(b);
        using (var tx = a.BeginTransaction())
        {
            ObservationStore.InsertPrepared(a, tx, 7, rows);
            tx.Commit();
        }
        using (var tx = b.BeginTransaction())
        {
            ObservationStore.BulkInsert(b, tx, 7, rows);
            tx.Commit();
        }
        var want = Stored(a);
        var got = Stored(b);
        Assert.Equal(n, want.Count);
        Assert.Equal(want.Count, got.Count);
        for (int i = 0; i < want.Count; i++) Assert.Equal(want[i], got[i]);
    }

    [Fact]
    public void BulkInsert_StoresNothing_WhenTheTransactionIsRolledBack()
    {
        var db = Fresh();
        using var c = (SqliteConnection)db.Open();
        Prepare(c);
        using (var tx = c.BeginTransaction())
        {
            ObservationStore.BulkInsert(c, tx, 7, Rows(1000, seed: 3));
            Assert.Equal(1000, c.ExecuteScalar<long>("SELECT COUNT(*) FROM observations", transaction: tx));
            tx.Rollback();
        }
        Assert.Equal(0, ObservationStore.Count(c));
        // The connection is usable afterwards and its page cache setting is back.
        Assert.Equal(-2000L, c.ExecuteScalar<long>("PRAGMA cache_size"));
    }
}
