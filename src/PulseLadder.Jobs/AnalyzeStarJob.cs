using System.Security.Cryptography;
using System.Text;
using Hangfire;
using Microsoft.Extensions.Logging;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// Analyses one star at one revision: clean to distance, one transaction to store. Arguments are ids only; the job
/// reloads everything it needs, so it can run twice (Hangfire delivers at least once) and leave one result row.
/// </summary>
public sealed class AnalyzeStarJob(Database db, IAnalysisQueue queue, TimeProvider clock, ILogger<AnalyzeStarJob> log, CalibrationRegistry registry)
{
    /// <summary>With the embedded calibration registry only.</summary>
    public AnalyzeStarJob(Database db, IAnalysisQueue queue, TimeProvider clock, ILogger<AnalyzeStarJob> log)
        : this(db, queue, clock, log, CalibrationRegistry.Embedded) { }

    [Queue("analysis")]
    // Failures here are mostly the database going away (restart, failover): retry soon and long enough to ride out an
    // outage of about an hour, since a job that ends Failed leaves its star pending until the web host restarts.
    [AutomaticRetry(Attempts = 10, DelaysInSeconds = [5, 10, 20, 40, 60, 120, 300, 600, 900, 1800])]
    public void Run(long starId, long revision)
    {
        StarRow? star;
        FieldRow? field;
        IReadOnlyList<Observation> observations;
        using (var c = db.Open())
        {
            star = StarStore.Get(c, starId);
            if (star is null) { log.LogWarning("Star {StarId} no longer exists; nothing to do", starId); return; }
            // A newer revision has its own job; this one is obsolete.
            if (star.Revision != revision) return;
            // Already done by an earlier delivery of the same work (a web host restart re-enqueues every pending star
            // while the shared queue may still hold its job): the result would be identical, so skip the analysis.
            if (AnalysisStore.Exists(c, starId, revision, PipelineVersion.Current)) return;
            observations = ObservationStore.ForStar(c, starId);
            field = FieldStore.Get(c, star.FieldId);
        }

        var settings = SettingsFor(field, registry);
        var overrides = OverridesFor(star);
        var info = StarStore.ToStarInfo(star);
        // Light curve only: the field's PL context is added by the field pass (FieldSummaryJob) once the field is analysed.
        string digest = ObservationsDigest(observations);
        var result = AnalysisPipeline.Run(info, observations, settings, overrides, registry: registry) with { ObservationsDigest = digest };
        var row = ToRow(starId, revision, result, InputHashFromDigest(info, digest, settings, overrides, null, registry), clock.GetUtcNow().ToString("O"));

        bool fieldDone;
        using (var c = db.Open())
        {
            using (var tx = c.BeginTransaction())
            {
                AnalysisStore.Upsert(c, tx, row);
                tx.Commit();
            }
            // Checked after our commit: of two jobs finishing together at least the later sees zero, so the field pass
            // is never missed; both seeing zero enqueues it twice, which is harmless (the job is idempotent).
            fieldDone = !StarStore.HasPendingInField(c, star.FieldId, PipelineVersion.Current);
        }
        if (star.ReviewState == ReviewStates.Accepted || fieldDone) queue.EnqueueFieldSummary(star.FieldId);
    }

    /// <summary>
    /// Analyses several stars in one job (see <see cref="IAnalysisQueue.EnqueueStars"/>). Each star is still its own
    /// unit: reloaded, analysed and stored in its own transaction, skipped when its result already exists, so a
    /// retry or a second delivery of the batch (worker killed mid-batch) redoes only the stars without a result.
    /// </summary>
    [Queue("analysis")]
    [AutomaticRetry(Attempts = 10, DelaysInSeconds = [5, 10, 20, 40, 60, 120, 300, 600, 900, 1800])]
    public void RunBatch(long[] starIds, long[] revisions)
    {
        if (starIds.Length != revisions.Length) throw new ArgumentException("One revision per star is required.", nameof(revisions));
        for (int i = 0; i < starIds.Length; i++) Run(starIds[i], revisions[i]);
    }

    /// <summary>What the reviewer imposed on the star (chosen period, chosen class).</summary>
    public static ReviewOverrides OverridesFor(StarRow star) => new(
        star.ChosenPeriodDays,
        star.ChosenClass is { } cc && PulsatorClasses.TryParse(cc, out var cls) ? cls : null);

    /// <summary>As <see cref="SettingsFor(FieldRow?, CalibrationRegistry)"/> with the embedded registry.</summary>
    public static PipelineSettings SettingsFor(FieldRow? field) => SettingsFor(field, CalibrationRegistry.Embedded);

    /// <summary>
    /// The defaults, with the field's chosen relation (for the classes it serves) and default E(B-V). A chosen relation
    /// missing from <paramref name="registry"/> (an administrator file removed) is still recorded for the classes of
    /// classical Cepheids, so their distances fail with "unknown_relation" rather than silently using another relation.
    /// </summary>
    public static PipelineSettings SettingsFor(FieldRow? field, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        var s = PipelineSettings.Default;
        if (field is null) return s;
        var d = s.Distance with { DefaultEbv = field.DefaultEbv };
        if (field.CalibrationId is { } missing && !registry.TryGet(missing, out _))
            d = d with { CepheidRelationId = missing };
        if (field.CalibrationId is { } id && registry.TryGet(id, out var rel))
        {
            if (rel.Classes.Any(c => c is PulsatorClass.ClassicalCepheidFundamental or PulsatorClass.ClassicalCepheidFirstOvertone)) d = d with { CepheidRelationId = id };
            if (rel.Classes.Contains(PulsatorClass.TypeIICepheid)) d = d with { TypeIICepheidRelationId = id };
            if (rel.Classes.Any(c => c.IsRRLyrae())) d = d with { RRLyraeRelationId = id };
        }
        return s with { Distance = d };
    }

    internal static AnalysisRow ToRow(long starId, long revision, StarAnalysis r, string inputHash, string now)
        => ToRow(starId, revision, r, inputHash, now, Json.Serialize(r));

    /// <summary>As above with the result already serialised (<paramref name="resultJson"/> = Json.Serialize(r)).</summary>
    internal static AnalysisRow ToRow(long starId, long revision, StarAnalysis r, string inputHash, string now, string resultJson)
    {
        var best = r.Search?.Peaks.FirstOrDefault();
        bool hasDistance = r.Distance is { FailureReason: null };
        return new AnalysisRow
        {
            StarId = starId, Revision = revision, PipelineVersion = r.PipelineVersion, Outcome = r.Outcome,
            Class = r.Class?.Class.ToCode(), PeriodDays = r.Period?.PeriodDays, PeriodErrDays = r.Period?.PeriodErrDays,
            Fap = best?.Fap,
            DistanceModulus = hasDistance ? r.Distance!.Mu : null, DistanceModulusErr = hasDistance ? r.Distance!.MuErr : null,
            DistancePc = hasDistance ? r.Distance!.DistancePc : null, DistancePcErr = hasDistance ? r.Distance!.DistancePcErr : null,
            Flags = string.Join(",", r.Flags), SummaryJson = Json.Serialize(AnalysisSummary.From(r)), ResultJson = resultJson, InputHash = inputHash, CreatedAt = now,
        };
    }

    /// <summary>SHA-256 over everything the result depends on: provenance, and the check used by "reproduce".</summary>
    public static string InputHash(StarInfo star, IReadOnlyList<Observation> obs, PipelineSettings settings, ReviewOverrides overrides)
        => InputHash(star, obs, settings, overrides, null, null);

    /// <summary>
    /// As above, adding the field context the class used (its lines and star-set hash) and the calibration registry's
    /// hash; both are left out when null, so hashes of results without them are unchanged.
    /// </summary>
    public static string InputHash(StarInfo star, IReadOnlyList<Observation> obs, PipelineSettings settings, ReviewOverrides overrides,
        FieldContext? field, CalibrationRegistry? registry)
        => InputHashFromDigest(star, ObservationsDigest(obs), settings, overrides, field, registry);

    /// <summary>
    /// The input hash from the observations' digest (<see cref="ObservationsDigest"/>): SHA-256 over the field context,
    /// the registry hash, the star, settings and overrides (JSON), the pipeline version and "observations:" + digest.
    /// </summary>
    public static string InputHashFromDigest(StarInfo star, string observationsDigest, PipelineSettings settings, ReviewOverrides overrides,
        FieldContext? field, CalibrationRegistry? registry)
    {
        using var h = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        if (field is not null) h.AppendData(Encoding.UTF8.GetBytes("field:" + Json.Serialize(field.Compact())));
        if (registry is not null) h.AppendData(Encoding.UTF8.GetBytes("calibrations:" + registry.Hash));
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(star)));
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(settings)));
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(overrides)));
        h.AppendData(Encoding.UTF8.GetBytes(PipelineVersion.Current));
        h.AppendData(Encoding.UTF8.GetBytes("observations:" + observationsDigest));
        return Convert.ToHexString(h.GetHashAndReset()).ToLowerInvariant();
    }

    /// <summary>
    /// SHA-256 (lower-case hex) of the observations: per observation id, time, mag, mag_err (8 bytes each, machine
    /// order), then UTF-8 of "band|observer|flag|scale". Gathered in a buffer and hashed in large pieces (same bytes as
    /// hashing each piece on its own: a hash does not see how its input was split).
    /// </summary>
    public static string ObservationsDigest(IReadOnlyList<Observation> obs)
    {
        using var h = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        byte[] buf = System.Buffers.ArrayPool<byte>.Shared.Rent(1 << 16);
        try
        {
            int at = 0;
            foreach (var o in obs)
            {
                int need = 32 + 3 + Encoding.UTF8.GetMaxByteCount(o.Band.Length + o.Observer.Length + (o.Flag?.Length ?? 0) + 16);
                if (at + need > buf.Length)
                {
                    h.AppendData(buf, 0, at);
                    at = 0;
                    if (need > buf.Length)
                    {
                        System.Buffers.ArrayPool<byte>.Shared.Return(buf);
                        buf = System.Buffers.ArrayPool<byte>.Shared.Rent(need);
                    }
                }
                var span = buf.AsSpan();
                BitConverter.TryWriteBytes(span[at..], o.Id); at += 8;
                BitConverter.TryWriteBytes(span[at..], o.Time); at += 8;
                BitConverter.TryWriteBytes(span[at..], o.Mag); at += 8;
                BitConverter.TryWriteBytes(span[at..], o.MagErr); at += 8;
                at += Encoding.UTF8.GetBytes(o.Band, span[at..]); span[at++] = (byte)'|';
                at += Encoding.UTF8.GetBytes(o.Observer, span[at..]); span[at++] = (byte)'|';
                if (o.Flag is { } flag) at += Encoding.UTF8.GetBytes(flag, span[at..]);
                span[at++] = (byte)'|';
                at += Encoding.UTF8.GetBytes(o.Scale.ToCode(), span[at..]);
            }
            h.AppendData(buf, 0, at);
        }
        finally { System.Buffers.ArrayPool<byte>.Shared.Return(buf); }
        return Convert.ToHexString(h.GetHashAndReset()).ToLowerInvariant();
    }
}
