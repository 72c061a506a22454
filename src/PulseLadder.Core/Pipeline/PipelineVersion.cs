namespace PulseLadder.Core.Pipeline;

/// <summary>
/// Version of the analysis. A star with no result for the current version is pending and is (re)analysed.
/// Bump it whenever a change alters numbers a stored result would hold.
/// </summary>
public static class PipelineVersion
{
    public const string Current = "0.2.0";
}
