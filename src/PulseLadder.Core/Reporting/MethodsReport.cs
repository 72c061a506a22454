using System.Globalization;
using System.Text;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Extinction;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>
/// A plain-text "methods" paragraph for a set of stored analyses, ready to paste into a paper. Pure: every figure
/// and name comes from the analyses themselves (their settings, methods strings and distance results) or from the
/// calibration registry's published sources for the relation and anchor ids those results name; nothing is assumed.
/// Where the analyses disagree (e.g. two pipeline versions) every distinct value is listed with its count.
/// </summary>
public static class MethodsReport
{
    /// <summary>Published source of each extinction law, as documented on <see cref="ExtinctionLaw"/>.</summary>
    private static readonly Dictionary<string, string> LawSources = new(StringComparer.Ordinal)
    {
        ["ccm89"] = "Cardelli, Clayton & Mathis (1989, ApJ 345, 245)",
        ["odonnell94"] = "Cardelli, Clayton & Mathis (1989) with the optical/near-infrared polynomial of O'Donnell (1994, ApJ 422, 158)",
        ["f99"] = "Fitzpatrick (1999, PASP 111, 63)",
    };

    /// <summary>
    /// Writes the paragraph. <paramref name="analyses"/> may be empty (the paragraph then says so);
    /// <paramref name="softwareVersion"/> is the product version of the software that serves the report.
    /// </summary>
    public static string Write(IReadOnlyList<StarAnalysis> analyses, CalibrationRegistry registry, string softwareVersion)
    {
        ArgumentNullException.ThrowIfNull(analyses);
        ArgumentNullException.ThrowIfNull(registry);
        var ci = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        if (analyses.Count == 0)
            return $"No stored analysis matches this selection (PulseLadder {softwareVersion}).";

        var withDistance = analyses.Where(a => a.Distance is { FailureReason: null }).ToList();
        var periods = analyses.Where(a => a.Period is not null).ToList();
        sb.Append(ci, $"Photometry of {analyses.Count} star{Plural(analyses.Count)} was analysed with PulseLadder {softwareVersion} ")
          .Append(ci, $"(analysis pipeline version {Distinct(analyses.Select(a => a.PipelineVersion))}); ")
          .Append(ci, $"{periods.Count} yielded a period and {withDistance.Count} a distance. ");

        var timeMethods = analyses.Select(a => a.TimeMethod).Where(m => m.Length > 0).ToList();
        if (timeMethods.Count > 0)
            sb.Append("All observation times were converted to barycentric Julian dates in the TDB scale (BJD_TDB) before the period search; conversion: ")
              .Append(Distinct(timeMethods)).Append(". ");

        var searched = analyses.Where(a => a.Search is { Method.Length: > 0 }).ToList();
        if (searched.Count > 0)
        {
            sb.Append("Periods were searched with a multiband generalised Lomb-Scargle periodogram (")
              .Append(Distinct(searched.Select(a => a.Search!.Method)))
              .Append(ci, $") on a frequency grid oversampled by a factor {Distinct(searched.Select(a => Num(a.Settings.PeriodSearch.Oversampling)))} ")
              .Append("(step 1/(n0 T) for a baseline T)");
            var faps = searched.SelectMany(a => a.Search!.Peaks.Take(1)).Select(p => p.FapMethod).Where(m => m.Length > 0).ToList();
            if (faps.Count > 0) sb.Append("; false-alarm probabilities: ").Append(Distinct(faps));
            sb.Append(ci, $"; a best peak with false-alarm probability above {Distinct(searched.Select(a => Num(a.Settings.PeriodSearch.MaxFalseAlarmProbability)))} was not accepted. ");
        }
        if (periods.Count > 0)
        {
            sb.Append("Each period was refined by nonlinear least squares with a Fourier series whose order was chosen per band by BIC (at most ")
              .Append(Distinct(periods.Select(a => a.Settings.PeriodSearch.MaxRefineHarmonics.ToString(ci))))
              .Append(" harmonics)");
            int pdm = periods.Count(a => a.Period!.PdmTheta is not null);
            if (pdm > 0)
                sb.Append(ci, $" and, for {pdm} star{Plural(pdm)}, checked against Stellingwerf phase dispersion minimisation ({Distinct(periods.Select(a => a.Settings.PeriodSearch.PdmBins.ToString(ci)))} phase bins)");
            sb.Append(ci, $"; period methods: {Distinct(periods.Select(a => a.Period!.Method))}. ");
            int reviewed = analyses.Count(a => a.Overrides.PeriodDays is not null || a.Overrides.Class is not null);
            if (reviewed > 0) sb.Append(ci, $"For {reviewed} star{Plural(reviewed)} a reviewer chose the period or class. ");
            sb.Append("Intensity-mean magnitudes come from Fourier fits of at most ")
              .Append(Distinct(periods.Select(a => a.Settings.Fit.MaxOrder.ToString(ci))))
              .Append(" harmonics with per-observer zero points. ");
        }

        if (withDistance.Count > 0)
        {
            var d = withDistance.Select(a => a.Distance!).ToList();
            var relIds = d.GroupBy(x => x.RelationId).OrderByDescending(g => g.Count()).ThenBy(g => g.Key, StringComparer.Ordinal).ToList();
            sb.Append("Distances used the period-luminosity relation");
            sb.Append(relIds.Count > 1 ? "s " : " ");
            sb.AppendJoin("; ", relIds.Select(g =>
            {
                var rel = g.First().Relation;
                string src = rel?.Source is { Length: > 0 } s ? s : registry.TryGet(g.Key, out var r) && r.Source.Length > 0 ? r.Source : "source not recorded";
                string table = rel?.Table is { Length: > 0 } t ? ", " + t : "";
                string band = rel?.BandLabel ?? g.First().Band;
                return string.Create(ci, $"{g.Key} ({band}; {src}{table}; {g.Count()} star{Plural(g.Count())})");
            }));
            sb.Append(". ");
            var anchors = d.Where(x => x.AnchorId.Length > 0).GroupBy(x => x.AnchorId).OrderBy(g => g.Key, StringComparer.Ordinal).ToList();
            if (anchors.Count > 0)
            {
                sb.Append("Zero-point anchor: ");
                sb.AppendJoin("; ", anchors.Select(g =>
                {
                    string src = registry.TryGetAnchor(g.Key, out var an) && an.Source.Length > 0 ? an.Source : "source not recorded";
                    string mu = g.First().AnchorMu is { } m ? string.Create(ci, $", mu = {Num(m)} mag") : "";
                    return $"{g.Key} ({src}{mu})";
                }));
                sb.Append(". ");
            }
            var funds = d.Where(x => x.Fundamentalisation is not null).ToList();
            if (funds.Count > 0)
                sb.Append(ci, $"Overtone periods of {funds.Count} star{Plural(funds.Count)} were fundamentalised ({Distinct(funds.Select(x => x.Fundamentalisation!))}). ");
            sb.Append("Extinction followed the law of ")
              .Append(Distinct(d.Select(x => LawSources.TryGetValue(x.ExtinctionLaw, out var s) ? s : x.ExtinctionLaw)))
              .Append(ci, $" with R_V = {Distinct(d.Select(x => Num(x.Rv)))}");
            sb.Append(ci, $" (uncertainty {Distinct(withDistance.Select(a => Num(a.Settings.Distance.RvErr)))} propagated as a systematic term)");
            sb.Append("; E(B-V) from ").Append(Distinct(d.Select(x => EbvSourceText(x.EbvSource)))).Append(". ");
            sb.Append(ci, $"Uncertainties of the distance moduli are the 16th-84th percentile half-widths of {Distinct(d.Select(x => x.Draws.ToString(ci)))} Monte Carlo draws ")
              .Append("(statistical and systematic terms reported separately).");
        }
        return sb.ToString().TrimEnd();
    }

    /// <summary>The relation ids used by the analyses with a distance, in name order.</summary>
    public static IReadOnlyList<string> RelationIds(IEnumerable<StarAnalysis> analyses) =>
        analyses.Where(a => a.Distance is { FailureReason: null }).Select(a => a.Distance!.RelationId)
            .Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList();

    /// <summary>The anchor ids used by the analyses with a distance, in name order.</summary>
    public static IReadOnlyList<string> AnchorIds(IEnumerable<StarAnalysis> analyses) =>
        analyses.Where(a => a.Distance is { FailureReason: null, AnchorId.Length: > 0 }).Select(a => a.Distance!.AnchorId)
            .Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList();

    private static string EbvSourceText(string source) => source switch
    {
        "star_list" => "the star list",
        "field_default" => "the field default",
        "none" => "none (reddening-free index)",
        _ when source.StartsWith("period_colour:", StringComparison.Ordinal) =>
            "the mean colour minus the intrinsic period-colour relation " + source["period_colour:".Length..],
        _ => source,
    };

    /// <summary>One value, or every distinct value with its count ("a (3), b (1)") when they differ.</summary>
    private static string Distinct(IEnumerable<string> values)
    {
        var groups = values.GroupBy(v => v, StringComparer.Ordinal).OrderByDescending(g => g.Count()).ThenBy(g => g.Key, StringComparer.Ordinal).ToList();
        if (groups.Count == 0) return "not recorded";
        if (groups.Count == 1) return groups[0].Key;
        return string.Join(", ", groups.Select(g => string.Create(CultureInfo.InvariantCulture, $"{g.Key} ({g.Count()} stars)")));
    }

    private static string Num(double v) => v.ToString("R", CultureInfo.InvariantCulture);

    private static string Plural(int n) => n == 1 ? "" : "s";
}
