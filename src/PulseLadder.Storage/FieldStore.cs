using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>Fields: sky areas whose stars share a distance summary.</summary>
public static class FieldStore
{
    public static long GetOrCreate(DbConnection c, DbTransaction tx, string name, string now)
    {
        var id = c.ExecuteScalar<long?>("SELECT id FROM fields WHERE name = @name", new { name }, tx);
        if (id is { } existing) return existing;
        return c.ExecuteScalar<long>(
            "INSERT INTO fields (name, created_at) VALUES (@name, @now) RETURNING id", new { name, now }, tx);
    }

    public static IReadOnlyList<FieldRow> List(DbConnection c) =>
        c.Query<FieldRow>("SELECT id, name, calibration_id, default_ebv, created_at FROM fields ORDER BY name").AsList();

    public static FieldRow? Get(DbConnection c, long id, DbTransaction? tx = null) =>
        c.QuerySingleOrDefault<FieldRow>("SELECT id, name, calibration_id, default_ebv, created_at FROM fields WHERE id = @id", new { id }, tx);

    /// <summary>Sets the field's calibration relation and default E(B-V); the caller re-queues its stars.</summary>
    public static void SetSettings(DbConnection c, DbTransaction tx, long id, string? calibrationId, double? defaultEbv) =>
        c.Execute("UPDATE fields SET calibration_id = @calibrationId, default_ebv = @defaultEbv WHERE id = @id",
            new { id, calibrationId, defaultEbv }, tx);

    /// <summary>Per-field counts by review state and analysis status (current pipeline version).</summary>
    public static IReadOnlyList<FieldCounts> Counts(DbConnection c, string pipelineVersion) =>
        c.Query<FieldCounts>("""
            SELECT s.field_id AS field_id,
                   COUNT(*) AS stars,
                   SUM(CASE WHEN a.id IS NOT NULL THEN 1 ELSE 0 END) AS analysed,
                   SUM(CASE WHEN s.review_state = 'accepted' THEN 1 ELSE 0 END) AS accepted,
                   SUM(CASE WHEN s.review_state = 'rejected' THEN 1 ELSE 0 END) AS rejected,
                   SUM(CASE WHEN s.review_state = 'awaiting' THEN 1 ELSE 0 END) AS awaiting
            FROM stars s
            LEFT JOIN analyses a ON a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @pipelineVersion
            GROUP BY s.field_id
            """, new { pipelineVersion }).AsList();
}

public sealed class FieldCounts
{
    public long FieldId { get; init; }
    public long Stars { get; init; }
    public long Analysed { get; init; }
    public long Accepted { get; init; }
    public long Rejected { get; init; }
    public long Awaiting { get; init; }
}
