using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Classification;

/// <summary>A class with its reasons. Source: "star_list", "reviewer" or "suggested".</summary>
public sealed record ClassSuggestion(PulsatorClass Class, double Confidence, IReadOnlyList<string> Reasons, string Source);

/// <summary>Stage "classify".</summary>
public static class Classifier
{
    public static ClassSuggestion Classify(StarInfo star, PeriodEstimate? period, PeriodSearchResult? search, IReadOnlyList<BandFit> fits, PulsatorClass? reviewerClass)
        => throw new NotImplementedException("contract: implemented by the light-curve work");
}
