using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Cleaning;

/// <summary>Settings of the cleaning stage (all rejections are recorded with their reason).</summary>
public sealed record CleaningSettings
{
    /// <summary>Largest accepted magnitude error; larger errors are rejected as "error_range".</summary>
    public double MaxMagErr { get; init; } = 0.5;
    /// <summary>Residual clipping threshold in robust sigmas (1.4826 MAD).</summary>
    public double ClipSigma { get; init; } = 4.0;
    public int MaxClipIterations { get; init; } = 5;
}

/// <summary>Output of <see cref="Cleaner.RejectUnusable"/>.</summary>
public sealed record CleaningOutcome(IReadOnlyList<Observation> Kept, IReadOnlyList<Rejection> Rejected);

/// <summary>Stage "clean": drops flagged, non-finite, out-of-range and duplicate points, saying why for each.</summary>
public static class Cleaner
{
    public static CleaningOutcome RejectUnusable(IReadOnlyList<Observation> observations, CleaningSettings settings)
        => throw new NotImplementedException("contract: implemented by the light-curve work");
}
