using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>
/// Plain three-column photometry (time, mag, mag_err; whitespace separated; no header; '#' comments and blank lines
/// skipped), one star and one band per file, both given by the uploader (OGLE light-curve files look like this:
/// "2165.85632 14.401 0.006"). Rows pass the same checks as <see cref="PhotometryCsv"/>; errors name the columns
/// time, mag and mag_err.
/// </summary>
public static class PlainTextPhotometry
{
    /// <summary>Parses the whole file, collecting accepted rows in memory.</summary>
    public static ParseResult<PhotometryRow> Parse(TextReader reader, string fileName, string star, string band, PhotometryParseOptions options)
    {
        var rows = new List<PhotometryRow>();
        var summary = Parse(reader, fileName, star, band, options, batch => rows.AddRange(batch));
        return new ParseResult<PhotometryRow>(rows, summary);
    }

    /// <summary>Parses a byte stream (UTF-8 or BOM-marked); the stream is left open.</summary>
    public static ParseResult<PhotometryRow> Parse(Stream stream, string fileName, string star, string band, PhotometryParseOptions options)
    {
        using var reader = PhotometryCsv.OpenText(stream);
        return Parse(reader, fileName, star, band, options);
    }

    /// <summary>Streams a byte stream (see the TextReader batch overload); the stream is left open. Reads synchronously.</summary>
    public static IngestSummary Parse(Stream stream, string fileName, string star, string band, PhotometryParseOptions options,
        RowBatchHandler<PhotometryRow> onBatch, int batchSize = PhotometryCsv.DefaultBatchSize)
    {
        using var reader = PhotometryCsv.OpenText(stream);
        return Parse(reader, fileName, star, band, options, onBatch, batchSize);
    }

    /// <summary>Streams accepted rows to <paramref name="onBatch"/> (see <see cref="PhotometryCsv"/>'s batch overload).</summary>
    public static IngestSummary Parse(TextReader reader, string fileName, string star, string band, PhotometryParseOptions options,
        RowBatchHandler<PhotometryRow> onBatch, int batchSize = PhotometryCsv.DefaultBatchSize)
    {
        ArgumentNullException.ThrowIfNull(reader);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentNullException.ThrowIfNull(onBatch);
        ArgumentOutOfRangeException.ThrowIfLessThan(batchSize, 1);
        options.Limits.Validate();

        var issues = new IssueCollector(fileName, options.Limits.MaxErrors);
        var check = new PhotometryRowChecker(options, issues);
        string starName = (star ?? string.Empty).Trim();
        if (starName.Length == 0)
            issues.Fatal(IngestIssueCode.BadParameter, 0, PhotometryCsv.Star, IngestMessages.EmptyStarParameter);
        else if (FieldParsing.IndexOfControl(starName) is var ci and >= 0)
            issues.Fatal(IngestIssueCode.BadParameter, 0, PhotometryCsv.Star, "star " + IngestMessages.ControlCharacter(starName[ci], ci + 1));
        else if (options.KnownStars is { } known && !known.Contains(starName))
            issues.Fatal(IngestIssueCode.UnknownStar, 0, PhotometryCsv.Star, IngestMessages.UnknownStar(starName));
        if (!Bands.TryNormalize(band, out string bandName))
            issues.Fatal(IngestIssueCode.BadParameter, 0, PhotometryCsv.Band, IngestMessages.BadBandParameter(band ?? string.Empty));
        if (FieldParsing.IndexOfControl(options.DefaultObserver) is var oi and >= 0)
            issues.Fatal(IngestIssueCode.BadParameter, 0, PhotometryCsv.Observer, "observer " + IngestMessages.ControlCharacter(options.DefaultObserver[oi], oi + 1));
        if (issues.Stopped) return issues.Summary(0, 0);

        check.Symbol(starName, out int starId);
        check.Symbol(bandName, out int bandId);
        string observer = check.Symbol(options.DefaultObserver, out int observerId);
        var lines = new LineReader(reader, options.Limits.MaxLineLength);
        var batch = new PhotometryRow[Math.Min(batchSize, 1 << 20)];
        int inBatch = 0;
        long accepted = 0, dataRows = 0;
        Span<Range> tokens = stackalloc Range[4];
        while (!issues.Stopped && lines.TryReadLine(out var text, out bool tooLong))
        {
            long line = lines.LineNumber;
            if (!tooLong && CsvTableReader.IsSkippable(text)) continue;
            if (++dataRows > options.Limits.MaxRows)
            {
                issues.Fatal(IngestIssueCode.TooManyRows, line, null, IngestMessages.TooManyRows(options.Limits.MaxRows));
                break;
            }
            if (tooLong)
            {
                issues.Error(IngestIssueCode.LineTooLong, line, null, IngestMessages.LineTooLong(options.Limits.MaxLineLength));
                issues.RejectedRows++;
                continue;
            }
            int count = SplitWhitespace(text, tokens);
            if (count != 3)
            {
                issues.Error(IngestIssueCode.WrongColumnCount, line, null, IngestMessages.WrongColumnCount(3, count));
                issues.RejectedRows++;
                continue;
            }
            bool ok = check.TryTime(text[tokens[0]], line, PhotometryCsv.Time, out double time);
            ok &= check.TryMag(text[tokens[1]], line, PhotometryCsv.Mag, out double mag);
            ok &= check.TryMagErr(text[tokens[2]], line, PhotometryCsv.MagErr, out double err);
            if (ok) ok = check.TryUnique(starId, time, bandId, observerId, line);
            if (!ok)
            {
                issues.RejectedRows++;
                continue;
            }
            batch[inBatch++] = new PhotometryRow(starName,
                new Observation(0, time, options.Scale, bandName, mag, err, observer, null), line);
            accepted++;
            if (inBatch == batch.Length)
            {
                onBatch(batch);
                inBatch = 0;
            }
        }
        if (inBatch > 0) onBatch(batch.AsSpan(0, inBatch));
        return check.Summary(accepted, lines.LineNumber);
    }

    /// <summary>Splits on runs of spaces and tabs; returns the token count (which may exceed the span's capacity).</summary>
    private static int SplitWhitespace(ReadOnlySpan<char> text, Span<Range> tokens)
    {
        int count = 0, i = 0;
        while (true)
        {
            while (i < text.Length && (text[i] == ' ' || text[i] == '\t')) i++;
            if (i >= text.Length) return count;
            int start = i;
            while (i < text.Length && text[i] != ' ' && text[i] != '\t') i++;
            if (count < tokens.Length) tokens[count] = new Range(start, i);
            count++;
        }
    }
}
