using System.Globalization;

namespace PulseLadder.Core.Ingest;

/// <summary>Invariant-culture number parsing of one field with the error wording every parser shares.</summary>
internal static class FieldParsing
{
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
        if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out value))
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
}
