using Hangfire;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Abstractions;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// Per field: first the field PL pass (each analysed star's class suggested again with its position in the field's
/// period-luminosity plane, distance following the class), then the distance summary from the accepted stars.
/// Idempotent: reads the current state, rewrites a star's analysis row only when its result changes, and replaces the
/// one summary row, so duplicates and retries are harmless (Hangfire delivers at least once).
/// </summary>
public sealed class FieldSummaryJob(Database db, TimeProvider clock, CalibrationRegistry registry, ILogger<FieldSummaryJob> log)
{
    /// <summary>With the embedded calibration registry only.</summary>
    public FieldSummaryJob(Database db, TimeProvider clock) : this(db, clock, CalibrationRegistry.Embedded, NullLogger<FieldSummaryJob>.Instance) { }

    private static readonly string SearchProperty = Json.Options.PropertyNamingPolicy!.ConvertName(nameof(StarAnalysis.Search));

    /// <summary>A request from <see cref="IAnalysisQueue.EnqueueFieldSummary"/>: dropped when a pass of this process that
    /// started after it was issued has completed (<see cref="FieldPassRequests"/>), else the pass runs.</summary>
    [Queue("summary")]
    [AutomaticRetry(Attempts = 3)]
    public void Run(long fieldId, string requester, long ticket)
    {
        string key = db.ConnectionString;
        lock (FieldPassRequests.LockFor(key, fieldId))
        {
            if (FieldPassRequests.IsCovered(key, fieldId, requester, ticket))
            {
                log.LogDebug("Field {FieldId}: request {Ticket} already covered by a completed pass", fieldId, ticket);
                return;
            }
            long upTo = FieldPassRequests.LastIssued(key, fieldId);
            Pass(fieldId);
            FieldPassRequests.MarkCovered(key, fieldId, upTo);
        }
    }

    /// <summary>The pass itself, whatever asked for it (also the form of jobs queued before requests carried tickets).</summary>
    [Queue("summary")]
    [AutomaticRetry(Attempts = 3)]
    public void Run(long fieldId)
    {
        lock (FieldPassRequests.LockFor(db.ConnectionString, fieldId)) Pass(fieldId);
    }

    private void Pass(long fieldId)
    {
        using var c = db.Open();
        int changed = ClassifyWithField(c, fieldId);
        if (changed > 0) log.LogInformation("Field {FieldId}: field PL pass updated {Count} star analyses", fieldId, changed);

        var stars = StarStore.ListByField(c, fieldId).Where(s => s.ReviewState == ReviewStates.Accepted).ToDictionary(s => s.Id);
        var analyses = AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: true)
            .Where(a => stars.ContainsKey(a.StarId))
            .Select(a => Json.DeserializeWithoutCurves<StarAnalysis>(a.ResultJson)!)
            .ToList();
        var summary = FieldSummaries.Compute(analyses, registry);
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

    /// <summary>
    /// The field PL pass. The context is built from every star whose newest analysis is for its current revision and
    /// not rejected by the reviewer, with each star's light-curve class (so the pass never feeds on its own output and
    /// a second run gives the same context); every such star is then reclassified under it, or without it when the
    /// field is too small (a context from an earlier, larger star set is dropped). Returns the rows rewritten.
    /// </summary>
    internal int ClassifyWithField(System.Data.Common.DbConnection c, long fieldId)
    {
        var field = FieldStore.Get(c, fieldId);
        if (field is null) return 0;
        var stars = StarStore.ListByField(c, fieldId).Where(s => s.ReviewState != ReviewStates.Rejected).ToDictionary(s => s.Id);
        var current = AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: true)
            .Where(a => stars.TryGetValue(a.StarId, out var s) && s.Revision == a.Revision)
            // Without the plotted curves (most of each result's text; the pass never reads them): they are put back
            // from the stored text when a row is rewritten.
            .Select(a => (Row: a, Result: Json.DeserializeWithoutCurves<StarAnalysis>(a.ResultJson)))
            .Where(x => x.Result is not null)
            .ToList();
        FieldContext? context = FieldPass.BuildContext(current.Select(x => x.Result!));
        var compact = context?.Compact();
        int changed = 0;
        foreach (var (row, result) in current)
        {
            if (result!.Outcome != "ok" || (context is null && result.FieldContext is null)) continue;
            var star = stars[row.StarId];
            var info = StarStore.ToStarInfo(star);
            // The analysis recorded its observations' digest: the hash needs no second read of them (the row is for
            // the star's current revision, and new photometry always makes a new revision).
            string digest = result.ObservationsDigest ?? AnalyzeStarJob.ObservationsDigest(ObservationStore.ForStar(c, star.Id));
            // The input hash covers everything a result depends on, the field context included: a row whose hash is
            // the one this pass would give was computed with this very context (an earlier pass) and would come out
            // the same, so it is not rebuilt (a repeated pass then costs the reading only).
            if (AnalyzeStarJob.InputHashFromDigest(info, digest, result.Settings, result.Overrides, compact, registry) == row.InputHash) continue;
            var updated = FieldPass.Reclassify(result, info, context, registry);
            // The pass rebuilds classes, distance and flags around the same search object: its stored text (with the
            // curves) is the search of the new result.
            if (!ReferenceEquals(updated.Search, result.Search))
                throw new InvalidOperationException("The field pass changed a result's period search; its curves would be lost.");
            string json = Json.Serialize(updated);
            if (updated.Search is not null) json = Json.WithPropertyFrom(json, SearchProperty, row.ResultJson);
            if (string.Equals(json, row.ResultJson, StringComparison.Ordinal)) continue;
            string hash = AnalyzeStarJob.InputHashFromDigest(info, digest, updated.Settings, updated.Overrides, updated.FieldContext, registry);
            var newRow = AnalyzeStarJob.ToRow(star.Id, row.Revision, updated, hash, clock.GetUtcNow().ToString("O"), json);
            using var tx = c.BeginTransaction();
            // Only while the star is still at this revision: a newer analysis supersedes this pass.
            if (StarStore.Get(c, star.Id, tx) is { } now && now.Revision == row.Revision)
            {
                AnalysisStore.Upsert(c, tx, newRow);
                changed++;
            }
            tx.Commit();
        }
        return changed;
    }
}
