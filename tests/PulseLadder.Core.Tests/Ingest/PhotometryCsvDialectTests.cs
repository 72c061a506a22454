using System.Globalization;
using System.Text;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using static PulseLadder.Core.Tests.Ingest.IngestTestSupport;

namespace PulseLadder.Core.Tests.Ingest;

// CSV dialect handling per RFC 4180 (quoting) and the separators/encodings listed in docs/formats.md.
public class PhotometryCsvDialectTests
{
    private const string CommaFile =
        "# campaign 7, night 12\n" +
        "star,time,band,mag,mag_err,observer,flag\n" +
        "S1,2455000.51234,V,12.345,0.012,ann,\n" +
        "\n" +
        "S1,2455000.52,I,11.5,0.02,ann,cloud\n" +
        "S2,2455001.5,B,14.25,0.05,,\n";

    private static void AssertSameRows(ParseResult<PhotometryRow> expected, ParseResult<PhotometryRow> actual)
    {
        Assert.True(actual.IsSuccess, string.Join("; ", actual.Errors));
        Assert.Equal(expected.Rows.Select(r => (r.Star, r.Observation)), actual.Rows.Select(r => (r.Star, r.Observation)));
    }

    [Fact]
    public void Parse_ReadsAllFields_WhenCommaSeparatedWithOptionalColumns()
    {
        var r = Csv(CommaFile, JdUtc() with { DefaultObserver = "team" });
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Equal(3, r.Rows.Count);
        Assert.Equal(new PhotometryRow("S1", new Observation(0, 2455000.51234, TimeScale.JdUtc, "V", 12.345, 0.012, "ann", null), 3), r.Rows[0]);
        Assert.Equal("cloud", r.Rows[1].Observation.Flag);
        Assert.Equal(5, r.Rows[1].Line);
        Assert.Equal("team", r.Rows[2].Observation.Observer);
        Assert.Equal(6, r.Summary.LinesRead);
        Assert.Equal(3, r.Summary.AcceptedRows);
    }

    [Fact]
    public void Parse_GivesSameRows_WhenSemicolonSeparated() =>
        AssertSameRows(Csv(CommaFile), Csv(CommaFile.Replace(',', ';').Replace("campaign 7; night", "campaign 7, night")));

    [Fact]
    public void Parse_GivesSameRows_WhenTabSeparated() =>
        AssertSameRows(Csv(CommaFile), Csv(CommaFile.Replace(',', '\t')));

    [Fact]
    public void Parse_GivesSameRows_WhenCrlfLineEnds() =>
        AssertSameRows(Csv(CommaFile), Csv(CommaFile.Replace("\n", "\r\n")));

    [Fact]
    public void Parse_GivesSameRows_WhenUtf8BomInStream()
    {
        var bytes = Encoding.UTF8.GetPreamble().Concat(Encoding.UTF8.GetBytes(CommaFile)).ToArray();
        var fromStream = PhotometryCsv.Parse(new MemoryStream(bytes), "upload.csv", JdUtc());
        AssertSameRows(Csv(CommaFile), fromStream);
    }

    [Fact]
    public void Parse_GivesSameRows_WhenBomCharacterStartsText() =>
        AssertSameRows(Csv(CommaFile), Csv("\uFEFF" + CommaFile));

    [Fact]
    public void Parse_GivesSameRows_WhenUtf16StreamWithBom()
    {
        var bytes = Encoding.Unicode.GetPreamble().Concat(Encoding.Unicode.GetBytes(CommaFile)).ToArray();
        AssertSameRows(Csv(CommaFile), PhotometryCsv.Parse(new MemoryStream(bytes), "upload.csv", JdUtc()));
    }

    [Fact]
    public void Parse_UnquotesFields_WhenQuotedWithSeparatorsAndDoubledQuotes()
    {
        var text = "\"star\",\"time\",band,mag,mag_err,observer,flag\n" +
                   "\"V* X, Car\",\"2455000.5\", V ,12.5,0.01,\"O'Neil \"\"Jr\"\"\",\"bad, very\"\n";
        var r = Csv(text);
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        var row = Assert.Single(r.Rows);
        Assert.Equal("V* X, Car", row.Star);
        Assert.Equal("V", row.Observation.Band);
        Assert.Equal("O'Neil \"Jr\"", row.Observation.Observer);
        Assert.Equal("bad, very", row.Observation.Flag);
    }

    [Fact]
    public void Parse_AcceptsHeaderNames_WhenUpperCaseAndPadded()
    {
        var r = Csv(" STAR , Time,BAND,Mag,MAG_ERR\nS1,2455000.5,V,12.5,0.01\n");
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Single(r.Rows);
    }

    [Fact]
    public void Parse_AcceptsExponentAndSign_WhenInvariantNumbers()
    {
        var r = Csv(Header + "\nS1,2.4550005e6,V,+1.25E1,1e-2\n");
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Equal(2455000.5, r.Rows[0].Observation.Time);
        Assert.Equal(12.5, r.Rows[0].Observation.Mag);
        Assert.Equal(0.01, r.Rows[0].Observation.MagErr);
    }

    [Fact]
    public void Parse_GivesIdenticalResults_WhenCurrentCultureUsesDecimalComma()
    {
        var semicolon = CommaFile.Replace(',', ';') + "S3;2455002.5;V;12,5;0.01;;\n";
        var invariant = Csv(semicolon);
        var saved = CultureInfo.CurrentCulture;
        ParseResult<PhotometryRow> german;
        try
        {
            CultureInfo.CurrentCulture = new CultureInfo("de-DE");
            german = Csv(semicolon);
        }
        finally
        {
            CultureInfo.CurrentCulture = saved;
        }
        Assert.Equal(invariant.Rows, german.Rows);
        Assert.Equal(invariant.Errors, german.Errors);
        Assert.Equal(3, german.Rows.Count);
        Assert.Equal("'12,5' is not a number (use '.' as the decimal separator)", Assert.Single(german.Errors).Message);
        Assert.Equal(12.345, german.Rows[0].Observation.Mag);
    }

    [Fact]
    public void Parse_StreamsBatchesFromBytes_WhenStreamAndHandlerGiven()
    {
        var bytes = Encoding.UTF8.GetBytes(CommaFile.Replace("\n", "\r\n"));
        var stars = new List<string>();
        var summary = PhotometryCsv.Parse(new MemoryStream(bytes), "upload.csv", JdUtc(), batch =>
        {
            foreach (var row in batch) stars.Add(row.Star);
        });
        Assert.True(summary.IsSuccess);
        Assert.Equal(["S1", "S1", "S2"], stars);
        var plain = PlainTextPhotometry.Parse(new MemoryStream("2455000.5 12.5 0.01\r\n"u8.ToArray()), "lc.dat", "S9", "V", JdUtc(), batch => stars.Add(batch[0].Star));
        Assert.True(plain.IsSuccess);
        Assert.Equal("S9", stars[^1]);
    }

    [Fact]
    public void Parse_DeliversRowsInOrderedBatches_WhenBatchHandlerGiven()
    {
        var text = Header + "\n" + string.Concat(Enumerable.Range(0, 25).Select(i => $"S1,{2455000 + i},V,12.5,0.01\n"));
        var sizes = new List<int>();
        var times = new List<double>();
        var summary = PhotometryCsv.Parse(new StringReader(text), "upload.csv", JdUtc(), batch =>
        {
            sizes.Add(batch.Length);
            foreach (var row in batch) times.Add(row.Observation.Time);
        }, batchSize: 10);
        Assert.True(summary.IsSuccess);
        Assert.Equal(25, summary.AcceptedRows);
        Assert.Equal([10, 10, 5], sizes);
        Assert.Equal(Enumerable.Range(0, 25).Select(i => 2455000.0 + i), times);
    }
}
