using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using static PulseLadder.Core.Tests.Ingest.IngestTestSupport;

namespace PulseLadder.Core.Tests.Ingest;

public class StarListCsvTests
{
    private const string StarHeader = "star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh";

    private static IngestIssue ErrorOf(string dataLine)
    {
        var r = Stars(StarHeader + "\n" + dataLine + "\n");
        Assert.Empty(r.Rows);
        var e = SingleError(r);
        Assert.Equal(2, e.Line);
        return e;
    }

    [Fact]
    public void Parse_ReadsAllColumns_WhenWellFormed()
    {
        var r = Stars(StarHeader + "\nOGLE-LMC-CEP-0004,lmc,71.0917,-67.6461,DCEP_F,0.1,0.02,-0.33\nX2,lmc,0,90,,,,\nX3,lmc,359.9999,-90,unknown,,,\n");
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Equal(3, r.Rows.Count);
        var s = r.Rows[0];
        Assert.Equal("OGLE-LMC-CEP-0004", s.Name);
        Assert.Equal("lmc", s.Field);
        Assert.Equal(71.0917, s.Position.RaDeg);
        Assert.Equal(-67.6461, s.Position.DecDeg);
        Assert.Equal(PulsatorClass.ClassicalCepheidFundamental, s.DeclaredClass);
        Assert.Equal(0.1, s.Ebv);
        Assert.Equal(0.02, s.EbvErr);
        Assert.Equal(-0.33, s.FeH);
        Assert.Null(r.Rows[1].DeclaredClass);
        Assert.Null(r.Rows[1].Ebv);
        Assert.Null(r.Rows[2].DeclaredClass); // "unknown" declares nothing
    }

    [Fact]
    public void Parse_ReadsMinimalColumns_WhenOptionalAbsent()
    {
        var r = Stars("star;field;ra_deg;dec_deg\nA;f;10.5;-20.25\n");
        Assert.True(r.IsSuccess);
        Assert.Equal(new StarInfo("A", "f", Quantities.SkyPosition.FromDegrees(10.5, -20.25)), r.Rows[0]);
    }

    [Fact]
    public void Parse_ReportsDuplicateStar_WhenNameRepeats()
    {
        var r = Stars(StarHeader + "\nA,f,10,10,,,,\nB,f,11,10,,,,\nA,f,12,10,,,,\n");
        Assert.Equal(2, r.Rows.Count);
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.DuplicateStar, e.Code);
        Assert.Equal(4, e.Line);
        Assert.Equal("star", e.Column);
        Assert.Equal("star 'A' already listed at line 2", e.Message);
    }

    [Theory]
    [InlineData("A,f,360,10,,,,", "ra_deg", "ra_deg 360 is outside [0, 360)")]
    [InlineData("A,f,-0.5,10,,,,", "ra_deg", "ra_deg -0.5 is outside [0, 360)")]
    [InlineData("A,f,10,90.5,,,,", "dec_deg", "dec_deg 90.5 is outside [-90, 90]")]
    [InlineData("A,f,10,-91,,,,", "dec_deg", "dec_deg -91 is outside [-90, 90]")]
    public void Parse_ReportsPositionOutOfRange_WhenRaOrDecOutside(string line, string column, string message)
    {
        var e = ErrorOf(line);
        Assert.Equal(IngestIssueCode.PositionOutOfRange, e.Code);
        Assert.Equal(column, e.Column);
        Assert.Equal(message, e.Message);
    }

    [Fact]
    public void Parse_ReportsUnknownClass_WhenCodeNotKnown()
    {
        var e = ErrorOf("A,f,10,10,mira,,,");
        Assert.Equal(IngestIssueCode.UnknownClass, e.Code);
        Assert.Equal("class", e.Column);
        Assert.Equal("unknown class 'mira' (accepted: unknown, dcep_f, dcep_1o, t2cep, rrab, rrc, other, constant)", e.Message);
    }

    [Theory]
    [InlineData("A,f,10,10,,-0.5,,", "ebv", "ebv -0.5 is outside -0.1..10")]
    [InlineData("A,f,10,10,,0.1,-0.01,", "ebv_err", "ebv_err -0.01 is outside 0..10")]
    [InlineData("A,f,10,10,,,,2", "feh", "feh 2 is outside -5..1.5")]
    public void Parse_ReportsValueOutOfRange_WhenOptionalQuantityAbsurd(string line, string column, string message)
    {
        var e = ErrorOf(line);
        Assert.Equal(IngestIssueCode.ValueOutOfRange, e.Code);
        Assert.Equal(column, e.Column);
        Assert.Equal(message, e.Message);
    }

    [Theory]
    [InlineData(",f,10,10,,,,", "star")]
    [InlineData("A,,10,10,,,,", "field")]
    [InlineData("A,f,,10,,,,", "ra_deg")]
    public void Parse_ReportsEmptyField_WhenRequiredEmpty(string line, string column)
    {
        var e = ErrorOf(line);
        Assert.Equal(IngestIssueCode.EmptyField, e.Code);
        Assert.Equal(column, e.Column);
    }

    [Fact]
    public void Parse_ReportsNotANumber_WhenRaSexagesimal()
    {
        var e = ErrorOf("A,f,05:34:12.1,10,,,,");
        Assert.Equal(IngestIssueCode.NotANumber, e.Code);
        Assert.Equal("ra_deg", e.Column);
        Assert.Equal("'05:34:12.1' is not a number", e.Message);
    }

    [Fact]
    public void Parse_ReportsMissingColumn_WhenDecAbsent()
    {
        var e = SingleError(Stars("star,field,ra_deg\nA,f,1\n"));
        Assert.Equal(IngestIssueCode.MissingColumn, e.Code);
        Assert.Equal("dec_deg", e.Column);
    }
}
