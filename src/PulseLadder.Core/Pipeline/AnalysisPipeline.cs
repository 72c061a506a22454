using PulseLadder.Core.Calibration;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Distances;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.TimeScales;

namespace PulseLadder.Core.Pipeline;

/// <summary>
/// The per-star pipeline: clean, put times on BJD_TDB, search, refine, fold and fit, classify, distance.
/// Pure: no I/O, no clock; the same inputs and settings give the same result.
/// </summary>
public static class AnalysisPipeline
{
    /// <summary>
    /// Analyses one star. <paramref name="field"/>: the field's PL context for the class suggestion (null: light curve
    /// only; the field pass adds it later, see <see cref="FieldPass"/>); <paramref name="registry"/>: the calibration
    /// registry (null: the embedded defaults).
    /// </summary>
    public static StarAnalysis Run(StarInfo star, IReadOnlyList<Observation> observations, PipelineSettings settings, ReviewOverrides? overrides = null,
        FieldContext? field = null, CalibrationRegistry? registry = null)
    {
        overrides ??= ReviewOverrides.None;
        registry ??= CalibrationRegistry.Embedded;
        var result = new StarAnalysis
        {
            Star = star.Name, Field = star.Field, Settings = settings, Overrides = overrides, PointsIn = observations.Count,
            CalibrationRegistryHash = registry.Hash,
        };

        var cleaned = Cleaner.RejectUnusable(observations, settings.Cleaning);
        var timed = BarycentricTime.ToBjdTdb(cleaned.Kept, star.Position);
        var rejections = cleaned.Rejected.Concat(timed.Rejected).ToList();
        result = result with { TimeMethod = timed.Method, Rejections = rejections };

        var hint = overrides.Class ?? star.DeclaredClass ?? PulsatorClass.Unknown;
        var search = PeriodFinder.FindPeriods(timed.Points, hint, settings.PeriodSearch);
        result = result with { Search = search };
        if (search.FailureReason is not null && overrides.PeriodDays is null)
            return Finish(result, search.FailureReason, star, timed.Points.Count, null, [], []);

        double frequency = overrides.PeriodDays is { } p ? 1.0 / p : search.Peaks[0].Frequency;
        var period = PeriodFinder.RefinePeriod(timed.Points, frequency, search, settings.PeriodSearch);
        if (overrides.PeriodDays is not null)
            period = period with { Method = "reviewer" };
        result = result with { Period = period };

        var fit = LightCurveFitter.FitBands(timed.Points, period.PeriodDays, settings.Fit, settings.Cleaning);
        rejections.AddRange(fit.Clipped);
        result = result with { Rejections = rejections, ObserverOffsets = fit.Offsets };

        result = FieldPass.ClassifyAndMeasure(result with { Period = period, Search = search }, star, fit.Fits, field, registry);
        return Finish(result, "ok", star, fit.Kept.Count, period, fit.Fits, fit.Fits.SelectMany(f => f.Flags));
    }

    internal static StarAnalysis Finish(StarAnalysis r, string outcome, StarInfo star, int used, PeriodEstimate? period, IReadOnlyList<BandFit> fits, IEnumerable<string> fitFlags)
    {
        var flags = new SortedSet<string>(StringComparer.Ordinal);
        foreach (var f in fitFlags) flags.Add(f);
        if (period?.PdmDisagrees == true) flags.Add("pdm_disagrees");
        if (r.Distance?.Flags is { } df) foreach (var f in df) flags.Add(f);
        if (r.Distance?.FailureReason is { } dr) flags.Add("no_distance:" + dr);
        if (r.FieldContext is not null && r.LightCurveClass is { } lc && r.Class is { } c && lc.Class != c.Class) flags.Add("class_from_field_pl");
        if (outcome != "ok") flags.Add(outcome);
        return r with { Outcome = outcome, PointsUsed = used, Fits = fits, Flags = flags.ToList() };
    }
}
