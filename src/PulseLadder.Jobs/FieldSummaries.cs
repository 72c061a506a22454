using PulseLadder.Core.Distances;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Jobs;

/// <summary>Adapter from stored star analyses to the Core field summary (SCIENCE.md 5.2).</summary>
internal static class FieldSummaries
{
    internal sealed record Computed(long NUsed, double? Mu, double? MuErr, FieldSummary Detail);

    /// <summary>Null when no accepted star carries a distance.</summary>
    public static Computed? Compute(IReadOnlyList<StarAnalysis> accepted, Core.Calibration.CalibrationRegistry registry)
    {
        var stars = accepted
            .Where(a => a.Distance is not null)
            .Select(a => FieldStarDistance.FromResult(a.Star, a.Distance!))
            .OfType<FieldStarDistance>()
            .ToList();
        if (stars.Count == 0) return null;
        var summary = FieldSummarizer.Summarize(stars, new FieldSummarySettings(), registry);
        if (summary.FailureReason is not null) return new Computed(0, null, null, summary);
        return new Computed(summary.StarsUsed, summary.Mu, summary.MuErr, summary);
    }
}
