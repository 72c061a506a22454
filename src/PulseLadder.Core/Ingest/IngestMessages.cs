using System.Globalization;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>The wording of every ingest error and warning (documented in docs/formats.md; tests pin it).</summary>
internal static class IngestMessages
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public const string MissingHeader = "no header line: the file is empty or has only blank and '#' comment lines";
    public const string UnknownSeparator = "cannot detect the separator: the header has no comma, semicolon or tab";
    public const string EmptyField = "empty required field";
    public const string NotFinite = "NaN or infinite value";
    public const string ErrorNotPositive = "mag_err must be positive";

    public static string LineTooLong(int max) => string.Create(Inv, $"line longer than {max} characters; skipped");

    public static string TooManyRows(int max) => string.Create(Inv, $"more than {max} data rows; reading stopped");

    public static string TooManyErrors(int max, long line) =>
        string.Create(Inv, $"more than {max} errors; reading stopped at line {line}");

    public static string TooManyHeaderColumns(int max) => string.Create(Inv, $"the header has more than {max} columns");

    public static string DuplicateColumn(string name) => $"column '{name}' appears twice in the header";

    public static string ControlCharacter(char c, int position) =>
        string.Create(Inv, $"holds a control character (U+{(int)c:X4}) at position {position}; names must be printable text");

    public static string UnnamedColumn(int position) => string.Create(Inv, $"column {position} of the header has no name; its values are ignored");

    public static string UnknownColumn(string name) => $"unknown column '{name}' ignored";

    public static string MissingColumn(string name, string[] required) =>
        $"missing required column '{name}' (required: {string.Join(", ", required)})";

    public static string WrongColumnCount(int expected, int found) =>
        string.Create(Inv, $"expected {expected} fields, found {found}");

    public static string Quoting(SplitStatus status) => status switch
    {
        SplitStatus.UnterminatedQuote => "unterminated quoted field",
        SplitStatus.TextAfterQuote => "text after the closing quote of a field",
        _ => "bad quoting",
    };

    public static string NotANumber(ReadOnlySpan<char> text)
    {
        string shown = Show(text);
        return text.Contains(',')
            ? $"'{shown}' is not a number (use '.' as the decimal separator)"
            : $"'{shown}' is not a number";
    }

    public static string ErrorTooLarge(double err, double max) =>
        string.Create(Inv, $"mag_err {err:R} is above {max:R} mag");

    public static string MagnitudeOutOfRange(double mag, double min, double max) =>
        string.Create(Inv, $"magnitude {mag:R} is outside {min:R}..{max:R}");

    public static string UnknownBand(ReadOnlySpan<char> text) =>
        $"unknown band '{Show(text)}' (accepted: {string.Join(", ", Bands.Known.Keys)})";

    public static string TimeOutOfRange(double value, double offset, TimeScale scale, double fullJd) =>
        string.Create(Inv,
            $"time {value:R} + offset {offset:R} is JD {fullJd:F1} ({scale.ToCode()}), outside the plausible range JD {Photometry.TimeScales.MinPlausibleJd:F1}..{Photometry.TimeScales.MaxPlausibleJd:F1} (1890-2100): missing or wrong time offset?");

    public static string DuplicateRow(long firstLine) =>
        string.Create(Inv, $"duplicate of line {firstLine} (same star, time, band and observer)");

    public static string UnknownStar(string star) => $"star '{star}' is not in the star list";

    public static string DuplicateStar(string star, long firstLine) =>
        string.Create(Inv, $"star '{star}' already listed at line {firstLine}");

    public static string RaOutOfRange(double ra) => string.Create(Inv, $"ra_deg {ra:R} is outside [0, 360)");

    public static string DecOutOfRange(double dec) => string.Create(Inv, $"dec_deg {dec:R} is outside [-90, 90]");

    public static string UnknownClass(ReadOnlySpan<char> text) =>
        $"unknown class '{Show(text)}' (accepted: {string.Join(", ", PulsatorClasses.AllCodes)})";

    public static string ValueOutOfRange(string column, double value, double min, double max) =>
        string.Create(Inv, $"{column} {value:R} is outside {min:R}..{max:R}");

    public static string BadBandParameter(string band) =>
        $"unknown band '{band}' (accepted: {string.Join(", ", Bands.Known.Keys)})";

    public const string EmptyStarParameter = "the star name is empty";

    public static string BadTimeScale(string? code) =>
        $"unknown time scale '{code}' (accepted: {string.Join(", ", Photometry.TimeScales.AllCodes)})";

    public static string BadTimeOffset(string? text) => $"time offset '{text}' is not a finite number";

    /// <summary>Field text as shown in a message: at most 40 characters, control characters replaced.</summary>
    private static string Show(ReadOnlySpan<char> text)
    {
        var t = text.Length > 40 ? text[..40] : text;
        Span<char> buf = stackalloc char[t.Length];
        for (int i = 0; i < t.Length; i++) buf[i] = char.IsControl(t[i]) ? '?' : t[i];
        return text.Length > 40 ? string.Concat(buf, "...") : new string(buf);
    }
}
