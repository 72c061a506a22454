namespace PulseLadder.Core.Ingest;

/// <summary>What reading one file found, apart from the accepted rows themselves.</summary>
/// <param name="Errors">Rejected rows and file-level errors, in file order. Empty means the file is clean.</param>
/// <param name="Warnings">Things worth telling the uploader that do not reject anything (unknown columns).</param>
/// <param name="AcceptedRows">Rows that passed every check.</param>
/// <param name="RejectedRows">Data rows refused (one row may carry several errors).</param>
/// <param name="LinesRead">Physical lines read, including header, blank and comment lines.</param>
/// <param name="Stopped">True when reading stopped before the end of the file (fatal header error or a limit).</param>
public sealed record IngestSummary(
    IReadOnlyList<IngestIssue> Errors,
    IReadOnlyList<IngestIssue> Warnings,
    long AcceptedRows,
    long RejectedRows,
    long LinesRead,
    bool Stopped)
{
    /// <summary>True when nothing was rejected and the whole file was read.</summary>
    public bool IsSuccess => Errors.Count == 0 && !Stopped;

    /// <summary>
    /// Groups whose times went back without a full duplicate index (only when
    /// <see cref="PhotometryParseOptions.FullyIndexedGroups"/> is set): their later rows were not checked for
    /// duplicates, so this reading is incomplete and must be repeated with them fully indexed. Empty otherwise.
    /// </summary>
    public IReadOnlyList<DuplicateGroup> OutOfOrderGroups { get; init; } = [];
}

/// <summary>Accepted rows plus the <see cref="IngestSummary"/> of one file. Expected failures live in Errors; parsers do not throw on bad input.</summary>
public sealed record ParseResult<T>(IReadOnlyList<T> Rows, IngestSummary Summary)
{
    public IReadOnlyList<IngestIssue> Errors => Summary.Errors;
    public IReadOnlyList<IngestIssue> Warnings => Summary.Warnings;
    public bool IsSuccess => Summary.IsSuccess;
}

/// <summary>Receives accepted rows in batches while a file is read (the span is only valid during the call).</summary>
public delegate void RowBatchHandler<T>(ReadOnlySpan<T> batch);
