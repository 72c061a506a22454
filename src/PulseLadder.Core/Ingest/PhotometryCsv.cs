using System.Text;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>
/// Photometry CSV with a header row. Required columns <c>star, time, band, mag, mag_err</c>; optional
/// <c>observer, flag</c> (see docs/formats.md). Separator (comma, semicolon or tab) detected from the header; RFC 4180
/// quoting within a line; invariant-culture numbers; BOM and CRLF tolerated; blank and '#' lines skipped.
/// Every rejected row is listed in the errors; bad input never throws.
/// </summary>
public static class PhotometryCsv
{
    /// <summary>Stable column names.</summary>
    public const string Star = "star", Time = "time", Band = "band", Mag = "mag", MagErr = "mag_err", Observer = "observer", Flag = "flag";

    internal static readonly string[] Required = [Star, Time, Band, Mag, MagErr];
    internal static readonly string[] Optional = [Observer, Flag];

    /// <summary>Default number of rows per batch handed to a <see cref="RowBatchHandler{T}"/>.</summary>
    public const int DefaultBatchSize = 16 * 1024;

    /// <summary>Parses the whole file, collecting accepted rows in memory.</summary>
    public static ParseResult<PhotometryRow> Parse(TextReader reader, string fileName, PhotometryParseOptions options)
    {
        var rows = new List<PhotometryRow>();
        var summary = Parse(reader, fileName, options, batch => rows.AddRange(batch));
        return new ParseResult<PhotometryRow>(rows, summary);
    }

    /// <summary>Parses a byte stream (UTF-8, or UTF-16/32 with a BOM; invalid bytes become U+FFFD). The stream is left open.</summary>
    public static ParseResult<PhotometryRow> Parse(Stream stream, string fileName, PhotometryParseOptions options)
    {
        using var reader = OpenText(stream);
        return Parse(reader, fileName, options);
    }

    /// <summary>Streams a byte stream (see the TextReader batch overload); the stream is left open. Reads synchronously.</summary>
    public static IngestSummary Parse(Stream stream, string fileName, PhotometryParseOptions options,
        RowBatchHandler<PhotometryRow> onBatch, int batchSize = DefaultBatchSize)
    {
        using var reader = OpenText(stream);
        return Parse(reader, fileName, options, onBatch, batchSize);
    }

    /// <summary>
    /// Streams the file: accepted rows go to <paramref name="onBatch"/> in file order, at most
    /// <paramref name="batchSize"/> at a time, so memory does not grow with the file (apart from the duplicate
    /// index when <see cref="PhotometryParseOptions.RejectDuplicates"/> is on). Returns the errors and counts.
    /// </summary>
    public static IngestSummary Parse(TextReader reader, string fileName, PhotometryParseOptions options,
        RowBatchHandler<PhotometryRow> onBatch, int batchSize = DefaultBatchSize)
    {
        ArgumentNullException.ThrowIfNull(reader);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentNullException.ThrowIfNull(onBatch);
        ArgumentOutOfRangeException.ThrowIfLessThan(batchSize, 1);
        options.Limits.Validate();

        var issues = new IssueCollector(fileName, options.Limits.MaxErrors);
        var table = new CsvTableReader(reader, issues, options.Limits);
        var map = table.ReadHeader(Required, Optional);
        if (map is null) return issues.Summary(0, table.LineNumber);
        int cStar = map[0], cTime = map[1], cBand = map[2], cMag = map[3], cErr = map[4], cObs = map[5], cFlag = map[6];

        var check = new PhotometryRowChecker(options, issues);
        var batch = new PhotometryRow[Math.Min(batchSize, 1 << 20)];
        int inBatch = 0;
        long accepted = 0;
        while (table.NextRecord())
        {
            long line = table.LineNumber;
            // Every field is checked (not just the first bad one) so one pass lists all of a row's problems.
            bool ok = check.TryStar(table.Field(cStar), line, Star, out string star, out int starId);
            ok &= check.TryTime(table.Field(cTime), line, Time, out double time);
            ok &= check.TryBand(table.Field(cBand), line, Band, out string band, out int bandId);
            ok &= check.TryMag(table.Field(cMag), line, Mag, out double mag);
            ok &= check.TryMagErr(table.Field(cErr), line, MagErr, out double err);
            var obsText = table.Field(cObs);
            ok &= FieldParsing.TryPrintable(obsText, issues, line, Observer);
            ok &= FieldParsing.TryPrintable(table.Field(cFlag), issues, line, Flag);
            string observer = obsText.IsEmpty ? check.Symbol(options.DefaultObserver, out int observerId) : check.Symbol(obsText, out observerId);
            var flagText = table.Field(cFlag);
            string? flag = flagText.IsEmpty ? null : check.Pool(flagText);
            if (ok) ok = check.TryUnique(starId, time, bandId, observerId, line);
            if (!ok)
            {
                issues.RejectedRows++;
                continue;
            }
            batch[inBatch++] = new PhotometryRow(star, new Observation(0, time, options.Scale, band, mag, err, observer, flag), line);
            accepted++;
            if (inBatch == batch.Length)
            {
                onBatch(batch);
                inBatch = 0;
            }
        }
        if (inBatch > 0) onBatch(batch.AsSpan(0, inBatch));
        return check.Summary(accepted, table.LineNumber);
    }

    internal static StreamReader OpenText(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        return new StreamReader(stream, new UTF8Encoding(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: false),
            detectEncodingFromByteOrderMarks: true, bufferSize: 64 * 1024, leaveOpen: true);
    }
}
