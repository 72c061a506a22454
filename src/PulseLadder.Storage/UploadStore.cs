using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>Uploaded files: one row per file; files sent together share a batch id (the upload id the API returns).</summary>
public static class UploadStore
{
    public static UploadRow? FindByHash(DbConnection c, string kind, string sha256, DbTransaction? tx = null) =>
        c.QuerySingleOrDefault<UploadRow>("SELECT * FROM uploads WHERE kind = @kind AND sha256 = @sha256", new { kind, sha256 }, tx);

    public static long NextBatchId(DbConnection c, DbTransaction tx) =>
        c.ExecuteScalar<long>("SELECT COALESCE(MAX(batch_id), 0) + 1 FROM uploads", transaction: tx);

    public static long Insert(DbConnection c, DbTransaction tx, UploadRow u) =>
        c.ExecuteScalar<long>("""
            INSERT INTO uploads (kind, file_name, sha256, time_scale, time_offset, rows, uploaded_by, uploaded_at, batch_id)
            VALUES (@Kind, @FileName, @Sha256, @TimeScale, @TimeOffset, @Rows, @UploadedBy, @UploadedAt, @BatchId) RETURNING id
            """, u, tx);

    public static void LinkStars(DbConnection c, DbTransaction tx, long batchId, IEnumerable<long> starIds)
    {
        foreach (var starId in starIds.Distinct())
            c.Execute("INSERT INTO upload_stars (batch_id, star_id) VALUES (@batchId, @starId) ON CONFLICT DO NOTHING", new { batchId, starId }, tx);
    }

    public static IReadOnlyList<UploadRow> Batch(DbConnection c, long batchId) =>
        c.Query<UploadRow>("SELECT * FROM uploads WHERE batch_id = @batchId ORDER BY id", new { batchId }).AsList();

    /// <summary>(stars in the batch, of which analysed at their current revision).</summary>
    public static (long Total, long Done) BatchProgress(DbConnection c, long batchId, string pipelineVersion)
    {
        var r = c.QuerySingle<(long Total, long Done)>("""
            SELECT COUNT(*),
                   COALESCE(SUM(CASE WHEN EXISTS (SELECT 1 FROM analyses a WHERE a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @pipelineVersion) THEN 1 ELSE 0 END), 0)
            FROM upload_stars us JOIN stars s ON s.id = us.star_id
            WHERE us.batch_id = @batchId AND EXISTS (SELECT 1 FROM observations o WHERE o.star_id = s.id)
            """, new { batchId, pipelineVersion });
        return r;
    }
}
