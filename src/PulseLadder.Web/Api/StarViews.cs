using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;

namespace PulseLadder.Web.Api;

/// <summary>One star as a table row (field overview, review queue, exports).</summary>
public sealed record StarRowDto(
    long StarId, string Star, long FieldId, string Field, string State, bool Pending,
    string? Class, string? ClassSource, double? PeriodDays, double? PeriodErrDays, double? Fap,
    IReadOnlyDictionary<string, double> MeanMag, IReadOnlyDictionary<string, double> Amplitude,
    double? Ebv, double? DistanceModulus, double? DistanceModulusErr, double? DistancePc, double? DistancePcErr,
    string? RelationId, string Outcome, IReadOnlyList<string> Flags, double RaDeg, double DecDeg);

internal static class StarViews
{
    public static StarRowDto Row(StarRow s, AnalysisRow? a)
    {
        var sum = a is null ? new AnalysisSummary() : Json.Deserialize<AnalysisSummary>(a.SummaryJson) ?? new AnalysisSummary();
        bool pending = a is null || a.Revision != s.Revision;
        return new StarRowDto(
            s.Id, s.Name, s.FieldId, s.FieldName, s.ReviewState, pending,
            a?.Class ?? s.DeclaredClass, sum.ClassSource, a?.PeriodDays, a?.PeriodErrDays, a?.Fap,
            sum.MeanMag, sum.Amplitude, sum.Ebv ?? s.Ebv,
            a?.DistanceModulus, a?.DistanceModulusErr, a?.DistancePc, a?.DistancePcErr, sum.RelationId,
            a?.Outcome ?? "pending",
            a is null || a.Flags.Length == 0 ? [] : a.Flags.Split(','),
            s.RaDeg, s.DecDeg);
    }

    public static IReadOnlyList<StarRowDto> FieldRows(System.Data.Common.DbConnection c, long fieldId)
    {
        var analyses = AnalysisStore.LatestForField(c, fieldId, PipelineVersion.Current, withJson: false).ToDictionary(a => a.StarId);
        return StarStore.ListByField(c, fieldId).Select(s => Row(s, analyses.GetValueOrDefault(s.Id))).ToList();
    }
}
