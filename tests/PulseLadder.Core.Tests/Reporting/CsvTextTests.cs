using PulseLadder.Core.Reporting;

namespace PulseLadder.Core.Tests.Reporting;

public sealed class CsvTextTests
{
    // RFC 4180 section 2, rules 6 and 7: fields holding line breaks, double quotes or commas are enclosed in double
    // quotes, and a double quote inside is escaped by preceding it with another double quote.
    [Theory]
    [InlineData("plain", "plain")]
    [InlineData("a,b", "\"a,b\"")]
    [InlineData("say \"hi\"", "\"say \"\"hi\"\"\"")]
    [InlineData("line\nbreak", "\"line\nbreak\"")]
    [InlineData("cr\rlf", "\"cr\rlf\"")]
    [InlineData("", "")]
    public void Cell_QuotesPerRfc4180_WhenSpecialCharactersPresent(string raw, string expected) =>
        Assert.Equal(expected, CsvText.Cell(raw));

    [Fact]
    public void Number_RoundTripsAndUsesEmptyForNull_Always()
    {
        double v = 0.1 + 0.2; // not representable in short form: "R" must keep every digit
        Assert.Equal(v, double.Parse(CsvText.Number(v), System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal("", CsvText.Number(null));
    }
}
