using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>The append-only audit log (the schema refuses updates and deletes).</summary>
public static class AuditStore
{
    public static void Append(DbConnection c, DbTransaction? tx, string at, string actor, string action, string subject, string detail) =>
        c.Execute("INSERT INTO audit_log (at, actor, action, subject, detail) VALUES (@at, @actor, @action, @subject, @detail)",
            new { at, actor, action, subject, detail }, tx);

    /// <summary>The newest entry with this action, or null.</summary>
    public static AuditRow? LatestOfAction(DbConnection c, string action) =>
        c.QueryFirstOrDefault<AuditRow>("SELECT * FROM audit_log WHERE action = @action ORDER BY id DESC LIMIT 1", new { action });

    public static IReadOnlyList<AuditRow> Recent(DbConnection c, int limit) =>
        c.Query<AuditRow>("SELECT * FROM audit_log ORDER BY id DESC LIMIT @limit", new { limit }).AsList();
}
