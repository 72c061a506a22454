namespace PulseLadder.Core.Ingest;

/// <summary>
/// Header-driven CSV reading shared by the photometry and star-list parsers: finds the header (first line that is
/// neither blank nor a '#' comment), detects the separator, maps column names (case-insensitive, trimmed), then
/// yields data records with their fields addressable by column. Reports structural errors itself.
/// </summary>
internal sealed class CsvTableReader
{
    private const int MaxFields = 1024;

    private readonly LineReader _lines;
    private readonly IssueCollector _issues;
    private readonly IngestLimits _limits;
    private char _separator;
    private int _columnCount;
    private readonly Range[] _fields = new Range[MaxFields];
    private char[] _scratch = new char[256];
    private long _dataRows;

    public CsvTableReader(TextReader reader, IssueCollector issues, IngestLimits limits)
    {
        _lines = new LineReader(reader, limits.MaxLineLength);
        _issues = issues;
        _limits = limits;
    }

    public long LineNumber => _lines.LineNumber;

    /// <summary>
    /// Reads the header. Returns the column index of each name in <paramref name="required"/> then
    /// <paramref name="optional"/> (-1 for an absent optional column), or null after a fatal error.
    /// </summary>
    public int[]? ReadHeader(string[] required, string[] optional)
    {
        ReadOnlySpan<char> line;
        while (true)
        {
            if (!_lines.TryReadLine(out line, out bool tooLong))
            {
                _issues.Fatal(IngestIssueCode.MissingHeader, 0, null, IngestMessages.MissingHeader);
                return null;
            }
            if (tooLong)
            {
                _issues.Fatal(IngestIssueCode.LineTooLong, _lines.LineNumber, null, IngestMessages.LineTooLong(_limits.MaxLineLength));
                return null;
            }
            if (!IsSkippable(line)) break;
        }
        long headerLine = _lines.LineNumber;
        _separator = CsvSplitter.DetectSeparator(line, out bool unbalanced);
        if (unbalanced)
        {
            _issues.Fatal(IngestIssueCode.BadQuoting, headerLine, null, IngestMessages.Quoting(SplitStatus.UnterminatedQuote));
            return null;
        }
        if (_separator == '\0')
        {
            _issues.Fatal(IngestIssueCode.UnknownSeparator, headerLine, null, IngestMessages.UnknownSeparator);
            return null;
        }
        var status = SplitLine(line, out int count);
        if (status != SplitStatus.Ok)
        {
            _issues.Fatal(IngestIssueCode.BadQuoting, headerLine, null, IngestMessages.Quoting(status));
            return null;
        }
        if (count > MaxFields)
        {
            _issues.Fatal(IngestIssueCode.WrongColumnCount, headerLine, null, IngestMessages.TooManyHeaderColumns(MaxFields));
            return null;
        }
        _columnCount = count;
        var map = new int[required.Length + optional.Length];
        Array.Fill(map, -1);
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var reported = new HashSet<string>(StringComparer.Ordinal);
        bool fatal = false;
        for (int i = 0; i < count; i++)
        {
            string name = Field(i).Trim().ToString().ToLowerInvariant();
            if (name.Length == 0)
            {
                // Spreadsheet exports often end the header with empty cells; they name nothing, so they are ignored.
                _issues.Warning(IngestIssueCode.UnknownColumn, headerLine, $"#{i + 1}", IngestMessages.UnnamedColumn(i + 1));
                continue;
            }
            if (!seen.Add(name))
            {
                // Once per name and within the error limit: a hostile header must not list thousands of errors.
                if (reported.Add(name)) _issues.Error(IngestIssueCode.DuplicateColumn, headerLine, name, IngestMessages.DuplicateColumn(name));
                fatal = true;
                continue;
            }
            int r = Array.IndexOf(required, name);
            int o = Array.IndexOf(optional, name);
            if (r >= 0) map[r] = i;
            else if (o >= 0) map[required.Length + o] = i;
            else _issues.Warning(IngestIssueCode.UnknownColumn, headerLine, name, IngestMessages.UnknownColumn(name));
        }
        for (int r = 0; r < required.Length; r++)
        {
            if (map[r] < 0)
            {
                _issues.Fatal(IngestIssueCode.MissingColumn, headerLine, required[r], IngestMessages.MissingColumn(required[r], required));
                fatal = true;
            }
        }
        if (fatal) _issues.Stopped = true;
        return fatal ? null : map;
    }

    /// <summary>
    /// Advances to the next data record with the header's field count. Structural problems (too long, bad quoting,
    /// wrong field count) are reported and the line skipped. False at the end of input or when reading must stop.
    /// </summary>
    public bool NextRecord()
    {
        while (!_issues.Stopped)
        {
            if (!_lines.TryReadLine(out var line, out bool tooLong)) return false;
            long n = _lines.LineNumber;
            if (!tooLong && IsSkippable(line)) continue;
            if (++_dataRows > _limits.MaxRows)
            {
                _issues.Fatal(IngestIssueCode.TooManyRows, n, null, IngestMessages.TooManyRows(_limits.MaxRows));
                return false;
            }
            if (tooLong)
            {
                Reject(IngestIssueCode.LineTooLong, n, null, IngestMessages.LineTooLong(_limits.MaxLineLength));
                continue;
            }
            var status = SplitLine(line, out int count);
            if (status != SplitStatus.Ok)
            {
                Reject(IngestIssueCode.BadQuoting, n, null, IngestMessages.Quoting(status));
                continue;
            }
            if (count != _columnCount)
            {
                Reject(IngestIssueCode.WrongColumnCount, n, null, IngestMessages.WrongColumnCount(_columnCount, count));
                continue;
            }
            return true;
        }
        return false;
    }

    /// <summary>Field <paramref name="index"/> of the current record (already unquoted and trimmed of spaces); empty for index -1.</summary>
    public ReadOnlySpan<char> Field(int index) =>
        index < 0 ? ReadOnlySpan<char>.Empty : _scratch.AsSpan(_fields[index]);

    private void Reject(IngestIssueCode code, long line, string? column, string message)
    {
        _issues.Error(code, line, column, message);
        _issues.RejectedRows++;
    }

    private SplitStatus SplitLine(ReadOnlySpan<char> line, out int count)
    {
        if (_scratch.Length < line.Length) _scratch = new char[Math.Max(line.Length, _scratch.Length * 2)];
        return CsvSplitter.Split(line, _separator, _scratch, _fields, out count);
    }

    internal static bool IsSkippable(ReadOnlySpan<char> line)
    {
        var t = line.TrimStart();
        return t.IsEmpty || t[0] == '#';
    }
}
