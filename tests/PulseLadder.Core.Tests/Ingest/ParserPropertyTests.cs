using System.Globalization;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

// Property: parsers never throw, whatever the text; every accepted row satisfies the documented row checks.
public class ParserPropertyTests
{
    private static readonly PhotometryParseOptions Options = new(TimeScale.JdUtc, 0) { Limits = new IngestLimits(MaxLineLength: 256) };

    [Property(MaxTest = 300)]
    public bool PhotometryCsv_NeverThrows_WhenArbitraryText(string? text)
    {
        var r = PhotometryCsv.Parse(new StringReader(text ?? string.Empty), "p.csv", Options);
        return r.Rows.All(Valid);
    }

    [Property(MaxTest = 300)]
    public bool PhotometryCsv_NeverThrows_WhenArbitraryLinesAfterHeader(string[]? lines)
    {
        var text = "star,time,band,mag,mag_err,observer\n" + string.Join("\n", (lines ?? []).Select(l => l ?? string.Empty));
        var r = PhotometryCsv.Parse(new StringReader(text), "p.csv", Options);
        int dataLines = text.Count(c => c == '\n'); // lines after the header (elements may hold line breaks)
        return r.Rows.All(Valid) && r.Summary.AcceptedRows + r.Summary.RejectedRows <= dataLines;
    }

    [Property(MaxTest = 300)]
    public bool PlainText_NeverThrows_WhenArbitraryText(string? text)
    {
        var r = PlainTextPhotometry.Parse(new StringReader(text ?? string.Empty), "p.dat", "S", "V", Options);
        return r.Rows.All(Valid);
    }

    [Property(MaxTest = 300)]
    public bool StarList_NeverThrows_WhenArbitraryLinesAfterHeader(string[]? lines)
    {
        var text = "star,field,ra_deg,dec_deg,class,ebv\n" + string.Join("\n", (lines ?? []).Select(l => l ?? string.Empty));
        var r = StarListCsv.Parse(new StringReader(text), "s.csv", Options.Limits);
        return r.Rows.All(s => s.Name.Length > 0 && SkyPositionOk(s));
    }

    [Property(MaxTest = 200)]
    public bool PhotometryCsv_AcceptsRow_WhenFieldsValid(NormalFloat mag, PositiveInt errMilli, NonNegativeInt day)
    {
        double m = Math.Clamp(mag.Get, -5, 40);
        double err = Math.Min(errMilli.Get, 5000) / 1000.0;
        double t = 2440000 + day.Get % 40000;
        var line = FormattableString.Invariant($"S1,{t:R},V,{m:R},{err:R}");
        var r = PhotometryCsv.Parse(new StringReader("star,time,band,mag,mag_err\n" + line), "p.csv", Options);
        return r.IsSuccess && r.Rows.Count == 1 && r.Rows[0].Observation.Mag == m && r.Rows[0].Observation.MagErr == err;
    }

    [Property(MaxTest = 2000)]
    public bool PlainDecimalFastPath_EqualsDoubleParse_WhenDecimalText(long mantissa, byte scale, bool plusSign)
    {
        // Reference: the BCL's correctly rounded double.Parse (invariant culture).
        string digits = Math.Abs(mantissa % 10_000_000_000_000_000).ToString(CultureInfo.InvariantCulture);
        int point = scale % (digits.Length + 3);
        string text = point == 0 ? digits : point >= digits.Length ? "0." + new string('0', point - digits.Length) + digits
            : digits[..^point] + "." + digits[^point..];
        text = (mantissa < 0 ? "-" : plusSign ? "+" : "") + text;
        double expected = double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
        bool fast = FieldParsing.TryParsePlainDecimal(text, out double actual);
        return !fast || BitConverter.DoubleToInt64Bits(actual) == BitConverter.DoubleToInt64Bits(expected);
    }

    [Theory]
    [InlineData("12.345", true)]
    [InlineData("2455000.51234", true)]
    [InlineData("-0.5", true)]
    [InlineData(".5", true)]
    [InlineData("1e5", false)]
    [InlineData("1234567890.1234567", false)]
    [InlineData("12,5", false)]
    [InlineData(".", false)]
    [InlineData("-", false)]
    public void PlainDecimalFastPath_TakesOnlySimpleForms_WhenGivenText(string text, bool fast)
    {
        Assert.Equal(fast, FieldParsing.TryParsePlainDecimal(text, out double v));
        if (fast) Assert.Equal(double.Parse(text, CultureInfo.InvariantCulture), v);
    }

    private static bool SkyPositionOk(StarInfo s) => s.Position.RaDeg is >= 0 and < 360 && s.Position.DecDeg is >= -90 and <= 90;

    private static bool Valid(PhotometryRow row)
    {
        var o = row.Observation;
        return row.Star.Length > 0 && Bands.Known.ContainsKey(o.Band) && o.MagErr > 0 && o.MagErr <= 5 && o.Mag is >= -5 and <= 40 &&
               o.Time >= Photometry.TimeScales.MinPlausibleJd && o.Time <= Photometry.TimeScales.MaxPlausibleJd;
    }
}
