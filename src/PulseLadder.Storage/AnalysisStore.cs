using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>Analysis results: one row per (star, revision, pipeline version).</summary>
public static class AnalysisStore
{
    /// <summary>
    /// Inserts or replaces the result for (star, revision, version). Delivery guarantee relied on: Hangfire runs a job
    /// at least once, so a retry or a duplicate job lands here again and still leaves exactly one row.
    /// </summary>
    public static long Upsert(DbConnection c, DbTransaction tx, AnalysisRow a) =>
        c.ExecuteScalar<long>("""
            INSERT INTO analyses (star_id, revision, pipeline_version, outcome, class, period_days, period_err_days, fap,
                                  distance_modulus, distance_modulus_err, distance_pc, distance_pc_err, flags, summary_json, result_json, input_hash, created_at)
            VALUES (@StarId, @Revision, @PipelineVersion, @Outcome, @Class, @PeriodDays, @PeriodErrDays, @Fap,
                    @DistanceModulus, @DistanceModulusErr, @DistancePc, @DistancePcErr, @Flags, @SummaryJson, @ResultJson, @InputHash, @CreatedAt)
            ON CONFLICT (star_id, revision, pipeline_version) DO UPDATE SET
                outcome = excluded.outcome, class = excluded.class, period_days = excluded.period_days,
                period_err_days = excluded.period_err_days, fap = excluded.fap, distance_modulus = excluded.distance_modulus,
                distance_modulus_err = excluded.distance_modulus_err, distance_pc = excluded.distance_pc,
                distance_pc_err = excluded.distance_pc_err, flags = excluded.flags, summary_json = excluded.summary_json, result_json = excluded.result_json,
                input_hash = excluded.input_hash, created_at = excluded.created_at
            RETURNING id
            """, a, tx);

    /// <summary>The star's newest analysis for this pipeline version (current revision if done, else the latest older one).</summary>
    public static AnalysisRow? Latest(DbConnection c, long starId, string pipelineVersion, DbTransaction? tx = null) =>
        c.QueryFirstOrDefault<AnalysisRow>(
            "SELECT * FROM analyses WHERE star_id = @starId AND pipeline_version = @pipelineVersion ORDER BY revision DESC LIMIT 1",
            new { starId, pipelineVersion }, tx);

    /// <summary>Newest analysis per star of a field (without the large JSON when <paramref name="withJson"/> is false).</summary>
    public static IReadOnlyList<AnalysisRow> LatestForField(DbConnection c, long fieldId, string pipelineVersion, bool withJson, DbTransaction? tx = null)
    {
        string json = withJson ? "a.result_json" : "'' AS result_json";
        return c.Query<AnalysisRow>($"""
            SELECT a.id, a.star_id, a.revision, a.pipeline_version, a.outcome, a.class, a.period_days, a.period_err_days, a.fap,
                   a.distance_modulus, a.distance_modulus_err, a.distance_pc, a.distance_pc_err, a.flags, a.summary_json, {json}, a.input_hash, a.created_at
            FROM analyses a JOIN stars s ON s.id = a.star_id
            WHERE s.field_id = @fieldId AND a.pipeline_version = @pipelineVersion
              AND a.revision = (SELECT MAX(a2.revision) FROM analyses a2 WHERE a2.star_id = a.star_id AND a2.pipeline_version = @pipelineVersion)
            """, new { fieldId, pipelineVersion }, tx).AsList();
    }

    public static long CountCurrent(DbConnection c, string pipelineVersion) =>
        c.ExecuteScalar<long>("""
            SELECT COUNT(*) FROM analyses a JOIN stars s ON s.id = a.star_id AND a.revision = s.revision
            WHERE a.pipeline_version = @pipelineVersion
            """, new { pipelineVersion });

    /// <summary>Whether the result for exactly (star, revision, pipeline version) is stored.</summary>
    public static bool Exists(DbConnection c, long starId, long revision, string pipelineVersion) =>
        c.ExecuteScalar<long>("SELECT COUNT(*) FROM analyses WHERE star_id = @starId AND revision = @revision AND pipeline_version = @pipelineVersion",
            new { starId, revision, pipelineVersion }) > 0;

    public static long CountRowsForStar(DbConnection c, long starId) =>
        c.ExecuteScalar<long>("SELECT COUNT(*) FROM analyses WHERE star_id = @starId", new { starId });
}
