namespace PulseLadder.Core.Photometry;

/// <summary>
/// The time scale and reference point an upload declares for its time column. Never guessed: every upload names one.
/// </summary>
public enum TimeScale
{
    JdUtc,
    MjdUtc,
    JdTt,
    MjdTt,
    HjdUtc,
    HjdTt,
    BjdTdb,
    BmjdTdb,
}

public static class TimeScales
{
    private static readonly (string Code, TimeScale Scale)[] Codes =
    [
        ("jd_utc", TimeScale.JdUtc),
        ("mjd_utc", TimeScale.MjdUtc),
        ("jd_tt", TimeScale.JdTt),
        ("mjd_tt", TimeScale.MjdTt),
        ("hjd_utc", TimeScale.HjdUtc),
        ("hjd_tt", TimeScale.HjdTt),
        ("bjd_tdb", TimeScale.BjdTdb),
        ("bmjd_tdb", TimeScale.BmjdTdb),
    ];

    /// <summary>All accepted codes, in the order shown to users.</summary>
    public static IReadOnlyList<string> AllCodes { get; } = Codes.Select(c => c.Code).ToArray();

    public static bool TryParse(string? code, out TimeScale scale)
    {
        foreach (var (c, s) in Codes)
        {
            if (string.Equals(c, code?.Trim(), StringComparison.OrdinalIgnoreCase)) { scale = s; return true; }
        }
        scale = default;
        return false;
    }

    // Indexed by the enum's value: called once per stored observation, where a search with a capturing lambda
    // allocated per call.
    private static readonly string[] CodeByScale = BuildCodeByScale();

    private static string[] BuildCodeByScale()
    {
        var codes = new string[Codes.Max(c => (int)c.Scale) + 1];
        foreach (var (c, s) in Codes) codes[(int)s] = c;
        return codes;
    }

    public static string ToCode(this TimeScale scale)
        => (uint)scale < (uint)CodeByScale.Length && CodeByScale[(int)scale] is { } code
            ? code
            : throw new ArgumentOutOfRangeException(nameof(scale), scale, "Unknown time scale.");

    /// <summary>True for scales whose values are modified Julian dates (JD - 2400000.5).</summary>
    public static bool IsModified(this TimeScale scale) => scale is TimeScale.MjdUtc or TimeScale.MjdTt or TimeScale.BmjdTdb;

    /// <summary>
    /// Plausible range of full Julian dates for photometry of this kind (1890 to 2100): anything outside is a
    /// missing or wrong offset, and the upload is refused rather than analysed.
    /// </summary>
    public const double MinPlausibleJd = 2411368.5; // 1890-01-01

    public const double MaxPlausibleJd = 2488069.5; // 2100-01-01

    /// <summary>Converts a value in this scale (offset already added) to a full Julian day number in the same scale.</summary>
    public static double ToFullJulianDay(this TimeScale scale, double value) => scale.IsModified() ? value + 2400000.5 : value;
}
