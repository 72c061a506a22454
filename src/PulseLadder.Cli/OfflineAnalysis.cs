using System.Collections.Concurrent;
using System.Text.Json.Serialization;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Web;

namespace PulseLadder.Cli;

/// <summary>
/// One star in the output of <c>pulseladder analyze --json</c>. These names are a stable interface: other tools read them.
/// </summary>
public sealed record AnalyzeRecord(
    [property: JsonPropertyName("star")] string Star,
    [property: JsonPropertyName("field")] string Field,
    [property: JsonPropertyName("class")] string? Class,
    [property: JsonPropertyName("period_days")] double? PeriodDays,
    [property: JsonPropertyName("period_err_days")] double? PeriodErrDays,
    [property: JsonPropertyName("fap")] double? Fap,
    [property: JsonPropertyName("mean_mag")] IReadOnlyDictionary<string, double> MeanMag,
    [property: JsonPropertyName("amplitude")] IReadOnlyDictionary<string, double> Amplitude,
    [property: JsonPropertyName("ebv")] double? Ebv,
    [property: JsonPropertyName("distance_modulus")] double? DistanceModulus,
    [property: JsonPropertyName("distance_modulus_err")] double? DistanceModulusErr,
    [property: JsonPropertyName("distance_pc")] double? DistancePc,
    [property: JsonPropertyName("distance_pc_err")] double? DistancePcErr,
    [property: JsonPropertyName("flags")] IReadOnlyList<string> Flags,
    [property: JsonPropertyName("outcome")] string Outcome,
    [property: JsonPropertyName("points_used")] int PointsUsed,
    [property: JsonPropertyName("pipeline_version")] string PipelineVersion)
{
    public static AnalyzeRecord From(StarAnalysis r)
    {
        bool d = r.Distance is { FailureReason: null };
        return new AnalyzeRecord(r.Star, r.Field, r.Class?.Class.ToCode(), r.Period?.PeriodDays, r.Period?.PeriodErrDays,
            r.Search?.Peaks.FirstOrDefault()?.Fap,
            r.Fits.GroupBy(f => f.Band).ToDictionary(g => g.Key, g => g.First().IntensityMeanMag),
            r.Fits.GroupBy(f => f.Band).ToDictionary(g => g.Key, g => g.First().Amplitude),
            r.Distance?.Ebv, d ? r.Distance!.Mu : null, d ? r.Distance!.MuErr : null, d ? r.Distance!.DistancePc : null,
            d ? r.Distance!.DistancePcErr : null, r.Flags, r.Outcome, r.PointsUsed, r.PipelineVersion);
    }
}

/// <summary>Input problems of an offline run, in the "file:line: column: message" form.</summary>
public sealed class InputRefusedException(IReadOnlyList<string> problems)
    : Exception($"{problems.Count} input problem(s); first: {problems.FirstOrDefault()}")
{
    public IReadOnlyList<string> Problems { get; } = problems;
}

/// <summary>The <c>analyze</c> command's work: parse, group by star, run the pipeline on every core.</summary>
public static class OfflineAnalysis
{
    /// <param name="photometryFiles">CSV files with header, or three-column files (star from <paramref name="star"/> or the file name; band from <paramref name="band"/> or the parent folder name).</param>
    public static IReadOnlyList<StarAnalysis> Run(string starsPath, IReadOnlyList<string> photometryFiles, TimeScale scale, double offset,
        string? star, string? band, PipelineSettings settings, Action<int, int>? progress = null)
    {
        var (_, stars) = UploadParsing.ReadStars(new IncomingFile(Path.GetFileName(starsPath), File.ReadAllBytes(starsPath)));
        var problems = stars.Errors.Select(e => e.ToString()).ToList();
        var byName = stars.Rows.ToDictionary(s => s.Name, StringComparer.Ordinal);
        var known = byName.Keys.ToHashSet(StringComparer.Ordinal);
        var obs = new Dictionary<string, List<Observation>>(StringComparer.Ordinal);
        foreach (var path in photometryFiles)
        {
            var f = new IncomingFile(path, File.ReadAllBytes(path));
            string? fileStar = star, fileBand = band;
            if (UploadParsing.DetectFormat(f.Content) == "plain")
            {
                fileStar ??= Path.GetFileNameWithoutExtension(path);
                fileBand ??= Path.GetFileName(Path.GetDirectoryName(Path.GetFullPath(path)));
            }
            var parsed = UploadParsing.ReadPhotometry(f, scale, offset, known, fileStar, fileBand, null, int.MaxValue);
            problems.AddRange(parsed.Result.Errors.Select(e => e.ToString()));
            foreach (var r in parsed.Result.Rows)
            {
                if (!obs.TryGetValue(r.Star, out var list)) obs[r.Star] = list = [];
                list.Add(r.Observation);
            }
        }
        if (problems.Count > 0) throw new InputRefusedException(problems);

        var names = obs.Keys.Order(StringComparer.Ordinal).ToList();
        var results = new ConcurrentDictionary<string, StarAnalysis>();
        int done = 0;
        Parallel.ForEach(names, name =>
        {
            results[name] = AnalysisPipeline.Run(byName[name], obs[name], settings);
            progress?.Invoke(Interlocked.Increment(ref done), names.Count);
        });
        return names.Select(n => results[n]).ToList();
    }
}
