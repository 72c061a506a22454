using PulseLadder.Core.Pipeline;

namespace PulseLadder.Jobs;

/// <summary>Adapter from stored star analyses to the Core field summary.</summary>
internal static class FieldSummaries
{
    internal sealed record Computed(long NUsed, double? Mu, double? MuErr, object Detail);

    public static Computed? Compute(IReadOnlyList<StarAnalysis> accepted)
    {
        var usable = accepted.Where(a => a.Distance is { FailureReason: null } d && d.MuErr > 0).ToList();
        if (usable.Count == 0) return null;
        double sw = 0, swm = 0;
        foreach (var a in usable) { double w = 1 / (a.Distance!.MuErr * a.Distance.MuErr); sw += w; swm += w * a.Distance.Mu; }
        double mu = swm / sw;
        return new Computed(usable.Count, mu, Math.Sqrt(1 / sw), new { mu, mu_err = Math.Sqrt(1 / sw), n_used = usable.Count });
    }
}
