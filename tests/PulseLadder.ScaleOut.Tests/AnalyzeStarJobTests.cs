using Microsoft.Extensions.Logging.Abstractions;
using PulseLadder.Cli;
using PulseLadder.Core.Pipeline;
using PulseLadder.Demo;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>At-least-once delivery: the same (star, revision) job arriving again must neither add a row nor redo the work.</summary>
public sealed class AnalyzeStarJobTests
{
    [Fact]
    public void Run_KeepsTheStoredResult_WhenTheSameJobIsDeliveredAgain()
    {
        var clock = new SteppingClock();
        var db = Database.Sqlite(Path.Combine(Path.GetTempPath(), "plx-scaleout-job-" + Guid.NewGuid().ToString("N") + ".db"));
        db.Migrate(clock);
        string dir = Path.Combine(Path.GetTempPath(), "plx-scaleout-demo-" + Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = 30 });
        try
        {
            DemoLoader.LoadFolder(db, clock, dir);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
        (long starId, long revision) = PendingFirst(db);
        var job = new AnalyzeStarJob(db, new NoQueue(), clock, NullLogger<AnalyzeStarJob>.Instance);

        job.Run(starId, revision);
        AnalysisRow first;
        using (var c = db.Open()) first = AnalysisStore.Latest(c, starId, PipelineVersion.Current)!;
        job.Run(starId, revision);

        using var conn = db.Open();
        var again = AnalysisStore.Latest(conn, starId, PipelineVersion.Current)!;
        Assert.Equal(1, AnalysisStore.CountRowsForStar(conn, starId));
        Assert.Equal(revision, again.Revision);
        // The clock steps on every read: an unchanged timestamp shows the second delivery stored nothing.
        Assert.Equal(first.CreatedAt, again.CreatedAt);
    }

    [Fact]
    public void RunBatch_StoresOneRowPerStar_WhenTheBatchIsDeliveredAgainAfterAPartialRun()
    {
        var clock = new SteppingClock();
        var db = Database.Sqlite(Path.Combine(Path.GetTempPath(), "plx-scaleout-batch-" + Guid.NewGuid().ToString("N") + ".db"));
        db.Migrate(clock);
        string dir = Path.Combine(Path.GetTempPath(), "plx-scaleout-demo-" + Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = 30 });
        try
        {
            DemoLoader.LoadFolder(db, clock, dir);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
        IReadOnlyList<(long StarId, long Revision)> pending;
        using (var c = db.Open()) pending = StarStore.Pending(c, PipelineVersion.Current).Take(4).ToList();
        var job = new AnalyzeStarJob(db, new NoQueue(), clock, NullLogger<AnalyzeStarJob>.Instance);
        long[] ids = pending.Select(p => p.StarId).ToArray(), revs = pending.Select(p => p.Revision).ToArray();

        // A worker that died after the first star: that star has its result, the batch is delivered again whole.
        job.Run(ids[0], revs[0]);
        string firstCreated;
        using (var c = db.Open()) firstCreated = AnalysisStore.Latest(c, ids[0], PipelineVersion.Current)!.CreatedAt;
        job.RunBatch(ids, revs);
        job.RunBatch(ids, revs);

        using var conn = db.Open();
        foreach (long id in ids) Assert.Equal(1, AnalysisStore.CountRowsForStar(conn, id));
        Assert.Equal(firstCreated, AnalysisStore.Latest(conn, ids[0], PipelineVersion.Current)!.CreatedAt);
        var remaining = StarStore.Pending(conn, PipelineVersion.Current).Select(p => p.StarId).ToHashSet();
        Assert.DoesNotContain(ids, remaining.Contains);
    }

    private static (long, long) PendingFirst(Database db)
    {
        using var c = db.Open();
        return StarStore.Pending(c, PipelineVersion.Current)[0];
    }
}
