using Dapper;
using Microsoft.Extensions.DependencyInjection;
using PulseLadder.Cli;
using PulseLadder.Core.Pipeline;
using PulseLadder.Demo;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.Web.Tests;

public sealed class RecoveryTests
{
    private static string DemoFolder(int stars, ulong seed)
    {
        string dir = Path.Combine(Path.GetTempPath(), "plx-demo-tests", Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = stars, Seed = seed });
        return dir;
    }

    private static void AssertOneCurrentResultPerStar(Database db)
    {
        using var c = db.Open();
        Assert.Empty(StarStore.Pending(c, PipelineVersion.Current));
        var dupes = c.Query<long>("SELECT star_id FROM analyses GROUP BY star_id, revision, pipeline_version HAVING COUNT(*) > 1").ToList();
        Assert.Empty(dupes);
        long stars = c.ExecuteScalar<long>("SELECT COUNT(*) FROM stars");
        Assert.Equal(stars, AnalysisStore.CountCurrent(c, PipelineVersion.Current));
    }

    [Fact]
    public async Task Restart_FinishesBatchWithNothingLostAndNoneTwice_WhenStoppedMidBatch()
    {
        string folder = DemoFolder(30, 7);
        string dataDir;
        await using (var first = await TestApp.StartAsync(workers: 1))
        {
            dataDir = first.DataDir;
            int queued = DemoLoader.LoadFolder(first.Db, TimeProvider.System, folder);
            foreach (var (id, rev) in StarStore.Pending(first.Db.Open(), PipelineVersion.Current))
                first.App.Services.GetRequiredService<IAnalysisQueue>().EnqueueStar(id, rev);
            Assert.Equal(30, queued);
            // Stop as soon as some, but not all, stars are done: the in-memory queue dies with the host.
            var end = DateTime.UtcNow.AddSeconds(60);
            long done = 0;
            while (DateTime.UtcNow < end)
            {
                using var c = first.Db.Open();
                done = AnalysisStore.CountCurrent(c, PipelineVersion.Current);
                if (done >= 1) break;
                await Task.Delay(20);
            }
            Assert.InRange(done, 1, 29);
        }
        await using var second = await TestApp.StartAsync(dataDir);
        Assert.Equal(0, await second.WaitForAnalysesAsync(TimeSpan.FromSeconds(120)));
        AssertOneCurrentResultPerStar(second.Db);
    }

    [Fact]
    public async Task AnalyzeStarJob_LeavesOneResult_WhenRunTwice()
    {
        string folder = DemoFolder(30, 11);
        await using var t = await TestApp.StartAsync(runJobs: false);
        DemoLoader.LoadFolder(t.Db, TimeProvider.System, folder);
        var job = t.App.Services.GetRequiredService<AnalyzeStarJob>();
        var (id, rev) = StarStore.Pending(t.Db.Open(), PipelineVersion.Current)[0];
        job.Run(id, rev);
        string first;
        using (var c = t.Db.Open()) first = AnalysisStore.Latest(c, id, PipelineVersion.Current)!.ResultJson;
        job.Run(id, rev);
        using (var c = t.Db.Open())
        {
            Assert.Equal(1, AnalysisStore.CountRowsForStar(c, id));
            // The pipeline is deterministic: the rerun stores the same numbers.
            Assert.Equal(first, AnalysisStore.Latest(c, id, PipelineVersion.Current)!.ResultJson);
        }
    }

    [Fact]
    public async Task AnalyzeStarJob_DoesNothing_WhenItsRevisionIsObsolete()
    {
        string folder = DemoFolder(30, 13);
        await using var t = await TestApp.StartAsync(runJobs: false);
        DemoLoader.LoadFolder(t.Db, TimeProvider.System, folder);
        var (id, rev) = StarStore.Pending(t.Db.Open(), PipelineVersion.Current)[0];
        t.App.Services.GetRequiredService<AnalyzeStarJob>().Run(id, rev - 1 + 100);
        using var c = t.Db.Open();
        Assert.Equal(0, AnalysisStore.CountRowsForStar(c, id));
    }
}
