using System.Data.Common;
using System.Runtime.InteropServices;
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
        if (c is not NpgsqlConnection && c is not SqliteConnection) { InsertPrepared(c, tx, uploadId, rows); return; }
        using var inserter = BeginBulkInsert(c, tx, uploadId);
        foreach (var r in rows) inserter.Add(r);
        inserter.Complete();
    }

    /// <summary>
    /// Opens a bulk insert inside <paramref name="tx"/> for rows pushed one at a time (e.g. while a file is parsed),
    /// so no list of the rows is ever held. Call <see cref="BulkInserter.Complete"/> after the last row; disposing
    /// without it abandons the insert (on PostgreSQL the COPY is cancelled; the caller's rollback removes the rest).
    /// </summary>
    public static BulkInserter BeginBulkInsert(DbConnection c, DbTransaction tx, long uploadId)
    {
        // Both paths run on the connection, i.e. inside its open transaction, which must be the caller's.
        if (!ReferenceEquals(tx.Connection, c)) throw new ArgumentException("The transaction belongs to another connection.", nameof(tx));
        return c switch
        {
            NpgsqlConnection pg => new PostgresCopy(pg, uploadId),
            SqliteConnection lite => new SqliteNative(lite, uploadId),
            _ => throw new NotSupportedException($"No bulk insert for {c.GetType().Name}."),
        };
    }

    /// <summary>Rows pushed into one open bulk insert.</summary>
    public abstract class BulkInserter : IDisposable
    {
        public abstract void Add(in ObservationToStore r);
        public abstract void Complete();
        public abstract void Dispose();
    }

    /// <summary>PostgreSQL: one binary COPY.</summary>
    private sealed class PostgresCopy(NpgsqlConnection c, long uploadId) : BulkInserter
    {
        private readonly NpgsqlBinaryImporter _importer = c.BeginBinaryImport(
            "COPY observations (upload_id, star_id, line, time, time_scale, band, mag, mag_err, observer, flag) FROM STDIN (FORMAT BINARY)");

        public override void Add(in ObservationToStore r)
        {
            _importer.StartRow();
            _importer.Write(uploadId, NpgsqlDbType.Bigint);
            _importer.Write(r.StarId, NpgsqlDbType.Bigint);
            _importer.Write((long)r.Line, NpgsqlDbType.Bigint);
            _importer.Write(r.Time, NpgsqlDbType.Double);
            _importer.Write(r.Scale.ToCode(), NpgsqlDbType.Text);
            _importer.Write(r.Band, NpgsqlDbType.Text);
            _importer.Write(r.Mag, NpgsqlDbType.Double);
            _importer.Write(r.MagErr, NpgsqlDbType.Double);
            _importer.Write(r.Observer, NpgsqlDbType.Text);
            if (r.Flag is null) _importer.WriteNull();
            else _importer.Write(r.Flag, NpgsqlDbType.Text);
        }

        // Without Complete, disposing the importer cancels the COPY (an exception in the row source aborts it whole).
        public override void Complete() => _importer.Complete();
        public override void Dispose() => _importer.Dispose();
    }

    /// <summary>
    /// SQLite: statements prepared once and stepped through the native API on raw handles (<see cref="SqliteDirect"/>),
    /// values bound as their native types and repeated texts (band, observer, time scale) bound from cached UTF-8 bytes
    /// in native memory, which SQLite then reads without copying. The ADO.NET path spends most of its time per row in
    /// parameter objects, boxing and type inference, not in SQLite. Rows are buffered and inserted
    /// <see cref="RowsPerStatement"/> at a time by one multi-row INSERT: each statement step has a fixed cost (cursor
    /// opening, reset) that is then paid once per group of rows; the last rows go through the one-row statement.
    /// </summary>
    private sealed unsafe class SqliteNative : BulkInserter
    {
        /// <summary>Rows per multi-row INSERT (10 values each, well under SQLite's 32,766 parameter limit).</summary>
        internal const int RowsPerStatement = 32;

        /// <summary>Distinct texts kept as native UTF-8 (strings seen once, e.g. free-text flags, are not worth more).</summary>
        private const int MaxCachedTexts = 4096;

        private const string Columns = "INSERT INTO observations (upload_id, star_id, line, time, time_scale, band, mag, mag_err, observer, flag) VALUES ";

        private readonly sqlite3 _db;
        private readonly nint _dbPtr;
        private bool _dbRef;
        private readonly Prepared? _one;
        private readonly Prepared? _many;
        private readonly long _cacheBefore;
        private readonly Dictionary<string, NativeText> _utf8 = new(StringComparer.Ordinal);
        // Texts usually arrive as the parser's interned instances: looked up by reference first (no hashing of content).
        private readonly Dictionary<string, NativeText> _utf8ByInstance = new(ReferenceEqualityComparer.Instance);
        private byte[] _scratch = new byte[256];
        private readonly ObservationToStore[] _pending = new ObservationToStore[RowsPerStatement];
        private int _inPending;
        private bool _disposed;

        /// <summary>UTF-8 bytes of a text in native memory, owned by the inserter until it is disposed.</summary>
        private readonly record struct NativeText(nint Bytes, int Length);

        /// <summary>
        /// A prepared statement and the text instance last bound to each parameter: SQLite keeps bindings across
        /// resets, so a text equal (same instance) to the one already bound is not bound again; the upload id, the
        /// same for every row, is bound once.
        /// </summary>
        private sealed class Prepared
        {
            public readonly nint Stmt;
            public readonly object?[] Bound;

            public Prepared(sqlite3 db, nint dbPtr, int rows, long uploadId)
            {
                byte[] sql = System.Text.Encoding.UTF8.GetBytes(Columns + Values(rows) + "\0");
                nint stmt;
                fixed (byte* p = sql) Check(db, SqliteDirect.Prepare(dbPtr, p, sql.Length, &stmt, 0));
                Stmt = stmt;
                Bound = new object?[rows * 10 + 1];
                for (int i = 0; i < rows; i++) Check(db, SqliteDirect.BindInt64(Stmt, i * 10 + 1, uploadId));
            }
        }

        private static readonly object NullBound = new();

        public SqliteNative(SqliteConnection c, long uploadId)
        {
            _db = c.Handle ?? throw new InvalidOperationException("The SQLite connection is not open.");
            // A large upload outgrows SQLite's default 2 MB page cache: dirty pages then spill to the WAL and are read
            // back for every index insert (most of the time went to read/write syscalls). 64 MB keeps the hot leaves of
            // the table and the star index in memory; restored on dispose since pooled connections are reused.
            _cacheBefore = PragmaCacheSize(_db);
            Exec(_db, "PRAGMA cache_size=-65536");
            try
            {
                // One reference on the connection's handle for the whole load instead of one per native call.
                _db.DangerousAddRef(ref _dbRef);
                _dbPtr = _db.DangerousGetHandle();
                _one = new Prepared(_db, _dbPtr, 1, uploadId);
                _many = new Prepared(_db, _dbPtr, RowsPerStatement, uploadId);
            }
            catch
            {
                Dispose();
                throw;
            }
        }

        private static string Values(int rows)
        {
            var sb = new System.Text.StringBuilder();
            for (int i = 0; i < rows; i++)
            {
                if (i > 0) sb.Append(',');
                sb.Append("(?,?,?,?,?,?,?,?,?,?)");
            }
            return sb.ToString();
        }

        private bool TryCached(string s, out NativeText t)
        {
            if (_utf8ByInstance.TryGetValue(s, out t)) return true;
            if (!_utf8.TryGetValue(s, out t))
            {
                if (_utf8.Count >= MaxCachedTexts) return false;
                int n = System.Text.Encoding.UTF8.GetByteCount(s);
                // At least one byte: a null pointer would bind NULL instead of an empty text.
                byte* p = (byte*)NativeMemory.Alloc((nuint)Math.Max(n, 1));
                System.Text.Encoding.UTF8.GetBytes(s, new Span<byte>(p, n));
                t = new NativeText((nint)p, n);
                _utf8[s] = t;
            }
            if (_utf8ByInstance.Count < MaxCachedTexts) _utf8ByInstance[s] = t;
            return true;
        }

        public override void Add(in ObservationToStore r)
        {
            _pending[_inPending++] = r;
            if (_inPending < RowsPerStatement) return;
            var many = _many!;
            for (int i = 0; i < RowsPerStatement; i++) Bind(many, i * 10, _pending[i]);
            Step(many.Stmt);
            _inPending = 0;
        }

        // Every bind is checked (out of memory, a text over SQLite's length limit): a failed one would leave the
        // previous row's value bound. SQLite records the failure as the connection's error.
        private void Bind(Prepared p, int first, in ObservationToStore r)
        {
            nint stmt = p.Stmt;
            int rc = SqliteDirect.BindInt64(stmt, first + 2, r.StarId)
                | SqliteDirect.BindInt64(stmt, first + 3, r.Line)
                | SqliteDirect.BindDouble(stmt, first + 4, r.Time)
                | BindText(p, first + 5, r.Scale.ToCode())
                | BindText(p, first + 6, r.Band)
                | SqliteDirect.BindDouble(stmt, first + 7, r.Mag)
                | SqliteDirect.BindDouble(stmt, first + 8, r.MagErr)
                | BindText(p, first + 9, r.Observer);
            if (r.Flag is not null) rc |= BindText(p, first + 10, r.Flag);
            else if (!ReferenceEquals(p.Bound[first + 10], NullBound))
            {
                rc |= SqliteDirect.BindNull(stmt, first + 10);
                p.Bound[first + 10] = NullBound;
            }
            if (rc != raw.SQLITE_OK) Check(_db, raw.sqlite3_errcode(_db));
        }

        private int BindText(Prepared p, int index, string text)
        {
            if (ReferenceEquals(p.Bound[index], text)) return raw.SQLITE_OK;
            int rc;
            // Cached bytes live until the statements are finalized: bound without a copy.
            if (TryCached(text, out var t)) rc = SqliteDirect.BindText(p.Stmt, index, (byte*)t.Bytes, t.Length, SqliteDirect.Static);
            else
            {
                int n = System.Text.Encoding.UTF8.GetByteCount(text);
                if (_scratch.Length < Math.Max(n, 1)) _scratch = new byte[Math.Max(n, 2 * _scratch.Length)];
                System.Text.Encoding.UTF8.GetBytes(text, _scratch);
                // Copied by SQLite (transient): the scratch buffer is reused for the next text.
                fixed (byte* b = _scratch) rc = SqliteDirect.BindText(p.Stmt, index, b, n, SqliteDirect.Transient);
            }
            p.Bound[index] = text;
            return rc;
        }

        private void Step(nint stmt)
        {
            int rc = SqliteDirect.Step(stmt);
            SqliteDirect.Reset(stmt);
            if (rc != raw.SQLITE_DONE) Check(_db, rc);
        }

        // The rows still buffered, in order, through the one-row statement (ids keep the file order).
        public override void Complete()
        {
            var one = _one!;
            for (int i = 0; i < _inPending; i++)
            {
                Bind(one, 0, _pending[i]);
                Step(one.Stmt);
            }
            _inPending = 0;
        }

        public override void Dispose()
        {
            if (_disposed) return;
            _disposed = true;
            // Statements first: they may still point at the cached texts.
            if (_one is not null) SqliteDirect.Finalize(_one.Stmt);
            if (_many is not null) SqliteDirect.Finalize(_many.Stmt);
            foreach (var t in _utf8.Values) NativeMemory.Free((void*)t.Bytes);
            _utf8.Clear();
            _utf8ByInstance.Clear();
            if (_dbRef)
            {
                _db.DangerousRelease();
                _dbRef = false;
            }
            Exec(_db, "PRAGMA cache_size=" + _cacheBefore.ToString(System.Globalization.CultureInfo.InvariantCulture));
        }
    }

    /// <summary>Fewest incoming rows for which <see cref="DeferIndexes"/> considers rebuilding.</summary>
    internal const long MinRowsToRebuildIndexes = 50_000;

    /// <summary>
    /// SQLite, a bulk load at least a quarter of the table's size: drops the indexes of observations inside
    /// <paramref name="tx"/> and returns their definitions, for <see cref="RestoreIndexes"/> to build again in the same
    /// transaction after the rows. Inserting rows of many stars interleaved into the star index costs ~5 us per row
    /// (a B-tree descent and mid-tree page splits), building it from the finished table ~0.4 us per table row (a sort;
    /// docs/PERFORMANCE.md): with incoming rows at least a quarter of the table (upper bound: its largest id), the
    /// rebuild costs at most ~2 us per incoming row. Safe: SQLite's DDL is transactional and the writer holds the write
    /// lock, so other connections (WAL readers) keep seeing the committed schema with its indexes, and a rollback
    /// restores them; the indexes are rebuilt from the stored SQL, exactly as the migrations created them. Else
    /// (PostgreSQL, small loads) returns an empty list and changes nothing.
    /// </summary>
    public static IReadOnlyList<string> DeferIndexes(DbConnection c, DbTransaction tx, long incomingRows)
    {
        if (c is not SqliteConnection || incomingRows < MinRowsToRebuildIndexes) return [];
        long existing = c.ExecuteScalar<long>("SELECT COALESCE(MAX(id), 0) FROM observations", transaction: tx);
        if (incomingRows < existing / 4) return [];
        var indexes = c.Query<(string Name, string Sql)>(
            "SELECT name, sql FROM sqlite_master WHERE type = 'index' AND tbl_name = 'observations' AND sql IS NOT NULL ORDER BY name",
            transaction: tx).ToList();
        foreach (var (name, _) in indexes) c.Execute("DROP INDEX \"" + name.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"", transaction: tx);
        return indexes.Select(i => i.Sql).ToList();
    }

    /// <summary>Largest table (rows) whose index rebuild sorts in the bulk insert's 64 MB instead of 16 MB.</summary>
    internal const long MaxRowsForLargeSort = 2_000_000;

    /// <summary>Builds again, in <paramref name="tx"/>, the indexes <see cref="DeferIndexes"/> dropped.</summary>
    public static void RestoreIndexes(DbConnection c, DbTransaction tx, IReadOnlyList<string> definitions)
    {
        if (definitions.Count == 0) return;
        // CREATE INDEX sorts in memory up to the cache size and merges sorted runs from temporary files past it.
        // Tables up to 2M rows (largest id) sort in the bulk insert's 64 MB: fewer runs written to temporary files and
        // merged, ~40% less rebuild time at 1M rows and ~20% at 2M (docs/PERFORMANCE.md, "Ingest (session 5)"), for
        // ~50 MB more memory during the rebuild. Larger tables sort in 16 MB: the bulk insert's 64 MB of cached pages
        // are released first (a 1 GB upload peaked ~50 MB higher with the sort at 64 MB, no faster), while the
        // default 2 MB made many small runs.
        long rows = c.ExecuteScalar<long>("SELECT COALESCE(MAX(id), 0) FROM observations", transaction: tx);
        long before = c.ExecuteScalar<long>("PRAGMA cache_size", transaction: tx);
        c.Execute(rows <= MaxRowsForLargeSort ? "PRAGMA cache_size=-65536" : "PRAGMA cache_size=-16384", transaction: tx);
        try
        {
            foreach (var sql in definitions) c.Execute(sql, transaction: tx);
        }
        finally
        {
            c.Execute("PRAGMA cache_size=" + before.ToString(System.Globalization.CultureInfo.InvariantCulture), transaction: tx);
        }
    }

    private static void Check(sqlite3 db, int rc)
    {
        if (rc is raw.SQLITE_OK or raw.SQLITE_DONE or raw.SQLITE_ROW) return;
        throw new SqliteException(raw.sqlite3_errmsg(db).utf8_to_string(), rc);
    }

    private static void Exec(sqlite3 db, string sql) => Check(db, raw.sqlite3_exec(db, sql));

    private static long PragmaCacheSize(sqlite3 db)
    {
        Check(db, raw.sqlite3_prepare_v2(db, "PRAGMA cache_size", out sqlite3_stmt stmt));
        using (stmt)
            return raw.sqlite3_step(stmt) == raw.SQLITE_ROW ? raw.sqlite3_column_int64(stmt, 0) : -2000;
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
    /// <remarks>
    /// Read with a plain data reader (the analysis job calls this once per star: a mapped 8-field tuple cost more than
    /// the query); band, observer and time-scale texts repeat within a star, so equal ones share one string.
    /// </remarks>
    public static IReadOnlyList<Observation> ForStar(DbConnection c, long starId, DbTransaction? tx = null)
    {
        if (c is SqliteConnection lite) return ForStarSqlite(lite, starId);
        return ForStarPortable(c, starId, tx);
    }

    private const string ForStarSql = "SELECT id, time, time_scale, band, mag, mag_err, observer, flag FROM observations WHERE star_id = @starId ORDER BY id";

    /// <summary>
    /// SQLite: the statement stepped through the native API (it runs inside whatever transaction the connection has
    /// open, as the ADO.NET command would). Texts are compared as UTF-8 bytes with the few distinct values already
    /// seen (a star has a handful of bands, observers, scales), so a row allocates no string: the ADO.NET reader
    /// made three per row, and with the value conversions around them this was a tenth of an analysis job.
    /// </summary>
    internal static IReadOnlyList<Observation> ForStarSqlite(SqliteConnection c, long starId)
    {
        var db = c.Handle ?? throw new InvalidOperationException("The SQLite connection is not open.");
        Check(db, raw.sqlite3_prepare_v2(db, ForStarSql, out sqlite3_stmt stmt));
        using (stmt)
        {
            Check(db, raw.sqlite3_bind_int64(stmt, 1, starId));
            var list = new List<Observation>();
            var texts = new Utf8Texts();
            var scales = new Dictionary<string, TimeScale>(StringComparer.Ordinal);
            int rc;
            while ((rc = raw.sqlite3_step(stmt)) == raw.SQLITE_ROW)
            {
                string scaleText = texts.Get(raw.sqlite3_column_blob(stmt, 2));
                if (!scales.TryGetValue(scaleText, out var scale))
                {
                    TimeScales.TryParse(scaleText, out scale);
                    scales.Add(scaleText, scale);
                }
                string? flag = raw.sqlite3_column_type(stmt, 7) == raw.SQLITE_NULL ? null : texts.Get(raw.sqlite3_column_blob(stmt, 7));
                list.Add(new Observation(raw.sqlite3_column_int64(stmt, 0), raw.sqlite3_column_double(stmt, 1), scale,
                    texts.Get(raw.sqlite3_column_blob(stmt, 3)), raw.sqlite3_column_double(stmt, 4), raw.sqlite3_column_double(stmt, 5),
                    texts.Get(raw.sqlite3_column_blob(stmt, 6)), flag));
            }
            if (rc != raw.SQLITE_DONE) Check(db, rc);
            return list;
        }
    }

    /// <summary>Strings for UTF-8 column values, one instance per distinct value (a linear scan: there are few).</summary>
    private sealed class Utf8Texts
    {
        private readonly List<(byte[] Bytes, string Text)> _known = [];

        public string Get(ReadOnlySpan<byte> utf8)
        {
            foreach (var (b, t) in _known)
                if (utf8.SequenceEqual(b)) return t;
            string text = System.Text.Encoding.UTF8.GetString(utf8);
            // Free-text values (flags) can all differ: stop remembering past a few dozen.
            if (_known.Count < 64) _known.Add((utf8.ToArray(), text));
            return text;
        }
    }

    /// <summary>Any ADO.NET provider (PostgreSQL; the reference the SQLite path is tested against).</summary>
    internal static IReadOnlyList<Observation> ForStarPortable(DbConnection c, long starId, DbTransaction? tx)
    {
        using var cmd = c.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = ForStarSql;
        var p = cmd.CreateParameter();
        p.ParameterName = "starId";
        p.Value = starId;
        cmd.Parameters.Add(p);
        var list = new List<Observation>();
        var texts = new Dictionary<string, string>(StringComparer.Ordinal);
        var scales = new Dictionary<string, TimeScale>(StringComparer.Ordinal);
        using var r = cmd.ExecuteReader();
        while (r.Read())
        {
            string scaleText = r.GetString(2);
            if (!scales.TryGetValue(scaleText, out var scale))
            {
                TimeScales.TryParse(scaleText, out scale);
                scales.Add(scaleText, scale);
            }
            list.Add(new Observation(r.GetInt64(0), r.GetDouble(1), scale, Shared(texts, r.GetString(3)), r.GetDouble(4), r.GetDouble(5),
                Shared(texts, r.GetString(6)), r.IsDBNull(7) ? null : Shared(texts, r.GetString(7))));
        }
        return list;
    }

    private static string Shared(Dictionary<string, string> texts, string s)
    {
        if (texts.TryGetValue(s, out var known)) return known;
        texts.Add(s, s);
        return s;
    }

    public static long Count(DbConnection c) => c.ExecuteScalar<long>("SELECT COUNT(*) FROM observations");
}
