using Hangfire;

namespace PulseLadder.Jobs;

/// <summary>Puts work on the job queue. The database, not the queue, records what remains to do.</summary>
public interface IAnalysisQueue
{
    void EnqueueStar(long starId, long revision);
    void EnqueueFieldSummary(long fieldId);

    /// <summary>
    /// Queues many stars (an upload, start-up recovery). The queue may group them into batch jobs: each star stays
    /// its own unit of work (own transaction, upsert by star and revision), so delivery guarantees are unchanged.
    /// </summary>
    void EnqueueStars(IReadOnlyList<(long StarId, long Revision)> stars)
    {
        foreach (var (id, rev) in stars) EnqueueStar(id, rev);
    }
}

internal sealed class HangfireAnalysisQueue(IBackgroundJobClient client, JobsOptions options, PulseLadder.Storage.Database db) : IAnalysisQueue
{
    public void EnqueueStar(long starId, long revision) => client.Enqueue<AnalyzeStarJob>(j => j.Run(starId, revision));

    public void EnqueueStars(IReadOnlyList<(long StarId, long Revision)> stars)
    {
        int size = options.EffectiveBatchSize;
        for (int i = 0; i < stars.Count; i += size)
        {
            int n = Math.Min(size, stars.Count - i);
            if (n == 1) { EnqueueStar(stars[i].StarId, stars[i].Revision); continue; }
            long[] ids = new long[n], revs = new long[n];
            for (int k = 0; k < n; k++) (ids[k], revs[k]) = stars[i + k];
            client.Enqueue<AnalyzeStarJob>(j => j.RunBatch(ids, revs));
        }
    }

    public void EnqueueFieldSummary(long fieldId)
    {
        string requester = FieldPassRequests.ProcessId;
        long ticket = FieldPassRequests.Issue(db.ConnectionString, fieldId);
        client.Enqueue<FieldSummaryJob>(j => j.Run(fieldId, requester, ticket));
    }
}
