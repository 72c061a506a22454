using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Core.Ingest;

/// <summary>
/// Star list CSV with a header row. Required columns <c>star, field, ra_deg, dec_deg</c> (ICRS degrees); optional
/// <c>class</c> (see <see cref="PulsatorClasses"/>; empty or "unknown" means not declared), <c>ebv</c>,
/// <c>ebv_err</c> (mag), <c>feh</c> (dex). Same CSV dialect and error reporting as <see cref="PhotometryCsv"/>.
/// </summary>
public static class StarListCsv
{
    /// <summary>Stable column names.</summary>
    public const string Star = "star", Field = "field", RaDeg = "ra_deg", DecDeg = "dec_deg", Class = "class",
        Ebv = "ebv", EbvErr = "ebv_err", FeH = "feh";

    /// <summary>Accepted ranges of the optional quantities (a colour excess a little below zero is map noise).</summary>
    public const double MinEbv = -0.1, MaxEbv = 10, MaxEbvErr = 10, MinFeH = -5, MaxFeH = 1.5;

    private static readonly string[] Required = [Star, Field, RaDeg, DecDeg];
    private static readonly string[] Optional = [Class, Ebv, EbvErr, FeH];

    /// <summary>Parses the whole star list. Limits default to <see cref="IngestLimits.Default"/>.</summary>
    public static ParseResult<StarInfo> Parse(TextReader reader, string fileName, IngestLimits? limits = null)
    {
        ArgumentNullException.ThrowIfNull(reader);
        limits ??= IngestLimits.Default;
        limits.Validate();
        var issues = new IssueCollector(fileName, limits.MaxErrors);
        var table = new CsvTableReader(reader, issues, limits);
        var map = table.ReadHeader(Required, Optional);
        var stars = new List<StarInfo>();
        if (map is null) return new ParseResult<StarInfo>(stars, issues.Summary(0, table.LineNumber));
        int cStar = map[0], cField = map[1], cRa = map[2], cDec = map[3], cClass = map[4], cEbv = map[5], cEbvErr = map[6], cFeH = map[7];

        var firstLine = new Dictionary<string, long>(StringComparer.Ordinal);
        var pool = new StringPool();
        while (table.NextRecord())
        {
            long line = table.LineNumber;
            bool ok = true;
            string name = string.Empty;
            var nameText = table.Field(cStar);
            if (nameText.IsEmpty)
            {
                issues.Error(IngestIssueCode.EmptyField, line, Star, IngestMessages.EmptyField);
                ok = false;
            }
            else if (!FieldParsing.TryPrintable(nameText, issues, line, Star)) ok = false;
            else
            {
                name = nameText.ToString();
                if (firstLine.TryGetValue(name, out long first))
                {
                    issues.Error(IngestIssueCode.DuplicateStar, line, Star, IngestMessages.DuplicateStar(name, first));
                    ok = false;
                }
                else firstLine[name] = line;
            }
            var fieldText = table.Field(cField);
            if (fieldText.IsEmpty)
            {
                issues.Error(IngestIssueCode.EmptyField, line, Field, IngestMessages.EmptyField);
                ok = false;
            }
            else ok &= FieldParsing.TryPrintable(fieldText, issues, line, Field);
            ok &= TryRa(table, cRa, issues, line, out double ra);
            ok &= TryDec(table, cDec, issues, line, out double dec);
            ok &= TryClass(table.Field(cClass), issues, line, out PulsatorClass? cls);
            ok &= TryRanged(table.Field(cEbv), issues, line, Ebv, MinEbv, MaxEbv, out double? ebv);
            ok &= TryRanged(table.Field(cEbvErr), issues, line, EbvErr, 0, MaxEbvErr, out double? ebvErr);
            ok &= TryRanged(table.Field(cFeH), issues, line, FeH, MinFeH, MaxFeH, out double? feh);
            if (!ok)
            {
                issues.RejectedRows++;
                continue;
            }
            stars.Add(new StarInfo(name, pool.Get(fieldText), SkyPosition.FromDegrees(ra, dec), cls, ebv, ebvErr, feh));
        }
        return new ParseResult<StarInfo>(stars, issues.Summary(stars.Count, table.LineNumber));
    }

    /// <summary>Parses a byte stream (UTF-8 or BOM-marked); the stream is left open.</summary>
    public static ParseResult<StarInfo> Parse(Stream stream, string fileName, IngestLimits? limits = null)
    {
        using var reader = PhotometryCsv.OpenText(stream);
        return Parse(reader, fileName, limits);
    }

    private static bool TryRa(CsvTableReader table, int column, IssueCollector issues, long line, out double ra)
    {
        if (!FieldParsing.TryRequired(table.Field(column), issues, line, RaDeg, out ra)) return false;
        if (ra >= 0 && ra < 360) return true;
        issues.Error(IngestIssueCode.PositionOutOfRange, line, RaDeg, IngestMessages.RaOutOfRange(ra));
        return false;
    }

    private static bool TryDec(CsvTableReader table, int column, IssueCollector issues, long line, out double dec)
    {
        if (!FieldParsing.TryRequired(table.Field(column), issues, line, DecDeg, out dec)) return false;
        if (dec >= -90 && dec <= 90) return true;
        issues.Error(IngestIssueCode.PositionOutOfRange, line, DecDeg, IngestMessages.DecOutOfRange(dec));
        return false;
    }

    private static bool TryClass(ReadOnlySpan<char> text, IssueCollector issues, long line, out PulsatorClass? cls)
    {
        cls = null;
        if (text.IsEmpty) return true;
        if (!PulsatorClasses.TryParse(text.ToString(), out var c))
        {
            issues.Error(IngestIssueCode.UnknownClass, line, Class, IngestMessages.UnknownClass(text));
            return false;
        }
        cls = c == PulsatorClass.Unknown ? null : c;
        return true;
    }

    private static bool TryRanged(ReadOnlySpan<char> text, IssueCollector issues, long line, string column, double min, double max, out double? value)
    {
        if (!FieldParsing.TryOptional(text, issues, line, column, out value)) return false;
        if (value is not { } v || (v >= min && v <= max)) return true;
        issues.Error(IngestIssueCode.ValueOutOfRange, line, column, IngestMessages.ValueOutOfRange(column, v, min, max));
        value = null;
        return false;
    }
}
