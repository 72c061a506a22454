using System.Data.Common;
using System.Reflection;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Reporting;
using PulseLadder.Storage;
using PulseLadder.Web.Api;

namespace PulseLadder.Web.Export;

/// <summary>The rows of an export (one field or the whole campaign) with the full stored results behind them.</summary>
/// <param name="Audit">Audit entries of the exported fields' uploads, review decisions and settings, oldest first.</param>
internal sealed record ExportSet(IReadOnlyList<StarRowDto> Rows, IReadOnlyList<StarAnalysis> Analyses, IReadOnlyList<AuditRow> Audit)
{
    /// <summary>Product version of this build (informational version, without the source-revision suffix).</summary>
    public static string SoftwareVersion { get; } = ReadVersion();

    /// <summary>
    /// Rows of the given fields (in field then star order) with each row's newest stored result for the current
    /// pipeline version; rows of stars without a result have no analysis. <paramref name="acceptedOnly"/> keeps
    /// only stars a reviewer accepted.
    /// </summary>
    public static ExportSet Load(DbConnection c, IEnumerable<long> fieldIds, bool acceptedOnly)
    {
        var rows = new List<StarRowDto>();
        var analyses = new List<StarAnalysis>();
        var audit = new List<AuditRow>();
        foreach (var fieldId in fieldIds)
        {
            audit.AddRange(AuditStore.ForField(c, fieldId));
            var fieldRows = StarViews.FieldRows(c, fieldId).Where(r => !acceptedOnly || r.State == ReviewStates.Accepted).ToList();
            rows.AddRange(fieldRows);
            var wanted = fieldRows.Select(r => r.StarId).ToHashSet();
            foreach (var a in AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: true).OrderBy(a => a.StarId))
                if (wanted.Contains(a.StarId) && Json.Deserialize<StarAnalysis>(a.ResultJson) is { } r)
                    analyses.Add(r);
        }
        // A batch that touched several fields appears once.
        return new ExportSet(rows, analyses, audit.DistinctBy(a => a.Id).OrderBy(a => a.Id).ToList());
    }

    public string Methods() => MethodsReport.Write(Analyses, CalibrationRegistry.Embedded, SoftwareVersion);

    public ExportMetadata Metadata(string title, bool acceptedOnly) => new(
        title, SoftwareVersion,
        Analyses.Select(a => a.PipelineVersion).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToList(),
        MethodsReport.RelationIds(Analyses), MethodsReport.AnchorIds(Analyses), acceptedOnly, Methods(), Audit);

    private static string ReadVersion()
    {
        var v = typeof(ExportSet).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion
            ?? typeof(ExportSet).Assembly.GetName().Version?.ToString() ?? "unknown";
        int plus = v.IndexOf('+', StringComparison.Ordinal);
        return plus > 0 ? v[..plus] : v;
    }
}
