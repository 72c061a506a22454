using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>The append-only audit log (the schema refuses updates and deletes).</summary>
public static class AuditStore
{
    public static void Append(DbConnection c, DbTransaction? tx, string at, string actor, string action, string subject, string detail) =>
        c.Execute("INSERT INTO audit_log (at, actor, action, subject, detail) VALUES (@at, @actor, @action, @subject, @detail)",
            new { at, actor, action, subject, detail }, tx);

    /// <summary>
    /// The entries about one field, oldest first: the uploads that touched any of its stars (batches linked in
    /// upload_stars), every review decision on its stars, and changes of its settings. Entries are matched by the
    /// subjects their writers use ("batch N", "star NAME", "field NAME").
    /// </summary>
    public static IReadOnlyList<AuditRow> ForField(DbConnection c, long fieldId) =>
        c.Query<AuditRow>("""
            SELECT * FROM audit_log
            WHERE (action = 'upload' AND subject IN (
                       SELECT 'batch ' || us.batch_id FROM upload_stars us JOIN stars s ON s.id = us.star_id WHERE s.field_id = @fieldId))
               OR (action LIKE 'review:%' AND subject IN (SELECT 'star ' || name FROM stars WHERE field_id = @fieldId))
               OR (action = 'field:settings' AND subject IN (SELECT 'field ' || name FROM fields WHERE id = @fieldId))
            ORDER BY id
            """, new { fieldId }).AsList();

    /// <summary>The newest entry with this action, or null.</summary>
    public static AuditRow? LatestOfAction(DbConnection c, string action) =>
        c.QueryFirstOrDefault<AuditRow>("SELECT * FROM audit_log WHERE action = @action ORDER BY id DESC LIMIT 1", new { action });

    public static IReadOnlyList<AuditRow> Recent(DbConnection c, int limit) =>
        c.Query<AuditRow>("SELECT * FROM audit_log ORDER BY id DESC LIMIT @limit", new { limit }).AsList();

    /// <summary>
    /// One page of the log, newest first: entries with id below <paramref name="beforeId"/> (all when null), at most
    /// <paramref name="limit"/>; <paramref name="action"/> keeps only entries whose action starts with it.
    /// </summary>
    public static IReadOnlyList<AuditRow> Page(DbConnection c, long? beforeId, int limit, string? action = null) =>
        c.Query<AuditRow>("""
            SELECT * FROM audit_log
            WHERE (@beforeId IS NULL OR id < @beforeId) AND (@action IS NULL OR substr(action, 1, @n) = @action)
            ORDER BY id DESC LIMIT @limit
            """, new { beforeId, limit, action, n = action?.Length ?? 0 }).AsList();
}
