namespace PulseLadder.Core.Ingest;

/// <summary>
/// Bounds that keep a hostile or broken upload from costing unbounded time or memory.
/// </summary>
/// <param name="MaxRows">Most data rows read from one file (accepted or rejected); more is an error and reading stops.</param>
/// <param name="MaxLineLength">Longest line in characters (without the line break); a longer line is an error and is skipped.</param>
/// <param name="MaxErrors">Most errors listed per file; one more stops reading with a TooManyErrors error.</param>
public sealed record IngestLimits(int MaxRows = 10_000_000, int MaxLineLength = 64 * 1024, int MaxErrors = 1000)
{
    public static IngestLimits Default { get; } = new();

    internal void Validate()
    {
        if (MaxRows < 0) throw new ArgumentOutOfRangeException(nameof(MaxRows), MaxRows, "must be >= 0");
        if (MaxLineLength < 16) throw new ArgumentOutOfRangeException(nameof(MaxLineLength), MaxLineLength, "must be >= 16");
        if (MaxErrors < 1) throw new ArgumentOutOfRangeException(nameof(MaxErrors), MaxErrors, "must be >= 1");
    }
}
