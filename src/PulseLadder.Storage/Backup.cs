using Dapper;
using Microsoft.Data.Sqlite;

namespace PulseLadder.Storage;

/// <summary>Outcome of <see cref="Backup.ToFile"/>.</summary>
/// <param name="FailureReason">Null on success; else "postgres_use_pg_dump", "target_exists" or "integrity_check_failed".</param>
/// <param name="Message">A sentence for the operator (what was written, or what to do instead).</param>
/// <param name="SchemaVersion">Schema version recorded in the snapshot (0 on failure).</param>
/// <param name="Bytes">Size of the snapshot file.</param>
public sealed record BackupResult(string? FailureReason, string Message, string? Path, int SchemaVersion, long Bytes)
{
    public bool Ok => FailureReason is null;
}

/// <summary>
/// Consistent snapshots of the embedded SQLite database while the service runs, with SQLite's online backup API
/// (sqlite3_backup_* through <see cref="SqliteConnection.BackupDatabase(SqliteConnection)"/>). PostgreSQL databases
/// are backed up with the server's own tools (pg_dump), never here.
/// </summary>
public static class Backup
{
    /// <summary>
    /// Copies every page of <paramref name="db"/> into <paramref name="target"/> in one backup step, so the copy is
    /// the database as of one committed transaction: in WAL mode the source's readers hold a snapshot while writers
    /// (the job server) keep committing to the WAL, and those later commits are not in the copy. The copy is first
    /// written beside the target under a temporary name, checked with <c>PRAGMA integrity_check</c>, switched to
    /// rollback-journal mode (a single self-contained file) and then moved into place, so a failed run never leaves a
    /// half-written target. Refuses to overwrite an existing file unless <paramref name="overwrite"/>.
    /// </summary>
    public static BackupResult ToFile(Database db, string target, bool overwrite = false)
    {
        ArgumentNullException.ThrowIfNull(db);
        ArgumentException.ThrowIfNullOrWhiteSpace(target);
        if (db.Dialect == Dialect.Postgres)
            return new BackupResult("postgres_use_pg_dump",
                "This service uses PostgreSQL: back it up with the server's tools, e.g. " +
                "`pg_dump --format=custom --file=pulseladder.dump DBNAME` (restore with pg_restore); see docs/deployment.md.",
                null, 0, 0);
        string full = Path.GetFullPath(target);
        if (File.Exists(full) && !overwrite)
            return new BackupResult("target_exists", $"{full} exists; choose another file or pass --force.", null, 0, 0);
        Directory.CreateDirectory(Path.GetDirectoryName(full)!);
        string temp = full + ".partial-" + Guid.NewGuid().ToString("N");
        try
        {
            using (var source = (SqliteConnection)db.Open())
            using (var dest = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = temp, Pooling = false }.ToString()))
            {
                dest.Open();
                source.BackupDatabase(dest);
                // The copy keeps the source's WAL flag in its header; a backup file should stand alone without -wal/-shm.
                dest.Execute("PRAGMA journal_mode=DELETE");
                string check = dest.ExecuteScalar<string>("PRAGMA integrity_check") ?? "";
                if (!string.Equals(check, "ok", StringComparison.Ordinal))
                    return new BackupResult("integrity_check_failed", $"The snapshot failed PRAGMA integrity_check: {check}", null, 0, 0);
                int version = dest.ExecuteScalar<int?>(
                    "SELECT CASE WHEN EXISTS (SELECT 1 FROM sqlite_master WHERE type='table' AND name='schema_version') " +
                    "THEN (SELECT MAX(version) FROM schema_version) END") ?? 0;
                dest.Close();
                File.Move(temp, full, overwrite);
                long bytes = new FileInfo(full).Length;
                return new BackupResult(null, $"Wrote a consistent snapshot (schema version {version}, {bytes} bytes) to {full}.", full, version, bytes);
            }
        }
        finally
        {
            if (File.Exists(temp)) File.Delete(temp);
        }
    }
}
