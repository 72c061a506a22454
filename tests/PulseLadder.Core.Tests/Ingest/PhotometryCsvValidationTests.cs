using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using static PulseLadder.Core.Tests.Ingest.IngestTestSupport;

namespace PulseLadder.Core.Tests.Ingest;

// One test per validation rule of the photometry CSV (issue 2 items 2-3); expected wording as in docs/formats.md.
public class PhotometryCsvValidationTests
{
    private static IngestIssue ErrorOf(string dataLine, PhotometryParseOptions? options = null)
    {
        var r = Csv(Header + "\n" + dataLine + "\n", options);
        Assert.Empty(r.Rows);
        Assert.Equal(1, r.Summary.RejectedRows);
        var e = SingleError(r);
        Assert.Equal("upload.csv", e.File);
        Assert.Equal(2, e.Line);
        return e;
    }

    [Fact]
    public void Parse_ReportsNotANumber_WhenMagIsText()
    {
        var e = ErrorOf("S1,2455000.5,V,bright,0.01");
        Assert.Equal(IngestIssueCode.NotANumber, e.Code);
        Assert.Equal("mag", e.Column);
        Assert.Equal("'bright' is not a number", e.Message);
    }

    [Fact]
    public void Parse_ReportsNotANumberWithHint_WhenDecimalCommaInSemicolonFile()
    {
        var r = Csv("star;time;band;mag;mag_err\nS1;2455000.5;V;12,5;0.01\n");
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.NotANumber, e.Code);
        Assert.Equal("mag", e.Column);
        Assert.Equal("'12,5' is not a number (use '.' as the decimal separator)", e.Message);
    }

    [Theory]
    [InlineData("NaN")]
    [InlineData("Infinity")]
    [InlineData("-Infinity")]
    public void Parse_ReportsNotFinite_WhenMagErrIsNaNOrInfinite(string value)
    {
        var e = ErrorOf($"S1,2455000.5,V,12.5,{value}");
        Assert.Equal(IngestIssueCode.NotFinite, e.Code);
        Assert.Equal("mag_err", e.Column);
        Assert.Equal("NaN or infinite value", e.Message);
    }

    [Theory]
    [InlineData("0")]
    [InlineData("-0.01")]
    public void Parse_ReportsErrorNotPositive_WhenMagErrIsZeroOrNegative(string value)
    {
        var e = ErrorOf($"S1,2455000.5,V,12.5,{value}");
        Assert.Equal(IngestIssueCode.ErrorNotPositive, e.Code);
        Assert.Equal("mag_err", e.Column);
        Assert.Equal("mag_err must be positive", e.Message);
    }

    [Fact]
    public void Parse_ReportsErrorTooLarge_WhenMagErrAboveFiveMag()
    {
        var e = ErrorOf("S1,2455000.5,V,12.5,5.5");
        Assert.Equal(IngestIssueCode.ErrorTooLarge, e.Code);
        Assert.Equal("mag_err 5.5 is above 5 mag", e.Message);
    }

    [Fact]
    public void Parse_AcceptsMagErr_WhenExactlyFiveMag()
    {
        var r = Csv(Header + "\nS1,2455000.5,V,12.5,5\n");
        Assert.True(r.IsSuccess);
        Assert.Equal(5.0, r.Rows[0].Observation.MagErr);
    }

    [Theory]
    [InlineData("41", "magnitude 41 is outside -5..40")]
    [InlineData("-5.5", "magnitude -5.5 is outside -5..40")]
    public void Parse_ReportsMagnitudeOutOfRange_WhenMagAbsurd(string mag, string message)
    {
        var e = ErrorOf($"S1,2455000.5,V,{mag},0.01");
        Assert.Equal(IngestIssueCode.MagnitudeOutOfRange, e.Code);
        Assert.Equal("mag", e.Column);
        Assert.Equal(message, e.Message);
    }

    [Fact]
    public void Parse_ReportsUnknownBand_WhenBandNotKnown()
    {
        var e = ErrorOf("S1,2455000.5,Q,12.5,0.01");
        Assert.Equal(IngestIssueCode.UnknownBand, e.Code);
        Assert.Equal("band", e.Column);
        Assert.StartsWith("unknown band 'Q' (accepted: U, B, V, R, I,", e.Message);
    }

    [Fact]
    public void Parse_NormalisesBand_WhenCousinsSpelling()
    {
        var r = Csv(Header + "\nS1,2455000.5,Ic,12.5,0.01\n");
        Assert.True(r.IsSuccess);
        Assert.Equal("I", r.Rows[0].Observation.Band);
    }

    [Fact]
    public void Parse_ReportsTimeOutOfRange_WhenOffsetMissing()
    {
        // "JD - 2450000" values uploaded without the offset: JD 5000.5 is 4700 BC, caught by the plausible range.
        var e = ErrorOf("S1,5000.5,V,12.5,0.01");
        Assert.Equal(IngestIssueCode.TimeOutOfRange, e.Code);
        Assert.Equal("time", e.Column);
        Assert.Equal("time 5000.5 + offset 0 is JD 5000.5 (jd_utc), outside the plausible range JD 2411368.5..2488069.5 (1890-2100): missing or wrong time offset?", e.Message);
    }

    [Fact]
    public void Parse_ReportsTimeOutOfRange_WhenMjdUploadedAsJd()
    {
        // MJD 55000 declared as mjd_utc is fine; the same number declared jd_utc is not.
        Assert.True(Csv(Header + "\nS1,55000.5,V,12.5,0.01\n", new PhotometryParseOptions(TimeScale.MjdUtc, 0)).IsSuccess);
        var e = ErrorOf("S1,55000.5,V,12.5,0.01");
        Assert.Equal(IngestIssueCode.TimeOutOfRange, e.Code);
    }

    [Fact]
    public void Parse_AddsOffset_WhenOffsetDeclared()
    {
        var r = Csv(Header + "\nS1,5000.25,V,12.5,0.01\n", JdUtc(2450000));
        Assert.True(r.IsSuccess);
        Assert.Equal(2455000.25, r.Rows[0].Observation.Time);
        Assert.Equal(TimeScale.JdUtc, r.Rows[0].Observation.Scale);
    }

    [Fact]
    public void Parse_ReportsDuplicateRow_WhenSameStarTimeBandObserver()
    {
        var r = Csv("star,time,band,mag,mag_err,observer\nS1,2455000.5,V,12.5,0.01,ann\nS1,2455000.5,V,12.6,0.01,bob\nS1,2455000.5,V,12.7,0.02,ann\n");
        Assert.Equal(2, r.Rows.Count);
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.DuplicateRow, e.Code);
        Assert.Equal(4, e.Line);
        Assert.Null(e.Column);
        Assert.Equal("duplicate of line 2 (same star, time, band and observer)", e.Message);
    }

    [Fact]
    public void Parse_ReportsEveryDuplicate_WhenTimesOutOfOrder()
    {
        // Times increasing, then an earlier repeat (binary search path), then out of order (hash path), then repeats.
        var r = Csv(Header + "\nS1,2455003,V,12,0.01\nS1,2455005,V,12,0.01\nS1,2455003,V,12,0.01\nS1,2455004,V,12,0.01\n" +
                    "S1,2455001,V,12,0.01\nS1,2455004,V,12,0.01\nS1,2455001,V,12,0.01\nS1,2455001,I,12,0.01\nS2,2455001,V,12,0.01\n");
        Assert.Equal([4L, 7, 8], r.Errors.Select(e => e.Line).ToArray());
        Assert.Equal(["duplicate of line 2 (same star, time, band and observer)", "duplicate of line 5 (same star, time, band and observer)",
            "duplicate of line 6 (same star, time, band and observer)"], r.Errors.Select(e => e.Message).ToArray());
        Assert.Equal(6, r.Rows.Count);
    }

    [Fact]
    public void Parse_AcceptsRepeatedTime_WhenDuplicateCheckOff()
    {
        var r = Csv(Header + "\nS1,2455000.5,V,12.5,0.01\nS1,2455000.5,V,12.5,0.01\n", JdUtc() with { RejectDuplicates = false });
        Assert.True(r.IsSuccess);
        Assert.Equal(2, r.Rows.Count);
    }

    [Fact]
    public void Parse_ReportsUnknownStar_WhenNotInStarList()
    {
        var options = new PhotometryParseOptions(TimeScale.JdUtc, 0) { KnownStars = new HashSet<string> { "S1" } };
        var e = ErrorOf("S2,2455000.5,V,12.5,0.01", options);
        Assert.Equal(IngestIssueCode.UnknownStar, e.Code);
        Assert.Equal("star", e.Column);
        Assert.Equal("star 'S2' is not in the star list", e.Message);
    }

    [Theory]
    [InlineData("S1,2455000.5,V,12.5", 4)]
    [InlineData("S1,2455000.5,V,12.5,0.01,extra", 6)]
    public void Parse_ReportsWrongColumnCount_WhenFieldCountDiffers(string line, int found)
    {
        var e = ErrorOf(line);
        Assert.Equal(IngestIssueCode.WrongColumnCount, e.Code);
        Assert.Equal($"expected 5 fields, found {found}", e.Message);
    }

    [Fact]
    public void Parse_ReportsEmptyField_WhenRequiredFieldEmpty()
    {
        var e = ErrorOf(",2455000.5,V,12.5,0.01");
        Assert.Equal(IngestIssueCode.EmptyField, e.Code);
        Assert.Equal("star", e.Column);
        Assert.Equal("empty required field", e.Message);
    }

    [Fact]
    public void Parse_ListsEveryBadField_WhenRowHasSeveral()
    {
        var r = Csv(Header + "\nS1,x,Q,99,0\n");
        Assert.Equal(["time", "band", "mag", "mag_err"], r.Errors.Select(e => e.Column!).ToArray());
        Assert.Equal(1, r.Summary.RejectedRows);
    }

    [Fact]
    public void Parse_ReportsMissingColumn_WhenHeaderLacksMagErr()
    {
        var r = Csv("star,time,band,mag\nS1,2455000.5,V,12.5\n");
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.MissingColumn, e.Code);
        Assert.Equal(1, e.Line);
        Assert.Equal("mag_err", e.Column);
        Assert.Equal("missing required column 'mag_err' (required: star, time, band, mag, mag_err)", e.Message);
        Assert.True(r.Summary.Stopped);
    }

    [Fact]
    public void Parse_ReportsDuplicateColumn_WhenHeaderRepeatsName()
    {
        var e = SingleError(Csv("star,time,band,mag,mag_err,MAG\n"));
        Assert.Equal(IngestIssueCode.DuplicateColumn, e.Code);
        Assert.Equal("column 'mag' appears twice in the header", e.Message);
    }

    [Fact]
    public void Parse_WarnsAndIgnores_WhenUnknownColumn()
    {
        var r = Csv("star,time,airmass,band,mag,mag_err\nS1,2455000.5,1.2,V,12.5,0.01\n");
        Assert.True(r.IsSuccess);
        Assert.Single(r.Rows);
        var w = Assert.Single(r.Warnings);
        Assert.Equal(IngestIssueCode.UnknownColumn, w.Code);
        Assert.Equal("airmass", w.Column);
        Assert.Equal("unknown column 'airmass' ignored", w.Message);
    }

    [Fact]
    public void Parse_ReportsTooManyRows_WhenRowLimitExceeded()
    {
        var text = Header + "\n" + string.Concat(Enumerable.Range(0, 10).Select(i => $"S1,{2455000 + i},V,12.5,0.01\n"));
        var options = JdUtc() with { Limits = new IngestLimits(MaxRows: 4) };
        var r = Csv(text, options);
        Assert.Equal(4, r.Rows.Count);
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.TooManyRows, e.Code);
        Assert.Equal(6, e.Line);
        Assert.Equal("more than 4 data rows; reading stopped", e.Message);
        Assert.True(r.Summary.Stopped);
    }

    [Fact]
    public void Parse_StopsAtErrorLimit_WhenEveryRowIsBad()
    {
        var text = Header + "\n" + string.Concat(Enumerable.Range(0, 50).Select(_ => "S1,x,V,12.5,0.01\n"));
        var r = Csv(text, JdUtc() with { Limits = new IngestLimits(MaxErrors: 5) });
        Assert.Equal(6, r.Errors.Count);
        Assert.Equal(IngestIssueCode.TooManyErrors, r.Errors[^1].Code);
        Assert.Equal("more than 5 errors; reading stopped at line 7", r.Errors[^1].Message);
        Assert.True(r.Summary.Stopped);
    }

    [Fact]
    public void Parse_ReportsLineTooLongAndContinues_WhenOneLineExceedsLimit()
    {
        var text = Header + "\nS1,2455000.5,V,12.5,0.01\n" + new string('x', 5000) + "\nS1,2455001.5,V,12.5,0.01\n";
        var r = Csv(text, JdUtc() with { Limits = new IngestLimits(MaxLineLength: 1000) });
        Assert.Equal(2, r.Rows.Count);
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.LineTooLong, e.Code);
        Assert.Equal(3, e.Line);
        Assert.Equal("line longer than 1000 characters; skipped", e.Message);
        Assert.Equal(4, r.Rows[1].Line);
    }

    [Fact]
    public void Parse_ReportsMissingHeader_WhenOnlyComments()
    {
        var e = SingleError(Csv("# nothing here\n\n   \n"));
        Assert.Equal(IngestIssueCode.MissingHeader, e.Code);
        Assert.Equal(0, e.Line);
        Assert.Equal("no header line: the file is empty or has only blank and '#' comment lines", e.Message);
    }

    [Fact]
    public void Parse_ReportsUnknownSeparator_WhenHeaderHasNone()
    {
        var e = SingleError(Csv("star time band mag mag_err\n"));
        Assert.Equal(IngestIssueCode.UnknownSeparator, e.Code);
        Assert.Equal("cannot detect the separator: the header has no comma, semicolon or tab", e.Message);
    }

    [Fact]
    public void Parse_ReportsBadQuoting_WhenQuoteUnterminated()
    {
        var e = ErrorOf("\"S1,2455000.5,V,12.5,0.01");
        Assert.Equal(IngestIssueCode.BadQuoting, e.Code);
        Assert.Equal("unterminated quoted field", e.Message);
    }

    [Fact]
    public void Parse_ReportsBadQuoting_WhenTextFollowsClosingQuote()
    {
        var e = ErrorOf("\"S1\"x,2455000.5,V,12.5,0.01");
        Assert.Equal(IngestIssueCode.BadQuoting, e.Code);
        Assert.Equal("text after the closing quote of a field", e.Message);
    }

    [Fact]
    public void IssueToString_ShowsFileLineColumnMessage_WhenColumnKnown()
    {
        var e = ErrorOf("S1,2455000.5,V,bright,0.01");
        Assert.Equal("upload.csv:2: mag: 'bright' is not a number", e.ToString());
    }
}
