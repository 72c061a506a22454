using System.Globalization;

namespace PulseLadder.Core.Ingest;

/// <summary>Invariant-culture number parsing of one field with the error wording every parser shares.</summary>
internal static class FieldParsing
{
    /// <summary>
    /// True when a name or label has no control character. Names travel into XML exports (which cannot carry most
    /// C0 characters at all), file names, terminals and pages, so they are refused at the edge instead of escaped
    /// everywhere; records the error otherwise.
    /// </summary>
    public static bool TryPrintable(ReadOnlySpan<char> text, IssueCollector issues, long line, string column)
    {
        int i = IndexOfControl(text);
        if (i < 0) return true;
        issues.Error(IngestIssueCode.ControlCharacter, line, column, IngestMessages.ControlCharacter(text[i], i + 1));
        return false;
    }

    /// <summary>Index of the first control character (Unicode category Cc), or -1.</summary>
    public static int IndexOfControl(ReadOnlySpan<char> text)
    {
        for (int i = 0; i < text.Length; i++)
            if (char.IsControl(text[i])) return i;
        return -1;
    }

    /// <summary>Parses a required finite number; on failure records the error and returns false.</summary>
    public static bool TryRequired(ReadOnlySpan<char> text, IssueCollector issues, long line, string column, out double value)
    {
        value = 0;
        if (text.IsEmpty)
        {
            issues.Error(IngestIssueCode.EmptyField, line, column, IngestMessages.EmptyField);
            return false;
        }
        return TryNumber(text, issues, line, column, out value);
    }

    /// <summary>Parses an optional finite number (empty gives null); on failure records the error and returns false.</summary>
    public static bool TryOptional(ReadOnlySpan<char> text, IssueCollector issues, long line, string column, out double? value)
    {
        value = null;
        if (text.IsEmpty) return true;
        if (!TryNumber(text, issues, line, column, out double v)) return false;
        value = v;
        return true;
    }

    private static bool TryNumber(ReadOnlySpan<char> text, IssueCollector issues, long line, string column, out double value)
    {
        // NumberStyles.Float: sign, decimal point and exponent; no thousands separator, so "12,5" never becomes 125.
        if (!TryParsePlainDecimal(text, out value) && !double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out value))
        {
            issues.Error(IngestIssueCode.NotANumber, line, column, IngestMessages.NotANumber(text));
            return false;
        }
        if (!double.IsFinite(value))
        {
            issues.Error(IngestIssueCode.NotFinite, line, column, IngestMessages.NotFinite);
            return false;
        }
        return true;
    }

    private static readonly double[] PowersOfTen =
    [
        1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
    ];

    /// <summary>
    /// Fast path for the common "[-+]digits[.digits]" form with at most 15 significant digits: the digits form an
    /// integer below 2^53 and the power of ten is exact, so one IEEE division gives the correctly rounded value, the
    /// same double double.Parse returns (Clinger 1990). Anything else (exponent, more digits, NaN...) returns false and
    /// goes to double.TryParse.
    /// </summary>
    internal static bool TryParsePlainDecimal(ReadOnlySpan<char> text, out double value)
    {
        value = 0;
        int i = 0;
        bool negative = false;
        if (text.Length > 0 && (text[0] == '-' || text[0] == '+'))
        {
            negative = text[0] == '-';
            i = 1;
        }
        long mantissa = 0;
        int digits = 0, fractionDigits = 0;
        bool seenPoint = false, any = false;
        for (; i < text.Length; i++)
        {
            char c = text[i];
            if ((uint)(c - '0') <= 9)
            {
                any = true;
                if (mantissa == 0 && c == '0')
                {
                    if (seenPoint) fractionDigits++;
                    continue;
                }
                if (++digits > 15) return false;
                mantissa = mantissa * 10 + (c - '0');
                if (seenPoint) fractionDigits++;
            }
            else if (c == '.' && !seenPoint) seenPoint = true;
            else return false;
        }
        if (!any || fractionDigits >= PowersOfTen.Length) return false;
        double v = fractionDigits == 0 ? mantissa : mantissa / PowersOfTen[fractionDigits];
        value = negative ? -v : v;
        return true;
    }
}
