using Hangfire;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// Recomputes a field's distance summary from its accepted stars. Idempotent: reads the current state and replaces
/// the one summary row, so duplicates and retries are harmless.
/// </summary>
public sealed class FieldSummaryJob(Database db, TimeProvider clock)
{
    [Queue("summary")]
    [AutomaticRetry(Attempts = 3)]
    public void Run(long fieldId)
    {
        using var c = db.Open();
        var stars = StarStore.ListByField(c, fieldId).Where(s => s.ReviewState == ReviewStates.Accepted).ToDictionary(s => s.Id);
        var analyses = AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: true)
            .Where(a => stars.ContainsKey(a.StarId))
            .Select(a => Json.Deserialize<StarAnalysis>(a.ResultJson)!)
            .ToList();
        var summary = FieldSummaries.Compute(analyses);
        using var tx = c.BeginTransaction();
        if (summary is null) FieldSummaryStore.Delete(c, tx, fieldId);
        else
        {
            FieldSummaryStore.Upsert(c, tx, new FieldSummaryRow
            {
                FieldId = fieldId, PipelineVersion = PipelineVersion.Current, NUsed = summary.NUsed, Mu = summary.Mu, MuErr = summary.MuErr,
                ResultJson = Json.Serialize(summary.Detail), ComputedAt = clock.GetUtcNow().ToString("O"),
            });
        }
        tx.Commit();
    }
}
