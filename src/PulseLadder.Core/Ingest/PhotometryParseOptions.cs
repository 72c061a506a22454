using System.Globalization;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>
/// Per-upload metadata and checks for photometry files. The time scale and offset are declared by the uploader,
/// never guessed: <c>Observation.Time = value + TimeOffset</c>, in <see cref="Scale"/>.
/// </summary>
public sealed record PhotometryParseOptions
{
    /// <param name="scale">Declared time scale of the time column.</param>
    /// <param name="timeOffset">Additive offset in days (e.g. 2450000 for "JD - 2450000" columns; 0 for none). Must be finite.</param>
    public PhotometryParseOptions(TimeScale scale, double timeOffset)
    {
        if (!double.IsFinite(timeOffset)) throw new ArgumentOutOfRangeException(nameof(timeOffset), timeOffset, "must be finite");
        Scale = scale;
        TimeOffset = timeOffset;
    }

    public TimeScale Scale { get; }

    /// <summary>Days added to every time value.</summary>
    public double TimeOffset { get; }

    /// <summary>Star names of the star list (exact, case-sensitive); null skips the check.</summary>
    public IReadOnlySet<string>? KnownStars { get; init; }

    /// <summary>Observer for rows without an observer column or with an empty one.</summary>
    public string DefaultObserver { get; init; } = string.Empty;

    /// <summary>Reject rows with the same star, time (after offset), band and observer as an earlier row of the same file.</summary>
    public bool RejectDuplicates { get; init; } = true;

    /// <summary>
    /// Null (the default): every (star, band, observer) group gets a full duplicate index, which finds every duplicate
    /// in one reading at about 12 bytes per row. Set (even empty): only the listed groups are fully indexed; the others
    /// keep their latest time only, which is exact while their times strictly increase. A group that goes back in time
    /// is listed in <see cref="IngestSummary.OutOfOrderGroups"/> and its later rows are not checked for duplicates: read
    /// the file again with those groups added until none is listed (the summary of that last reading is exact).
    /// </summary>
    public IReadOnlySet<DuplicateGroup>? FullyIndexedGroups { get; init; }

    public IngestLimits Limits { get; init; } = IngestLimits.Default;

    /// <summary>Faintest/brightest magnitude accepted.</summary>
    public const double MinMag = -5, MaxMag = 40;

    /// <summary>Largest mag_err accepted, in magnitudes.</summary>
    public const double MaxMagErr = 5;
}

/// <summary>Rows that share a star, band (normalised) and observer: a duplicate repeats the time of one of them.</summary>
public readonly record struct DuplicateGroup(string Star, string Band, string Observer);

/// <summary>Reads the per-upload metadata as a user types it (e.g. form fields or CLI options).</summary>
public static class UploadMetadata
{
    /// <summary>
    /// Parses a time-scale code (see <see cref="Photometry.TimeScales.AllCodes"/>) and an optional offset (invariant culture;
    /// null or empty means 0). False with a user-facing <paramref name="error"/> when either is invalid.
    /// </summary>
    public static bool TryParse(string? timeScale, string? timeOffset, out TimeScale scale, out double offset, out string? error)
    {
        offset = 0;
        error = null;
        if (!Photometry.TimeScales.TryParse(timeScale, out scale))
        {
            error = IngestMessages.BadTimeScale(timeScale);
            return false;
        }
        if (string.IsNullOrWhiteSpace(timeOffset)) return true;
        if (!double.TryParse(timeOffset, NumberStyles.Float, CultureInfo.InvariantCulture, out offset) || !double.IsFinite(offset))
        {
            offset = 0;
            error = IngestMessages.BadTimeOffset(timeOffset);
            return false;
        }
        return true;
    }
}
