using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>The checks every photometry row passes, whatever the file format it came from.</summary>
internal sealed class PhotometryRowChecker
{
    private readonly PhotometryParseOptions _options;
    private readonly IssueCollector _issues;
    private readonly StringPool _strings = new();
    private readonly Dictionary<string, string?> _bands = new(StringComparer.Ordinal);
    private readonly Dictionary<string, string?>.AlternateLookup<ReadOnlySpan<char>> _bandLookup;
    private readonly Dictionary<RowKey, long>? _seen;

    public PhotometryRowChecker(PhotometryParseOptions options, IssueCollector issues)
    {
        _options = options;
        _issues = issues;
        _bandLookup = _bands.GetAlternateLookup<ReadOnlySpan<char>>();
        if (options.RejectDuplicates) _seen = [];
    }

    public string Pool(ReadOnlySpan<char> text) => _strings.Get(text);

    /// <summary>Star name check (non-empty and, when a star list is given, listed). Records the error.</summary>
    public bool TryStar(ReadOnlySpan<char> text, long line, string column, out string star)
    {
        star = string.Empty;
        if (text.IsEmpty)
        {
            _issues.Error(IngestIssueCode.EmptyField, line, column, IngestMessages.EmptyField);
            return false;
        }
        star = _strings.Get(text);
        if (_options.KnownStars is { } known && !known.Contains(star))
        {
            _issues.Error(IngestIssueCode.UnknownStar, line, column, IngestMessages.UnknownStar(star));
            return false;
        }
        return true;
    }

    public bool TryBand(ReadOnlySpan<char> text, long line, string column, out string band)
    {
        band = string.Empty;
        if (text.IsEmpty)
        {
            _issues.Error(IngestIssueCode.EmptyField, line, column, IngestMessages.EmptyField);
            return false;
        }
        if (!_bandLookup.TryGetValue(text, out string? normalised))
        {
            string raw = text.ToString();
            normalised = Bands.TryNormalize(raw, out var b) ? b : null;
            if (_bands.Count < 1000) _bands[raw] = normalised;
        }
        if (normalised is null)
        {
            _issues.Error(IngestIssueCode.UnknownBand, line, column, IngestMessages.UnknownBand(text));
            return false;
        }
        band = normalised;
        return true;
    }

    public bool TryTime(ReadOnlySpan<char> text, long line, string column, out double time)
    {
        time = 0;
        if (!FieldParsing.TryRequired(text, _issues, line, column, out double value)) return false;
        time = value + _options.TimeOffset;
        double jd = _options.Scale.ToFullJulianDay(time);
        if (!(jd >= Photometry.TimeScales.MinPlausibleJd && jd <= Photometry.TimeScales.MaxPlausibleJd))
        {
            _issues.Error(IngestIssueCode.TimeOutOfRange, line, column,
                IngestMessages.TimeOutOfRange(value, _options.TimeOffset, _options.Scale, jd));
            return false;
        }
        return true;
    }

    public bool TryMag(ReadOnlySpan<char> text, long line, string column, out double mag)
    {
        if (!FieldParsing.TryRequired(text, _issues, line, column, out mag)) return false;
        if (mag < PhotometryParseOptions.MinMag || mag > PhotometryParseOptions.MaxMag)
        {
            _issues.Error(IngestIssueCode.MagnitudeOutOfRange, line, column,
                IngestMessages.MagnitudeOutOfRange(mag, PhotometryParseOptions.MinMag, PhotometryParseOptions.MaxMag));
            return false;
        }
        return true;
    }

    public bool TryMagErr(ReadOnlySpan<char> text, long line, string column, out double err)
    {
        if (!FieldParsing.TryRequired(text, _issues, line, column, out err)) return false;
        if (err <= 0)
        {
            _issues.Error(IngestIssueCode.ErrorNotPositive, line, column, IngestMessages.ErrorNotPositive);
            return false;
        }
        if (err > PhotometryParseOptions.MaxMagErr)
        {
            _issues.Error(IngestIssueCode.ErrorTooLarge, line, column, IngestMessages.ErrorTooLarge(err, PhotometryParseOptions.MaxMagErr));
            return false;
        }
        return true;
    }

    /// <summary>Duplicate check, run last (only on rows whose fields are all valid).</summary>
    public bool TryUnique(string star, double time, string band, string observer, long line)
    {
        if (_seen is null) return true;
        var key = new RowKey(star, time, band, observer);
        if (_seen.TryGetValue(key, out long first))
        {
            _issues.Error(IngestIssueCode.DuplicateRow, line, null, IngestMessages.DuplicateRow(first));
            return false;
        }
        _seen.Add(key, line);
        return true;
    }

    private readonly record struct RowKey(string Star, double Time, string Band, string Observer);
}
