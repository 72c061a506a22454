using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

/// <summary>Review decisions: who decided what about a star, when and why. Never updated, only added.</summary>
public static class ReviewStore
{
    public static long Insert(DbConnection c, DbTransaction tx, DecisionRow d) =>
        c.ExecuteScalar<long>("""
            INSERT INTO review_decisions (star_id, analysis_id, action, period_days, class, note, decided_by, decided_at)
            VALUES (@StarId, @AnalysisId, @Action, @PeriodDays, @Class, @Note, @DecidedBy, @DecidedAt) RETURNING id
            """, d, tx);

    public static IReadOnlyList<DecisionRow> ForStar(DbConnection c, long starId) =>
        c.Query<DecisionRow>("SELECT * FROM review_decisions WHERE star_id = @starId ORDER BY id", new { starId }).AsList();
}
