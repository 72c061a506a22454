using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>The latest distance summary of each field (recomputed by a job when a review decision changes a star).</summary>
public static class FieldSummaryStore
{
    public static void Upsert(DbConnection c, DbTransaction tx, FieldSummaryRow r) =>
        c.Execute("""
            INSERT INTO field_summaries (field_id, pipeline_version, n_used, mu, mu_err, result_json, computed_at)
            VALUES (@FieldId, @PipelineVersion, @NUsed, @Mu, @MuErr, @ResultJson, @ComputedAt)
            ON CONFLICT (field_id) DO UPDATE SET pipeline_version = excluded.pipeline_version, n_used = excluded.n_used,
                mu = excluded.mu, mu_err = excluded.mu_err, result_json = excluded.result_json, computed_at = excluded.computed_at
            """, r, tx);

    public static FieldSummaryRow? Get(DbConnection c, long fieldId) =>
        c.QuerySingleOrDefault<FieldSummaryRow>("SELECT * FROM field_summaries WHERE field_id = @fieldId", new { fieldId });

    public static void Delete(DbConnection c, DbTransaction tx, long fieldId) =>
        c.Execute("DELETE FROM field_summaries WHERE field_id = @fieldId", new { fieldId }, tx);
}
