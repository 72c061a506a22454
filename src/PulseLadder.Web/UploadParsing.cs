using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Web;

/// <summary>A file as received: name and bytes.</summary>
public sealed record IncomingFile(string FileName, byte[] Content);

/// <summary>Parsed photometry of one file, or its errors.</summary>
public sealed record ParsedPhotometry(string FileName, string Sha256, string Format, IReadOnlyList<string> Columns, ParseResult<PhotometryRow> Result);

/// <summary>Reads uploaded files with the Core parsers; shared by the upload endpoint and the offline CLI.</summary>
public static class UploadParsing
{
    /// <summary>
    /// "csv" when the first data line has letters (a header), "plain" for three numeric columns. Never guesses the
    /// time scale: that is always declared.
    /// </summary>
    public static string DetectFormat(byte[] content)
    {
        using var r = new StreamReader(new MemoryStream(content), detectEncodingFromByteOrderMarks: true);
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

    public static IReadOnlyList<string> HeaderColumns(byte[] content)
    {
        using var r = new StreamReader(new MemoryStream(content), detectEncodingFromByteOrderMarks: true);
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
        var options = new PhotometryParseOptions(scale, offset)
        {
            KnownStars = knownStars,
            DefaultObserver = observer?.Trim() ?? "",
            Limits = IngestLimits.Default with { MaxRows = maxRows },
        };
        using var stream = new MemoryStream(f.Content);
        var result = format == "plain"
            ? PlainTextPhotometry.Parse(stream, f.FileName, star ?? "", band ?? "", options)
            : PhotometryCsv.Parse(stream, f.FileName, options);
        var columns = format == "plain" ? (IReadOnlyList<string>)["time", "mag", "mag_err"] : HeaderColumns(f.Content);
        return new ParsedPhotometry(f.FileName, ContentHash.Sha256Hex(f.Content), format, columns, result);
    }

    public static (string Sha256, ParseResult<StarInfo> Result) ReadStars(IncomingFile f)
    {
        using var stream = new MemoryStream(f.Content);
        return (ContentHash.Sha256Hex(f.Content), StarListCsv.Parse(stream, f.FileName));
    }
}
