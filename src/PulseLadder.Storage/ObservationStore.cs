using System.Data.Common;
using Dapper;
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
