using PulseLadder.Core.Pipeline;

namespace PulseLadder.Storage;

/// <summary>The small per-star figures kept beside the full result (tables, exports, the review queue).</summary>
public sealed record AnalysisSummary
{
    public Dictionary<string, double> MeanMag { get; init; } = [];
    public Dictionary<string, double> Amplitude { get; init; } = [];
    public string? ClassSource { get; init; }
    public double? ClassConfidence { get; init; }
    public double? Ebv { get; init; }
    public string? RelationId { get; init; }
    public string? DistanceBand { get; init; }
    public double? MuErrStat { get; init; }
    public double? MuErrSys { get; init; }

    public static AnalysisSummary From(StarAnalysis r) => new()
    {
        MeanMag = r.Fits.GroupBy(f => f.Band).ToDictionary(g => g.Key, g => g.First().IntensityMeanMag),
        Amplitude = r.Fits.GroupBy(f => f.Band).ToDictionary(g => g.Key, g => g.First().Amplitude),
        ClassSource = r.Class?.Source,
        ClassConfidence = r.Class?.Confidence,
        Ebv = r.Distance?.Ebv,
        RelationId = r.Distance is { FailureReason: null } d ? d.RelationId : null,
        DistanceBand = r.Distance is { FailureReason: null } d2 ? d2.Band : null,
        MuErrStat = r.Distance is { FailureReason: null } d3 ? d3.MuErrStat : null,
        MuErrSys = r.Distance is { FailureReason: null } d4 ? d4.MuErrSys : null,
    };
}
