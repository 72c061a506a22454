using System.Text.Json;
using Microsoft.Extensions.Logging;
using PulseLadder.Cli;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Pipeline;
using PulseLadder.Demo;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>
/// Repeated field passes: requests already covered by a completed pass of this process end at once, a request
/// issued after a pass started still runs, and a pass that finds its rows computed with the same field context leaves
/// them alone while a changed context rewrites them. The rule being checked is this project's own (a result is a
/// function of its input hash's inputs); the demo campaign is the generator's seeded one.
/// </summary>
public sealed class FieldPassRequestTests
{
    private sealed class ListLogger<T> : ILogger<T>
    {
        public List<string> Messages { get; } = [];
        public IDisposable? BeginScope<TState>(TState state) where TState : notnull => null;
        public bool IsEnabled(LogLevel logLevel) => true;
        public void Log<TState>(LogLevel logLevel, EventId eventId, TState state, Exception? exception, Func<TState, Exception?, string> formatter)
        {
            lock (Messages) Messages.Add(formatter(state, exception));
        }
    }

    private static (Database Db, SteppingClock Clock, long FieldId) AnalysedCampaign()
    {
        var clock = new SteppingClock();
        var db = Database.Sqlite(Path.Combine(Path.GetTempPath(), "plx-scaleout-fieldpass-" + Guid.NewGuid().ToString("N") + ".db"));
        db.Migrate(clock);
        string dir = Path.Combine(Path.GetTempPath(), "plx-scaleout-demo-" + Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = 120 });
        try { DemoLoader.LoadFolder(db, clock, dir); }
        finally { Directory.Delete(dir, recursive: true); }
        var job = new AnalyzeStarJob(db, new NoQueue(), clock, Microsoft.Extensions.Logging.Abstractions.NullLogger<AnalyzeStarJob>.Instance);
        using var c = db.Open();
        foreach (var (id, rev) in StarStore.Pending(c, PipelineVersion.Current)) job.Run(id, rev);
        long field = Dapper.SqlMapper.ExecuteScalar<long>(c, "SELECT field_id FROM stars GROUP BY field_id ORDER BY COUNT(*) DESC LIMIT 1");
        return (db, clock, field);
    }

    private static Dictionary<long, (string CreatedAt, string? StarSetHash)> Rows(Database db, long fieldId)
    {
        using var c = db.Open();
        return AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: true).ToDictionary(a => a.StarId, a =>
        {
            using var doc = JsonDocument.Parse(a.ResultJson);
            string? hash = doc.RootElement.TryGetProperty("field_context", out var f) && f.ValueKind == JsonValueKind.Object
                ? f.GetProperty("star_set_hash").GetString() : null;
            return (a.CreatedAt, hash);
        });
    }

    [Fact]
    public void FieldPass_SkipsCoveredRequests_AndRewritesRowsOnlyWhenTheContextChanges()
    {
        var (db, clock, fieldId) = AnalysedCampaign();
        var log = new ListLogger<FieldSummaryJob>();
        var job = new FieldSummaryJob(db, clock, CalibrationRegistry.Embedded, log);
        string key = db.ConnectionString, me = FieldPassRequests.ProcessId;

        // Two requests before the first pass starts: that pass covers both.
        long t1 = FieldPassRequests.Issue(key, fieldId), t2 = FieldPassRequests.Issue(key, fieldId);
        job.Run(fieldId, me, t1);
        var afterFirst = Rows(db, fieldId);
        Assert.Contains(afterFirst.Values, r => r.StarSetHash is not null);
        string? context = afterFirst.Values.First(r => r.StarSetHash is not null).StarSetHash;
        job.Run(fieldId, me, t2);
        Assert.Single(log.Messages, m => m.Contains("already covered", StringComparison.Ordinal));

        // A request from another process is never skipped; the pass finds every row computed with this context.
        job.Run(fieldId, "another-process", t2);
        Assert.Equal(afterFirst, Rows(db, fieldId));

        // A reviewer rejects a star that is in the context: the request issued after that commit runs, and the
        // remaining rows are rebuilt with the new context.
        long rejected;
        using (var c = db.Open())
        {
            // A fundamental-mode classical Cepheid: the field's PL lines are fitted from those.
            rejected = AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: false).First(a => a.Class == "dcep_f").StarId;
            using var tx = c.BeginTransaction();
            StarStore.SetReview(c, tx, rejected, ReviewStates.Rejected, null, null, bumpRevision: false);
            tx.Commit();
        }
        long t3 = FieldPassRequests.Issue(key, fieldId);
        job.Run(fieldId, me, t3);
        Assert.Single(log.Messages, m => m.Contains("already covered", StringComparison.Ordinal));
        var afterReject = Rows(db, fieldId);
        var kept = afterReject.Where(kv => kv.Key != rejected && kv.Value.StarSetHash is not null).ToList();
        Assert.NotEmpty(kept);
        Assert.All(kept, kv =>
        {
            Assert.NotEqual(context, kv.Value.StarSetHash);
            Assert.NotEqual(afterFirst[kv.Key].CreatedAt, kv.Value.CreatedAt);
        });
    }
}
