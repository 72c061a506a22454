using System.Globalization;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.Web.Export;

/// <summary>One quantity that differs between the stored analysis and the rerun.</summary>
/// <param name="Quantity">"input_hash", "period_days", "mean_mag_V", "distance_modulus", ... ("result." prefix: the stored full result, else the stored table row).</param>
public sealed record ReproductionDifference(string Quantity, string Stored, string Rerun);

/// <summary>Outcome of <see cref="Reproduction.Run"/>.</summary>
/// <param name="FailureReason">Null when the rerun ran; else "unknown_star" or "no_stored_analysis".</param>
/// <param name="Notes">Context a reader needs (e.g. the star changed after the stored analysis).</param>
public sealed record ReproductionReport(
    string Star, string? FailureReason, long Revision, string StoredPipelineVersion, string StoredInputHash, string RerunInputHash,
    IReadOnlyList<(string Quantity, string Value)> KeyNumbers, IReadOnlyList<ReproductionDifference> Differences, IReadOnlyList<string> Notes)
{
    public bool Identical => FailureReason is null && Differences.Count == 0;
}

/// <summary>
/// Provenance check: reruns a star's stored analysis with the Core pipeline on the same observations, the stored
/// settings and the stored review overrides, and compares the input hash and the key numbers (outcome, class,
/// period and its error, intensity-mean magnitudes, distance modulus and its error, distance, relation) with what
/// the database holds, both in the table row and in the stored full result. The pipeline is deterministic, so
/// numbers are compared exactly unless a relative tolerance is given.
/// </summary>
public static class Reproduction
{
    /// <param name="registry">Calibration registry of the rerun (null: the embedded defaults); a hash other than the
    /// stored analysis's is reported in the notes and, through the input hash, as a difference.</param>
    public static ReproductionReport Run(Database db, string star, double relativeTolerance = 0, Core.Calibration.CalibrationRegistry? registry = null)
    {
        ArgumentNullException.ThrowIfNull(db);
        registry ??= Core.Calibration.CalibrationRegistry.Embedded;
        using var c = db.Open();
        var s = StarStore.GetByName(c, star)
            ?? (long.TryParse(star, NumberStyles.None, CultureInfo.InvariantCulture, out var id) ? StarStore.Get(c, id) : null);
        if (s is null) return Failed(star, "unknown_star");
        var stored = AnalysisStore.Latest(c, s.Id, PipelineVersion.Current);
        if (stored is null || Json.Deserialize<StarAnalysis>(stored.ResultJson) is not { } storedResult)
            return Failed(s.Name, "no_stored_analysis");

        var notes = new List<string>();
        if (stored.Revision != s.Revision)
            notes.Add($"the star changed after the stored analysis (stored revision {stored.Revision}, current {s.Revision}); the rerun uses the current star data and observations");
        var observations = ObservationStore.ForStar(c, s.Id);
        var info = StarStore.ToStarInfo(s);
        var settings = storedResult.Settings;
        var overrides = storedResult.Overrides;
        // The field PL context the stored class used (fitted lines + star-set hash) is replayed, not refitted.
        var field = storedResult.FieldContext;
        if (field is not null)
            notes.Add($"class used the field PL context of {field.StarCount} stars (star set {field.StarSetHash[..Math.Min(12, field.StarSetHash.Length)]}), replayed as stored");
        if (storedResult.CalibrationRegistryHash.Length > 0 && storedResult.CalibrationRegistryHash != registry.Hash)
            notes.Add($"the stored analysis used calibration registry {storedResult.CalibrationRegistryHash[..Math.Min(12, storedResult.CalibrationRegistryHash.Length)]}, the rerun uses {registry.Hash[..12]} (administrator files changed?)");
        var rerun = AnalysisPipeline.Run(info, observations, settings, overrides, field, registry);
        string hash = AnalyzeStarJob.InputHash(info, observations, settings, overrides, field, registry);

        var fresh = KeyNumbers(rerun);
        var diffs = new List<ReproductionDifference>();
        if (!string.Equals(stored.InputHash, hash, StringComparison.Ordinal))
            diffs.Add(new ReproductionDifference("input_hash", stored.InputHash, hash));
        Compare("", KeyNumbers(stored), fresh, relativeTolerance, diffs);
        Compare("result.", KeyNumbers(storedResult), fresh, relativeTolerance, diffs);
        return new ReproductionReport(s.Name, null, stored.Revision, stored.PipelineVersion, stored.InputHash, hash,
            fresh.Select(kv => (kv.Key, Show(kv.Value))).ToList(), diffs, notes);
    }

    /// <summary>Key numbers of a full result (null where the stage produced none).</summary>
    internal static SortedDictionary<string, object?> KeyNumbers(StarAnalysis r)
    {
        bool dist = r.Distance is { FailureReason: null };
        var k = new SortedDictionary<string, object?>(StringComparer.Ordinal)
        {
            ["outcome"] = r.Outcome,
            ["class"] = r.Class?.Class.ToCode(),
            ["period_days"] = r.Period?.PeriodDays,
            ["period_err_days"] = r.Period?.PeriodErrDays,
            ["distance_modulus"] = dist ? r.Distance!.Mu : null,
            ["distance_modulus_err"] = dist ? r.Distance!.MuErr : null,
            ["distance_pc"] = dist ? r.Distance!.DistancePc : null,
            ["relation_id"] = dist ? r.Distance!.RelationId : null,
        };
        foreach (var g in r.Fits.GroupBy(f => f.Band)) k["mean_mag_" + g.Key] = g.First().IntensityMeanMag;
        return k;
    }

    /// <summary>Key numbers of a stored table row (columns plus the summary JSON's mean magnitudes).</summary>
    internal static SortedDictionary<string, object?> KeyNumbers(AnalysisRow a)
    {
        var sum = Json.Deserialize<AnalysisSummary>(a.SummaryJson) ?? new AnalysisSummary();
        var k = new SortedDictionary<string, object?>(StringComparer.Ordinal)
        {
            ["outcome"] = a.Outcome,
            ["class"] = a.Class,
            ["period_days"] = a.PeriodDays,
            ["period_err_days"] = a.PeriodErrDays,
            ["distance_modulus"] = a.DistanceModulus,
            ["distance_modulus_err"] = a.DistanceModulusErr,
            ["distance_pc"] = a.DistancePc,
            ["relation_id"] = sum.RelationId,
        };
        foreach (var (band, v) in sum.MeanMag) k["mean_mag_" + band] = v;
        return k;
    }

    private static void Compare(string prefix, SortedDictionary<string, object?> stored, SortedDictionary<string, object?> rerun, double tol, List<ReproductionDifference> diffs)
    {
        foreach (var key in stored.Keys.Union(rerun.Keys).Order(StringComparer.Ordinal))
        {
            var a = stored.GetValueOrDefault(key);
            var b = rerun.GetValueOrDefault(key);
            if (!Same(a, b, tol)) diffs.Add(new ReproductionDifference(prefix + key, Show(a), Show(b)));
        }
    }

    private static bool Same(object? a, object? b, double tol) => (a, b) switch
    {
        (null, null) => true,
        (double x, double y) => x.Equals(y) || Math.Abs(x - y) <= tol * Math.Max(Math.Abs(x), Math.Abs(y)),
        (string x, string y) => string.Equals(x, y, StringComparison.Ordinal),
        _ => false,
    };

    private static string Show(object? v) => v switch
    {
        null => "(none)",
        double d => d.ToString("R", CultureInfo.InvariantCulture),
        _ => Convert.ToString(v, CultureInfo.InvariantCulture) ?? "",
    };

    private static ReproductionReport Failed(string star, string reason) => new(star, reason, 0, "", "", "", [], [], []);
}
