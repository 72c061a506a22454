namespace PulseLadder.Core.Ingest;

/// <summary>Why a row (or a whole file) was refused, or what a warning is about. Stable: clients may switch on it.</summary>
public enum IngestIssueCode
{
    /// <summary>The file has no header line (empty, or only blank/comment lines).</summary>
    MissingHeader,
    /// <summary>The header's separator could not be detected (no comma, semicolon or tab in it).</summary>
    UnknownSeparator,
    /// <summary>A required column is missing from the header.</summary>
    MissingColumn,
    /// <summary>A column name appears twice in the header.</summary>
    DuplicateColumn,
    /// <summary>Warning: a column we do not know; its values are ignored.</summary>
    UnknownColumn,
    /// <summary>The line has a different number of fields than the header.</summary>
    WrongColumnCount,
    /// <summary>A quoted field is not closed before the end of the line, or text follows a closing quote.</summary>
    BadQuoting,
    /// <summary>The line is longer than the limit; it was skipped.</summary>
    LineTooLong,
    /// <summary>A required field is empty.</summary>
    EmptyField,
    /// <summary>The field is not a number in invariant culture.</summary>
    NotANumber,
    /// <summary>The field is NaN or infinite.</summary>
    NotFinite,
    /// <summary>mag_err is zero or negative.</summary>
    ErrorNotPositive,
    /// <summary>mag_err is above the absurdity limit.</summary>
    ErrorTooLarge,
    /// <summary>The magnitude is outside the plausible range.</summary>
    MagnitudeOutOfRange,
    /// <summary>The band is not one we know (see Bands).</summary>
    UnknownBand,
    /// <summary>The time (value plus offset) is outside the plausible range for its scale: usually a missing offset.</summary>
    TimeOutOfRange,
    /// <summary>Same star, time, band and observer as an earlier row.</summary>
    DuplicateRow,
    /// <summary>The star is not in the star list.</summary>
    UnknownStar,
    /// <summary>The star appears twice in the star list.</summary>
    DuplicateStar,
    /// <summary>RA or Dec outside its range.</summary>
    PositionOutOfRange,
    /// <summary>The class code is not one we know (see PulsatorClasses).</summary>
    UnknownClass,
    /// <summary>A star-list quantity (ebv, ebv_err, feh) outside its plausible range.</summary>
    ValueOutOfRange,
    /// <summary>More data rows than the row limit; reading stopped.</summary>
    TooManyRows,
    /// <summary>More errors than the error limit; reading stopped.</summary>
    TooManyErrors,
    /// <summary>A per-upload parameter (band or star of a plain-text file) is not valid.</summary>
    BadParameter,
    /// <summary>A name or label holds a control character (U+0000..U+001F, U+007F..U+009F): names must be printable text.</summary>
    ControlCharacter,
}

/// <summary>
/// One problem found while reading an upload: where (file, 1-based line, column name when there is one) and why.
/// Line 0 means the whole file or an upload parameter.
/// </summary>
public sealed record IngestIssue(IngestIssueCode Code, string File, long Line, string? Column, string Message)
{
    /// <summary>"file:line: column: message", the form shown to users.</summary>
    public override string ToString() =>
        Column is null ? $"{File}:{Line}: {Message}" : $"{File}:{Line}: {Column}: {Message}";
}
