using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>The checks every photometry row passes, whatever the file format it came from.</summary>
internal sealed class PhotometryRowChecker
{
    private readonly PhotometryParseOptions _options;
    private readonly IssueCollector _issues;
    private readonly StringPool _strings = new();
    private readonly SymbolTable _symbols = new();
    private readonly Dictionary<string, string?> _bands = new(StringComparer.Ordinal);
    private readonly Dictionary<string, string?>.AlternateLookup<ReadOnlySpan<char>> _bandLookup;
    private readonly DuplicateIndex? _seen;

    public PhotometryRowChecker(PhotometryParseOptions options, IssueCollector issues)
    {
        _options = options;
        _issues = issues;
        _bandLookup = _bands.GetAlternateLookup<ReadOnlySpan<char>>();
        if (!options.RejectDuplicates) return;
        if (options.FullyIndexedGroups is not { } full) _seen = new DuplicateIndex();
        else
        {
            // Symbol ids are handed out before the duplicate check, so the texts of a new group are known here.
            _seen = new DuplicateIndex((star, band, observer) =>
                full.Count > 0 && full.Contains(new DuplicateGroup(_symbols.Text(star), _symbols.Text(band), _symbols.Text(observer))));
        }
    }

    /// <summary>The summary of the reading, with the groups that went back in time unindexed.</summary>
    public IngestSummary Summary(long accepted, long linesRead)
    {
        var summary = _issues.Summary(accepted, linesRead);
        if (_seen is null || _seen.OutOfOrder.Count == 0) return summary;
        return summary with
        {
            OutOfOrderGroups = _seen.OutOfOrder.Select(g => new DuplicateGroup(_symbols.Text(g.Star), _symbols.Text(g.Band), _symbols.Text(g.Observer))).ToArray(),
        };
    }

    /// <summary>Free text (flags): one instance per distinct text up to the pool's cap.</summary>
    public string Pool(ReadOnlySpan<char> text) => _strings.Get(text);

    /// <summary>Identifying text (observer, plain-text star and band): interned with an id for the duplicate index.</summary>
    public string Symbol(ReadOnlySpan<char> text, out int id) => _symbols.Intern(text, out id);

    public string Symbol(string text, out int id) => _symbols.Intern(text, out id);

    /// <summary>Star name check (non-empty and, when a star list is given, listed). Records the error.</summary>
    public bool TryStar(ReadOnlySpan<char> text, long line, string column, out string star, out int starId)
    {
        star = string.Empty;
        starId = -1;
        if (text.IsEmpty)
        {
            _issues.Error(IngestIssueCode.EmptyField, line, column, IngestMessages.EmptyField);
            return false;
        }
        if (!FieldParsing.TryPrintable(text, _issues, line, column)) return false;
        star = _symbols.Intern(text, out starId);
        if (_options.KnownStars is { } known && !IsKnown(known, star, starId))
        {
            _issues.Error(IngestIssueCode.UnknownStar, line, column, IngestMessages.UnknownStar(star));
            return false;
        }
        return true;
    }

    // Star-list membership per symbol id (0 unknown yet, 1 listed, 2 not listed): one set lookup per distinct star.
    private byte[] _known = new byte[256];

    private bool IsKnown(IReadOnlySet<string> known, string star, int id)
    {
        if (id >= _known.Length) Array.Resize(ref _known, Math.Max(id + 1, _known.Length * 2));
        if (_known[id] == 0) _known[id] = known.Contains(star) ? (byte)1 : (byte)2;
        return _known[id] == 1;
    }

    public bool TryBand(ReadOnlySpan<char> text, long line, string column, out string band, out int bandId)
    {
        band = string.Empty;
        bandId = -1;
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
        band = _symbols.Intern(normalised, out bandId);
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

    /// <summary>Duplicate check on (star, time, band, observer) ids, run last (only on rows whose fields are all valid).</summary>
    public bool TryUnique(int starId, double time, int bandId, int observerId, long line)
    {
        if (_seen is null || _seen.TryAdd(starId, bandId, observerId, time, line, out long first)) return true;
        _issues.Error(IngestIssueCode.DuplicateRow, line, null, IngestMessages.DuplicateRow(first));
        return false;
    }
}
