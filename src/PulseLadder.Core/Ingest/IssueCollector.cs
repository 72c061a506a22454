namespace PulseLadder.Core.Ingest;

/// <summary>Collects errors and warnings of one file and enforces the error limit.</summary>
internal sealed class IssueCollector(string file, int maxErrors)
{
    private readonly List<IngestIssue> _errors = [];
    private readonly List<IngestIssue> _warnings = [];

    public string File { get; } = file;

    /// <summary>Set when the error limit was passed; the caller stops reading.</summary>
    public bool Stopped { get; set; }

    public long RejectedRows { get; set; }

    public void Error(IngestIssueCode code, long line, string? column, string message)
    {
        if (Stopped) return;
        if (_errors.Count >= maxErrors)
        {
            _errors.Add(new IngestIssue(IngestIssueCode.TooManyErrors, File, line, null, IngestMessages.TooManyErrors(maxErrors, line)));
            Stopped = true;
            return;
        }
        _errors.Add(new IngestIssue(code, File, line, column, message));
    }

    /// <summary>A fatal error: recorded (even past the limit) and reading stops.</summary>
    public void Fatal(IngestIssueCode code, long line, string? column, string message)
    {
        _errors.Add(new IngestIssue(code, File, line, column, message));
        Stopped = true;
    }

    public void Warning(IngestIssueCode code, long line, string? column, string message) =>
        _warnings.Add(new IngestIssue(code, File, line, column, message));

    public IngestSummary Summary(long accepted, long linesRead) =>
        new(_errors.ToArray(), _warnings.ToArray(), accepted, RejectedRows, linesRead, Stopped);
}
