using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Web;

/// <summary>A file as received: name and bytes.</summary>
public sealed record IncomingFile(string FileName, byte[] Content);

/// <summary>A file of a streamed upload, spooled to disk while its SHA-256 was computed.</summary>
public sealed record SpooledFile(string FileName, string Path, string Sha256, long Length);

/// <summary>
/// Outcome of reading a spooled photometry file without keeping its rows: errors and counts, the first rows for the
/// preview, and what is needed to read it again for storing.
/// </summary>
public sealed record ValidatedPhotometry(SpooledFile File, string Format, IReadOnlyList<string> Columns, IngestSummary Summary, IReadOnlyList<PhotometryRow> Preview)
{
    /// <summary>Every accepted row of the validating reading, when it was asked to keep them (small uploads); null otherwise.</summary>
    public IReadOnlyList<PhotometryRow>? Rows { get; init; }
}

/// <summary>Parsed photometry of one file, or its errors.</summary>
public sealed record ParsedPhotometry(string FileName, string Sha256, string Format, IReadOnlyList<string> Columns, ParseResult<PhotometryRow> Result);

/// <summary>Reads uploaded files with the Core parsers; shared by the upload endpoint and the offline CLI.</summary>
public static class UploadParsing
{
    /// <summary>
    /// "csv" when the first data line has letters (a header), "plain" for three numeric columns. Never guesses the
    /// time scale: that is always declared.
    /// </summary>
    public static string DetectFormat(byte[] content) => DetectFormat(new MemoryStream(content));

    /// <summary>Same as <see cref="DetectFormat(byte[])"/> on the start of a stream (read from its current position; left open).</summary>
    public static string DetectFormat(Stream content)
    {
        using var r = new StreamReader(content, detectEncodingFromByteOrderMarks: true, leaveOpen: true);
        for (int i = 0; i < 1000 && r.ReadLine() is { } line; i++)
        {
            var t = line.Trim();
            if (t.Length == 0 || t[0] == '#') continue;
            var parts = t.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            bool numeric = parts.Length >= 3 && parts.Take(3).All(p => double.TryParse(p, System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out _));
            return numeric ? "plain" : "csv";
        }
        return "csv";
    }

    public static IReadOnlyList<string> HeaderColumns(byte[] content) => HeaderColumns(new MemoryStream(content));

    /// <summary>Column names of the first non-comment line of a stream (read from its current position; left open).</summary>
    public static IReadOnlyList<string> HeaderColumns(Stream content)
    {
        using var r = new StreamReader(content, detectEncodingFromByteOrderMarks: true, leaveOpen: true);
        for (int i = 0; i < 1000 && r.ReadLine() is { } line; i++)
        {
            var t = line.Trim();
            if (t.Length == 0 || t[0] == '#') continue;
            return CsvHeader.Columns(t);
        }
        return [];
    }

    public static ParsedPhotometry ReadPhotometry(IncomingFile f, TimeScale scale, double offset, IReadOnlySet<string>? knownStars,
        string? star, string? band, string? observer, int maxRows)
    {
        string format = DetectFormat(f.Content);
        var options = Options(scale, offset, knownStars, observer, maxRows);
        using var stream = new MemoryStream(f.Content);
        var result = format == "plain"
            ? PlainTextPhotometry.Parse(stream, f.FileName, star ?? "", band ?? "", options)
            : PhotometryCsv.Parse(stream, f.FileName, options);
        var columns = format == "plain" ? (IReadOnlyList<string>)["time", "mag", "mag_err"] : HeaderColumns(f.Content);
        return new ParsedPhotometry(f.FileName, ContentHash.Sha256Hex(f.Content), format, columns, result);
    }

    private static PhotometryParseOptions Options(TimeScale scale, double offset, IReadOnlySet<string>? knownStars, string? observer, int maxRows) =>
        new(scale, offset)
        {
            KnownStars = knownStars,
            DefaultObserver = observer?.Trim() ?? "",
            Limits = IngestLimits.Default with { MaxRows = maxRows },
        };

    /// <summary>
    /// Reads a spooled photometry file with the same checks as <see cref="ReadPhotometry"/> but keeps only the first
    /// <paramref name="previewRows"/> accepted rows. Memory does not grow with the file: the duplicate check keeps the
    /// latest time of each (star, band, observer) group, which is exact while a group's times strictly increase; when
    /// some groups go back in time the file is read again with a full index for those groups only (memory then grows
    /// with their rows), until a reading finds no new such group. The summary returned is that of the last reading.
    /// </summary>
    /// <param name="keepRows">Keep every accepted row (<see cref="ValidatedPhotometry.Rows"/>) so storing needs no second
    /// reading; for files small enough that their rows fit the memory budget (the caller decides by file size).</param>
    public static ValidatedPhotometry ValidatePhotometry(SpooledFile f, TimeScale scale, double offset, IReadOnlySet<string>? knownStars,
        string? star, string? band, string? observer, int maxRows, int previewRows = 10, bool keepRows = false)
    {
        string format;
        IReadOnlyList<string> columns;
        using (var head = File.OpenRead(f.Path))
        {
            format = DetectFormat(head);
            head.Position = 0;
            columns = format == "plain" ? ["time", "mag", "mag_err"] : HeaderColumns(head);
        }
        var preview = new List<PhotometryRow>(previewRows);
        var fullyIndexed = new HashSet<DuplicateGroup>();
        List<PhotometryRow>? rows = keepRows ? [] : null;
        while (true)
        {
            preview.Clear();
            rows?.Clear();
            var options = Options(scale, offset, knownStars, observer, maxRows) with { FullyIndexedGroups = fullyIndexed };
            var summary = Stream(f, format, options, star, band, batch =>
            {
                for (int i = 0; i < batch.Length && preview.Count < previewRows; i++) preview.Add(batch[i]);
                rows?.AddRange(batch);
            });
            // A fully indexed group is never listed, so each new reading indexes more groups: this ends.
            if (summary.OutOfOrderGroups.Count == 0)
                return new ValidatedPhotometry(f, format, columns, summary, preview) { Rows = summary.IsSuccess ? rows : null };
            fullyIndexed.UnionWith(summary.OutOfOrderGroups);
        }
    }

    /// <summary>
    /// Reads a validated spooled file again, pushing its accepted rows in batches (for storing). Only for a file whose
    /// validation found no error, with the same arguments: the duplicate check is skipped (the spooled bytes are the
    /// ones validated, and a clean validation rejected no row as a duplicate, so every row passing the other checks
    /// is accepted either way; the store compares the row count with the validated one).
    /// </summary>
    public static IngestSummary StreamPhotometry(ValidatedPhotometry v, TimeScale scale, double offset, IReadOnlySet<string>? knownStars,
        string? star, string? band, string? observer, int maxRows, RowBatchHandler<PhotometryRow> onBatch)
    {
        if (!v.Summary.IsSuccess) throw new InvalidOperationException($"File '{v.File.FileName}' did not validate; it cannot be stored.");
        if (v.Rows is { } kept)
        {
            // The validating reading kept its rows: hand them over in the parser's batch size instead of reading again.
            var all = kept is List<PhotometryRow> list ? System.Runtime.InteropServices.CollectionsMarshal.AsSpan(list) : kept.ToArray();
            for (int i = 0; i < all.Length; i += StoreBatchRows) onBatch(all.Slice(i, Math.Min(StoreBatchRows, all.Length - i)));
            return v.Summary;
        }
        var options = Options(scale, offset, knownStars, observer, maxRows) with { RejectDuplicates = false };
        return Stream(v.File, v.Format, options, star, band, onBatch);
    }

    /// <summary>Rows per batch when kept rows are handed to the store.</summary>
    private const int StoreBatchRows = 4096;

    private static IngestSummary Stream(SpooledFile f, string format, PhotometryParseOptions options, string? star, string? band,
        RowBatchHandler<PhotometryRow> onBatch)
    {
        using var stream = new FileStream(f.Path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan);
        return format == "plain"
            ? PlainTextPhotometry.Parse(stream, f.FileName, star ?? "", band ?? "", options, onBatch)
            : PhotometryCsv.Parse(stream, f.FileName, options, onBatch);
    }

    public static (string Sha256, ParseResult<StarInfo> Result) ReadStars(IncomingFile f)
    {
        using var stream = new MemoryStream(f.Content);
        return (ContentHash.Sha256Hex(f.Content), StarListCsv.Parse(stream, f.FileName));
    }

    /// <summary>Reads a spooled star list (star lists are small: their rows are kept).</summary>
    public static ParseResult<StarInfo> ReadStars(SpooledFile f)
    {
        using var stream = File.OpenRead(f.Path);
        return StarListCsv.Parse(stream, f.FileName);
    }
}

/// <summary>
/// The files of one streamed multipart upload, spooled to a private temporary folder (deleted on dispose), each with
/// its SHA-256 computed while it was written. Small form fields are kept as text.
/// </summary>
public sealed class UploadSpool : IDisposable
{
    /// <summary>Longest form field value read (a field is a short parameter such as time_scale).</summary>
    public const int MaxFieldLength = 64 * 1024;

    private readonly string _dir = Path.Combine(Path.GetTempPath(), "pulseladder-upload-" + Guid.NewGuid().ToString("N"));
    private readonly List<(string Name, SpooledFile File)> _files = [];

    /// <summary>Spooled files in the order received, with their form field names.</summary>
    public IReadOnlyList<(string Name, SpooledFile File)> Files => _files;

    /// <summary>
    /// Reads every section of the multipart <paramref name="body"/>: files to disk, fields into <paramref name="fields"/>
    /// (first value wins). Returns a message naming the limit when more than <paramref name="maxBytes"/> bytes of
    /// files arrive, else null. Malformed multipart data throws <see cref="InvalidDataException"/>.
    /// </summary>
    private const int SpoolBufferBytes = 1 << 16;

    public async Task<string?> ReadAsync(Stream body, string boundary, Dictionary<string, string> fields, long maxBytes, CancellationToken ct)
    {
        // A 64 KiB boundary-scanning buffer (the default is 4 KiB): a 30 MB photometry file then arrives in a few
        // hundred reads instead of thousands.
        var reader = new Microsoft.AspNetCore.WebUtilities.MultipartReader(boundary, body, SpoolBufferBytes);
        long total = 0;
        byte[] buffer = System.Buffers.ArrayPool<byte>.Shared.Rent(1 << 16);
        try
        {
            while (await reader.ReadNextSectionAsync(ct) is { } section)
            {
                if (!Microsoft.Net.Http.Headers.ContentDispositionHeaderValue.TryParse(section.ContentDisposition, out var cd)) continue;
                string name = Microsoft.Net.Http.Headers.HeaderUtilities.RemoveQuotes(cd.Name).Value ?? "";
                bool isFile = !Microsoft.Extensions.Primitives.StringSegment.IsNullOrEmpty(cd.FileName)
                    || !Microsoft.Extensions.Primitives.StringSegment.IsNullOrEmpty(cd.FileNameStar);
                if (!isFile)
                {
                    using var sr = new StreamReader(section.Body, System.Text.Encoding.UTF8, true, 4096, leaveOpen: true);
                    var chars = new char[MaxFieldLength];
                    int n = await sr.ReadBlockAsync(chars.AsMemory(), ct);
                    fields.TryAdd(name, new string(chars, 0, n));
                    continue;
                }
                Directory.CreateDirectory(_dir);
                string raw = Microsoft.Net.Http.Headers.HeaderUtilities.RemoveQuotes(
                    Microsoft.Extensions.Primitives.StringSegment.IsNullOrEmpty(cd.FileNameStar) ? cd.FileName : cd.FileNameStar).Value ?? "";
                string fileName = Path.GetFileName(raw);
                string path = Path.Combine(_dir, _files.Count.ToString(System.Globalization.CultureInfo.InvariantCulture));
                using var hash = System.Security.Cryptography.IncrementalHash.CreateHash(System.Security.Cryptography.HashAlgorithmName.SHA256);
                long length = 0;
                // Whole buffers are hashed and written, synchronously: a write into the page cache is a copy, and an
                // asynchronous file write per network read cost more than the copy (measured, docs/PERFORMANCE.md).
                using (var fs = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 0))
                {
                    int filled = 0, read;
                    do
                    {
                        read = await section.Body.ReadAsync(buffer.AsMemory(filled), ct);
                        filled += read;
                        total += read;
                        length += read;
                        if (total > maxBytes)
                            return $"The upload is larger than {maxBytes} bytes (setting 'PulseLadder:MaxUploadBytes'); nothing was stored.";
                        if (filled == buffer.Length || (read == 0 && filled > 0))
                        {
                            hash.AppendData(buffer, 0, filled);
                            fs.Write(buffer, 0, filled);
                            filled = 0;
                        }
                    }
                    while (read > 0);
                }
                _files.Add((name, new SpooledFile(fileName, path, Convert.ToHexString(hash.GetHashAndReset()).ToLowerInvariant(), length)));
            }
            return null;
        }
        finally
        {
            System.Buffers.ArrayPool<byte>.Shared.Return(buffer);
        }
    }

    public void Dispose()
    {
        try { if (Directory.Exists(_dir)) Directory.Delete(_dir, true); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }
}
