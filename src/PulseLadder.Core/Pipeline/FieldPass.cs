using PulseLadder.Core.Calibration;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Distances;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Pipeline;

/// <summary>
/// The field-level second pass of the stage "classify": once a field holds enough analysed stars, each star's class
/// is suggested again with its position in the field's period-luminosity plane, and its distance follows the class.
/// Pure and deterministic, like <see cref="AnalysisPipeline"/>; a star's result records the context it used, so
/// <c>AnalysisPipeline.Run(..., field: result.FieldContext)</c> reproduces it.
/// </summary>
public static class FieldPass
{
    /// <summary>
    /// The field's PL context from its analysed stars: every star with outcome "ok", a period and intensity means
    /// enters with its light-curve class (<see cref="StarAnalysis.LightCurveClass"/>; declared and reviewer classes
    /// included, as they win there) and each band's intensity mean; lines are fitted by <see cref="FieldPl.Fit"/>.
    /// Null when no band has <see cref="FieldContext.MinStars"/> fundamental-mode Cepheids (the field is too small for
    /// the PL test). Order of <paramref name="analyses"/> does not matter.
    /// </summary>
    public static FieldContext? BuildContext(IEnumerable<StarAnalysis> analyses)
    {
        ArgumentNullException.ThrowIfNull(analyses);
        var stars = new List<FieldStar>();
        foreach (var a in analyses)
        {
            if (a.Outcome != "ok" || a.Period is not { PeriodDays: > 0 } p || !double.IsFinite(p.PeriodDays)) continue;
            var cls = (a.LightCurveClass ?? a.Class)?.Class;
            if (cls is null) continue;
            foreach (var f in a.Fits.GroupBy(f => f.Band, StringComparer.Ordinal).Select(g => g.First()))
                if (double.IsFinite(f.IntensityMeanMag) && f.Points > 0 && !f.Flags.Contains("no_fit"))
                    stars.Add(new FieldStar(a.Star, cls.Value, p.PeriodDays, f.Band, f.IntensityMeanMag));
        }
        var lines = FieldPl.Fit(stars);
        if (lines.Count == 0) return null;
        return new FieldContext([])
        {
            Lines = lines, StarSetHash = FieldPl.HashOf(stars), StarCount = stars.Select(s => s.Name).Distinct(StringComparer.Ordinal).Count(),
        };
    }

    /// <summary>
    /// A stored analysis with its class suggested again under <paramref name="field"/> (null: light curve only) and
    /// the distance recomputed for that class with <paramref name="registry"/>; the flags are rebuilt. Results whose
    /// outcome is not "ok" come back unchanged. A class from the star list or the reviewer still wins.
    /// When the class comes out as the stored one and the registry is the one the stored distance used, the stored
    /// distance is kept: every other input of the (seeded, deterministic) distance is the stored analysis's own, so
    /// recomputing it would give the same result at ~1 ms per star of the field.
    /// </summary>
    public static StarAnalysis Reclassify(StarAnalysis analysis, StarInfo star, FieldContext? field, CalibrationRegistry registry)
        => Reclassify(analysis, star, field, registry, reuseDistance: true);

    internal static StarAnalysis Reclassify(StarAnalysis analysis, StarInfo star, FieldContext? field, CalibrationRegistry registry, bool reuseDistance)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        ArgumentNullException.ThrowIfNull(star);
        ArgumentNullException.ThrowIfNull(registry);
        if (analysis.Outcome != "ok" || analysis.Period is null) return analysis;
        var r = ClassifyAndMeasure(analysis, star, analysis.Fits, field, registry, reuseDistance ? analysis.Distance : null);
        return AnalysisPipeline.Finish(r, "ok", star, analysis.PointsUsed, analysis.Period, analysis.Fits, analysis.Fits.SelectMany(f => f.Flags));
    }

    /// <summary>Classify (light curve, then with the field context when given) and measure the distance; shared by Run and Reclassify.</summary>
    /// <param name="storedDistance">The distance <paramref name="r"/> holds for its class <c>r.Class</c>, computed from these same
    /// inputs (Reclassify); kept when the class and the registry come out unchanged. Null: always computed.</param>
    internal static StarAnalysis ClassifyAndMeasure(StarAnalysis r, StarInfo star, IReadOnlyList<BandFit> fits, FieldContext? field, CalibrationRegistry registry,
        DistanceResult? storedDistance = null)
    {
        var period = r.Period ?? throw new InvalidOperationException("ClassifyAndMeasure needs a period");
        var lightCurve = Classifier.Classify(star, period, r.Search, fits, r.Overrides.Class);
        var context = field?.Compact();
        var cls = context is null ? lightCurve : Classifier.Classify(star, period, r.Search, fits, r.Overrides.Class, context);
        var distance = storedDistance is not null && r.Class is { } was && was.Class == cls.Class && r.CalibrationRegistryHash == registry.Hash
            ? storedDistance
            : DistanceEstimator.EstimateDistance(star, cls.Class, period.PeriodDays, period.PeriodErrDays, fits, r.Settings.Distance, registry);
        return r with { LightCurveClass = lightCurve, Class = cls, FieldContext = context, Distance = distance, CalibrationRegistryHash = registry.Hash };
    }
}
