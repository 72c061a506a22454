using System.Data.Common;
using System.Reflection;
using Dapper;
using Microsoft.Data.Sqlite;
using Npgsql;

namespace PulseLadder.Storage;

/// <summary>SQL dialects PulseLadder speaks. Differences are kept here and in the per-dialect migrations.</summary>
public enum Dialect
{
    Sqlite,
    Postgres,
}

/// <summary>
/// The campaign database: opens connections, owns the schema version. SQLite (embedded default, WAL) or PostgreSQL
/// (scale-out). Thread-safe; every caller opens its own connection.
/// </summary>
public sealed class Database
{
    static Database()
    {
        DefaultTypeMap.MatchNamesWithUnderscores = true;
    }

    public Dialect Dialect { get; }
    public string ConnectionString { get; }

    private Database(Dialect dialect, string connectionString)
    {
        Dialect = dialect;
        ConnectionString = connectionString;
    }

    /// <summary>An SQLite database file (created when missing).</summary>
    public static Database Sqlite(string path)
    {
        var csb = new SqliteConnectionStringBuilder
        {
            DataSource = path,
            Mode = SqliteOpenMode.ReadWriteCreate,
            Cache = SqliteCacheMode.Private,
            Pooling = true,
            // Microsoft.Data.Sqlite retries SQLITE_BUSY until this many seconds have passed.
            DefaultTimeout = 60,
        };
        return new Database(Dialect.Sqlite, csb.ToString());
    }

    /// <summary>A PostgreSQL database from an Npgsql connection string.</summary>
    public static Database Postgres(string connectionString) => new(Dialect.Postgres, connectionString);

    /// <summary>Parses "sqlite:PATH" or "postgres:CONNECTIONSTRING" (the form used by settings and the CLI).</summary>
    public static Database FromSetting(string setting)
    {
        if (setting.StartsWith("sqlite:", StringComparison.OrdinalIgnoreCase)) return Sqlite(setting["sqlite:".Length..]);
        if (setting.StartsWith("postgres:", StringComparison.OrdinalIgnoreCase)) return Postgres(setting["postgres:".Length..]);
        throw new ArgumentException($"Database setting must start with 'sqlite:' or 'postgres:', got '{setting}'.");
    }

    /// <summary>Every SQLite connection reads up to 1 GB of the database file through a memory map (see Open).</summary>
    internal const string SqliteMmapPragma = "PRAGMA mmap_size=1073741824;";

    public DbConnection Open()
    {
        if (Dialect == Dialect.Sqlite)
        {
            var c = new SqliteConnection(ConnectionString);
            c.Open();
            using var cmd = c.CreateCommand();
            // WAL lets readers (web pages) run while a job writes; foreign keys are off by default in SQLite.
            // busy_timeout: a writer that meets another's lock waits inside SQLite (sleeps of 1-100 ms, retried as
            // soon as the lock is free) instead of returning "busy" to Microsoft.Data.Sqlite, whose own retry waited
            // far longer: two analysis threads went from 1.3x to 1.9x one thread (docs/PERFORMANCE.md).
            // mmap_size: pages of the database file are read through a memory map instead of a read() per page. A
            // connection's page cache is dropped whenever another connection has committed (the analysis threads
            // commit every few ms), so a star's observations (hundreds of rows spread over as many pages) were read
            // from the OS with one system call and a 4 KB copy each. UploadWriter turns it off for bulk loads.
            cmd.CommandText = "PRAGMA journal_mode=WAL; PRAGMA foreign_keys=ON; PRAGMA synchronous=NORMAL; PRAGMA busy_timeout=60000; " + SqliteMmapPragma;
            cmd.ExecuteNonQuery();
            return c;
        }
        var p = new NpgsqlConnection(ConnectionString);
        p.Open();
        return p;
    }

    public async Task<DbConnection> OpenAsync(CancellationToken ct = default)
    {
        if (Dialect == Dialect.Sqlite) return Open();
        var p = new NpgsqlConnection(ConnectionString);
        await p.OpenAsync(ct);
        return p;
    }

    /// <summary>Numbered migration scripts of this dialect, embedded in the assembly, in order.</summary>
    public IReadOnlyList<(int Version, string Name, string Sql)> Migrations()
    {
        var asm = typeof(Database).Assembly;
        string prefix = "PulseLadder.Storage.Migrations." + (Dialect == Dialect.Sqlite ? "sqlite" : "postgres") + ".";
        return asm.GetManifestResourceNames()
            .Select(n => (Resource: n, Normal: n.Replace('/', '.').Replace('\\', '.')))
            .Where(n => n.Normal.StartsWith(prefix, StringComparison.Ordinal) && n.Normal.EndsWith(".sql", StringComparison.Ordinal))
            .Select(res =>
            {
                string n = res.Resource;
                string file = res.Normal[prefix.Length..];
                int version = int.Parse(file.AsSpan(0, file.IndexOf('_')), System.Globalization.CultureInfo.InvariantCulture);
                using var s = asm.GetManifestResourceStream(n)!;
                using var r = new StreamReader(s);
                return (version, file, r.ReadToEnd());
            })
            .OrderBy(m => m.version)
            .ToList();
    }

    /// <summary>The newest schema version this build knows.</summary>
    public int LatestVersion => Migrations().Max(m => m.Version);

    /// <summary>Current schema version of the database (0 when empty).</summary>
    public int SchemaVersion()
    {
        using var c = Open();
        return SchemaVersion(c);
    }

    private int SchemaVersion(DbConnection c)
    {
        string exists = Dialect == Dialect.Sqlite
            ? "SELECT COUNT(*) FROM sqlite_master WHERE type='table' AND name='schema_version'"
            : "SELECT COUNT(*) FROM information_schema.tables WHERE table_name='schema_version' AND table_schema=current_schema()";
        if (c.ExecuteScalar<long>(exists) == 0) return 0;
        return c.ExecuteScalar<int?>("SELECT MAX(version) FROM schema_version") ?? 0;
    }

    /// <summary>
    /// Applies every migration newer than the database's version, each in its own transaction, recording it in
    /// schema_version. Only the web host (the schema's owner) calls this; workers call <see cref="EnsureSchemaIsCurrent"/>.
    /// </summary>
    public int Migrate(TimeProvider clock) => Migrate(clock, int.MaxValue);

    /// <summary>
    /// As <see cref="Migrate(TimeProvider)"/>, but stops after <paramref name="upToVersion"/>: the schema an earlier
    /// build left (the migration tests start from each earlier version).
    /// </summary>
    public int Migrate(TimeProvider clock, int upToVersion)
    {
        using var c = Open();
        if (Dialect == Dialect.Postgres)
        {
            // One migrator at a time across processes.
            c.Execute("SELECT pg_advisory_lock(7201)");
        }
        try
        {
            c.Execute("CREATE TABLE IF NOT EXISTS schema_version (version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)");
            int current = SchemaVersion(c);
            foreach (var (version, name, sql) in Migrations().Where(m => m.Version > current && m.Version <= upToVersion))
            {
                using var tx = c.BeginTransaction();
                c.Execute(sql, transaction: tx);
                c.Execute("INSERT INTO schema_version (version, name, applied_at) VALUES (@version, @name, @at)",
                    new { version, name, at = clock.GetUtcNow().ToString("O") }, tx);
                tx.Commit();
                current = version;
            }
            return current;
        }
        finally
        {
            if (Dialect == Dialect.Postgres) c.Execute("SELECT pg_advisory_unlock(7201)");
        }
    }

    /// <summary>Throws <see cref="SchemaMismatchException"/> unless the database has exactly the schema this build knows.</summary>
    public void EnsureSchemaIsCurrent()
    {
        int have = SchemaVersion(), want = LatestVersion;
        if (have != want)
            throw new SchemaMismatchException(
                $"Database schema version is {have}, this build needs {want}. Start the web host (it owns and migrates the schema) " +
                "or run a worker of the matching version (setting 'PulseLadder:Database').");
    }
}

/// <summary>The database's schema version differs from the one this build knows.</summary>
public sealed class SchemaMismatchException(string message) : Exception(message);
