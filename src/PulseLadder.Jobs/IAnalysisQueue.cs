using Hangfire;

namespace PulseLadder.Jobs;

/// <summary>Puts work on the job queue. The database, not the queue, records what remains to do.</summary>
public interface IAnalysisQueue
{
    void EnqueueStar(long starId, long revision);
    void EnqueueFieldSummary(long fieldId);
}

internal sealed class HangfireAnalysisQueue(IBackgroundJobClient client) : IAnalysisQueue
{
    public void EnqueueStar(long starId, long revision) => client.Enqueue<AnalyzeStarJob>(j => j.Run(starId, revision));

    public void EnqueueFieldSummary(long fieldId) => client.Enqueue<FieldSummaryJob>(j => j.Run(fieldId));
}
