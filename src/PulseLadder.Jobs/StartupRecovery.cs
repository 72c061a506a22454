using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// At start-up, re-enqueues every star without a result for its current revision and this pipeline version.
/// In-memory jobs die with the process; the database remembers what remains, so nothing is lost, and because jobs
/// upsert by (star, revision, version), a star queued twice still ends with one row.
/// </summary>
public sealed class StartupRecovery(Database db, IAnalysisQueue queue, ILogger<StartupRecovery> log) : IHostedService
{
    public Task StartAsync(CancellationToken cancellationToken)
    {
        int n = EnqueuePending(db, queue);
        if (n > 0) log.LogInformation("Re-enqueued {Count} stars without a current analysis", n);
        int f = EnqueueCompleteFields(db, queue);
        if (f > 0) log.LogInformation("Queued the field PL pass and summary of {Count} fully analysed fields", f);
        return Task.CompletedTask;
    }

    public static int EnqueuePending(Database db, IAnalysisQueue queue)
    {
        using var c = db.Open();
        var pending = StarStore.Pending(c, PipelineVersion.Current);
        queue.EnqueueStars(pending);
        return pending.Count;
    }

    /// <summary>
    /// Queues the field job (PL pass, then summary) of every field with no pending star: an in-memory queue that died
    /// with the process may have held it. Fields with pending stars get it when their last analysis lands.
    /// </summary>
    public static int EnqueueCompleteFields(Database db, IAnalysisQueue queue)
    {
        using var c = db.Open();
        var done = FieldStore.List(c).Where(f => !StarStore.HasPendingInField(c, f.Id, PipelineVersion.Current)).Select(f => f.Id).ToList();
        foreach (var id in done) queue.EnqueueFieldSummary(id);
        return done.Count;
    }

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
