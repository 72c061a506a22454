using System.Data.Common;
using Dapper;
using Microsoft.Data.Sqlite;
using SQLitePCL;
using Npgsql;
using NpgsqlTypes;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Storage;

/// <summary>A validated photometry row ready to store.</summary>
public readonly record struct ObservationToStore(long StarId, int Line, double Time, TimeScale Scale, string Band, double Mag, double MagErr, string Observer, string? Flag);

/// <summary>
/// Photometry as uploaded. Bulk insert runs inside the caller's transaction: on PostgreSQL as one binary COPY, on
/// SQLite through one prepared command reused for every row.
/// </summary>
public static class ObservationStore
{
    /// <summary>
    /// Stores <paramref name="rows"/> (enumerated once) under <paramref name="uploadId"/>. Nothing is visible to other
    /// connections until the caller commits <paramref name="tx"/>; a rollback removes every row. Empty input stores nothing.
    /// </summary>
    public static void BulkInsert(DbConnection c, DbTransaction tx, long uploadId, IEnumerable<ObservationToStore> rows)
    {
        if (c is NpgsqlConnection pg) CopyBinary(pg, tx, uploadId, rows);
        else if (c is SqliteConnection lite) InsertSqliteRaw(lite, tx, uploadId, rows);
        else InsertPrepared(c, tx, uploadId, rows);
    }

    private static void CopyBinary(NpgsqlConnection c, DbTransaction tx, long uploadId, IEnumerable<ObservationToStore> rows)
    {
        // COPY has no transaction parameter: it runs in the connection's open transaction, which must be the caller's.
        if (!ReferenceEquals(tx.Connection, c)) throw new ArgumentException("The transaction belongs to another connection.", nameof(tx));
        using var importer = c.BeginBinaryImport(
            "COPY observations (upload_id, star_id, line, time, time_scale, band, mag, mag_err, observer, flag) FROM STDIN (FORMAT BINARY)");
        foreach (var r in rows)
        {
            importer.StartRow();
            importer.Write(uploadId, NpgsqlDbType.Bigint);
            importer.Write(r.StarId, NpgsqlDbType.Bigint);
            importer.Write((long)r.Line, NpgsqlDbType.Bigint);
            importer.Write(r.Time, NpgsqlDbType.Double);
            importer.Write(r.Scale.ToCode(), NpgsqlDbType.Text);
            importer.Write(r.Band, NpgsqlDbType.Text);
            importer.Write(r.Mag, NpgsqlDbType.Double);
            importer.Write(r.MagErr, NpgsqlDbType.Double);
            importer.Write(r.Observer, NpgsqlDbType.Text);
            if (r.Flag is null) importer.WriteNull();
            else importer.Write(r.Flag, NpgsqlDbType.Text);
        }
        // Without Complete, disposing the importer cancels the COPY (an exception in the row source aborts it whole).
        importer.Complete();
    }

    /// <summary>
    /// SQLite: one statement prepared once and stepped per row through the native API, values bound as their native
    /// types and repeated texts (band, observer, time scale) bound from cached UTF-8 bytes. The ADO.NET path spends
    /// most of its time per row in parameter objects, boxing and type inference, not in SQLite.
    /// </summary>
    internal static void InsertSqliteRaw(SqliteConnection c, DbTransaction tx, long uploadId, IEnumerable<ObservationToStore> rows)
    {
        // The native statement runs on the connection, i.e. inside its open transaction, which must be the caller's.
        if (!ReferenceEquals(tx.Connection, c)) throw new ArgumentException("The transaction belongs to another connection.", nameof(tx));
        var db = c.Handle ?? throw new InvalidOperationException("The SQLite connection is not open.");
        int rc = raw.sqlite3_prepare_v2(db, """
            INSERT INTO observations (upload_id, star_id, line, time, time_scale, band, mag, mag_err, observer, flag)
            VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)
            """, out sqlite3_stmt stmt);
        Check(db, rc);
        // A large upload outgrows SQLite's default 2 MB page cache: dirty pages then spill to the WAL and are read
        // back for every index insert (most of the time went to read/write syscalls). 64 MB keeps the hot leaves of
        // the table and the star index in memory; restored afterwards since pooled connections are reused.
        long cacheBefore = PragmaCacheSize(db);
        Exec(db, "PRAGMA cache_size=-65536");
        var utf8 = new Dictionary<string, byte[]>(StringComparer.Ordinal);
        byte[] Bytes(string s)
        {
            if (!utf8.TryGetValue(s, out var b))
            {
                b = System.Text.Encoding.UTF8.GetBytes(s);
                // Strings seen once (e.g. free-text flags) are not worth keeping.
                if (utf8.Count < 4096) utf8[s] = b;
            }
            return b;
        }
        using (stmt)
        {
            foreach (var r in rows)
            {
                raw.sqlite3_bind_int64(stmt, 1, uploadId);
                raw.sqlite3_bind_int64(stmt, 2, r.StarId);
                raw.sqlite3_bind_int64(stmt, 3, r.Line);
                raw.sqlite3_bind_double(stmt, 4, r.Time);
                raw.sqlite3_bind_text(stmt, 5, Bytes(r.Scale.ToCode()));
                raw.sqlite3_bind_text(stmt, 6, Bytes(r.Band));
                raw.sqlite3_bind_double(stmt, 7, r.Mag);
                raw.sqlite3_bind_double(stmt, 8, r.MagErr);
                raw.sqlite3_bind_text(stmt, 9, Bytes(r.Observer));
                if (r.Flag is null) raw.sqlite3_bind_null(stmt, 10);
                else raw.sqlite3_bind_text(stmt, 10, Bytes(r.Flag));
                rc = raw.sqlite3_step(stmt);
                if (rc != raw.SQLITE_DONE) Check(db, rc);
                raw.sqlite3_reset(stmt);
            }
        }
        Exec(db, "PRAGMA cache_size=" + cacheBefore.ToString(System.Globalization.CultureInfo.InvariantCulture));
    }

    private static void Exec(sqlite3 db, string sql) => Check(db, raw.sqlite3_exec(db, sql));

    private static long PragmaCacheSize(sqlite3 db)
    {
        Check(db, raw.sqlite3_prepare_v2(db, "PRAGMA cache_size", out sqlite3_stmt stmt));
        using (stmt)
            return raw.sqlite3_step(stmt) == raw.SQLITE_ROW ? raw.sqlite3_column_int64(stmt, 0) : -2000;
    }

    private static void Check(sqlite3 db, int rc)
    {
        if (rc is raw.SQLITE_OK or raw.SQLITE_DONE or raw.SQLITE_ROW) return;
        throw new SqliteException(raw.sqlite3_errmsg(db).utf8_to_string(), rc);
    }

    internal static void InsertPrepared(DbConnection c, DbTransaction tx, long uploadId, IEnumerable<ObservationToStore> rows)
    {
        using var cmd = c.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = """
            INSERT INTO observations (upload_id, star_id, line, time, time_scale, band, mag, mag_err, observer, flag)
            VALUES (@u, @s, @l, @t, @ts, @b, @m, @e, @o, @f)
            """;
        DbParameter P(string name)
        {
            var p = cmd.CreateParameter();
            p.ParameterName = name;
            cmd.Parameters.Add(p);
            return p;
        }
        var pu = P("@u"); var ps = P("@s"); var pl = P("@l"); var pt = P("@t"); var pts = P("@ts");
        var pb = P("@b"); var pm = P("@m"); var pe = P("@e"); var po = P("@o"); var pf = P("@f");
        pu.Value = uploadId;
        bool prepared = false;
        foreach (var r in rows)
        {
            ps.Value = r.StarId; pl.Value = r.Line; pt.Value = r.Time; pts.Value = r.Scale.ToCode();
            pb.Value = r.Band; pm.Value = r.Mag; pe.Value = r.MagErr; po.Value = r.Observer;
            pf.Value = (object?)r.Flag ?? DBNull.Value;
            if (!prepared) { cmd.Prepare(); prepared = true; }
            cmd.ExecuteNonQuery();
        }
    }

    /// <summary>All observations of a star, in insertion order.</summary>
    public static IReadOnlyList<Observation> ForStar(DbConnection c, long starId, DbTransaction? tx = null)
    {
        var rows = c.Query<(long Id, double Time, string TimeScale, string Band, double Mag, double MagErr, string Observer, string? Flag)>(
            "SELECT id, time, time_scale, band, mag, mag_err, observer, flag FROM observations WHERE star_id = @starId ORDER BY id",
            new { starId }, tx);
        var list = new List<Observation>();
        foreach (var r in rows)
        {
            TimeScales.TryParse(r.TimeScale, out var scale);
            list.Add(new Observation(r.Id, r.Time, scale, r.Band, r.Mag, r.MagErr, r.Observer, r.Flag));
        }
        return list;
    }

    public static long Count(DbConnection c) => c.ExecuteScalar<long>("SELECT COUNT(*) FROM observations");
}
