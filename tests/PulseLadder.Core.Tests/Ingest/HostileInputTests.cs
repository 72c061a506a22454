using System.Text;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using static PulseLadder.Core.Tests.Ingest.IngestTestSupport;

namespace PulseLadder.Core.Tests.Ingest;

// Inputs an attacker or a broken exporter may send: answered with errors, never exceptions or hangs.
public class HostileInputTests
{
    [Fact]
    public void Parse_ReportsErrors_WhenBinaryGarbage()
    {
        var rng = new Random(12345);
        var bytes = new byte[200_000];
        rng.NextBytes(bytes);
        var r = PhotometryCsv.Parse(new MemoryStream(bytes), "garbage.bin", JdUtc());
        Assert.Empty(r.Rows);
        Assert.NotEmpty(r.Errors);
        Assert.False(r.IsSuccess);
        var s = StarListCsv.Parse(new MemoryStream(bytes), "garbage.bin");
        Assert.Empty(s.Rows);
        Assert.NotEmpty(s.Errors);
        var p = PlainTextPhotometry.Parse(new MemoryStream(bytes), "garbage.bin", "S1", "V", JdUtc());
        Assert.Empty(p.Rows);
        Assert.NotEmpty(p.Errors);
    }

    [Fact]
    public void Parse_ReportsLineTooLong_WhenOneMegabyteHeaderWithoutLineBreak()
    {
        var r = Csv(new string('a', 1 << 20));
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.LineTooLong, e.Code);
        Assert.Equal(1, e.Line);
        Assert.Empty(r.Rows);
    }

    [Fact]
    public void Parse_SkipsOneMegabyteDataLine_WhenFollowedByGoodRows()
    {
        var text = Header + "\n" + new string('9', 1 << 20) + "\nS1,2455000.5,V,12.5,0.01\n";
        var r = Csv(text);
        Assert.Equal(IngestIssueCode.LineTooLong, SingleError(r).Code);
        Assert.Single(r.Rows);
        var p = PlainTextPhotometry.Parse(new StringReader(new string('1', 1 << 20) + "\n2455000.5 12.5 0.01"), "lc.dat", "S1", "V", JdUtc());
        Assert.Equal(IngestIssueCode.LineTooLong, Assert.Single(p.Errors).Code);
        Assert.Single(p.Rows);
    }

    [Fact]
    public void Parse_ReportsBadQuoting_WhenHeaderQuoteUnterminated()
    {
        var e = SingleError(Csv("\"star,time,band,mag,mag_err\nS1,2455000.5,V,12.5,0.01\n"));
        Assert.Equal(IngestIssueCode.BadQuoting, e.Code);
    }

    [Fact]
    public void Parse_SucceedsWithNoRows_WhenOnlyHeader()
    {
        var r = Csv(Header);
        Assert.True(r.IsSuccess);
        Assert.Empty(r.Rows);
        Assert.Equal(1, r.Summary.LinesRead);
    }

    [Fact]
    public void Parse_ReportsMissingHeader_WhenEmpty()
    {
        Assert.Equal(IngestIssueCode.MissingHeader, SingleError(Csv("")).Code);
        Assert.Equal(IngestIssueCode.MissingHeader, SingleError(Stars("")).Code);
        var p = PlainTextPhotometry.Parse(new StringReader(""), "lc.dat", "S1", "V", JdUtc());
        Assert.True(p.IsSuccess);
        Assert.Empty(p.Rows);
    }

    [Fact]
    public void Parse_ReportsWrongColumnCount_WhenThousandsOfSeparators()
    {
        var r = Csv(Header + "\n" + new string(',', 50_000) + "\n");
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.WrongColumnCount, e.Code);
        Assert.Equal("expected 5 fields, found 50001", e.Message);
    }

    [Fact]
    public void Parse_ReportsErrorsOnly_WhenNulAndControlCharacters()
    {
        var r = Csv(Header + "\nS1\0,2455000.5\u0001,V,12.5,0.01\n");
        Assert.Empty(r.Rows);
        Assert.Equal(2, r.Errors.Count);
        // A NUL in a name is refused (names go into XML exports, which cannot hold it), not stored.
        Assert.Equal(("star", IngestIssueCode.ControlCharacter), (r.Errors[0].Column, r.Errors[0].Code));
        Assert.Equal("time", r.Errors[1].Column);
        Assert.Equal("'2455000.5?' is not a number", r.Errors[1].Message);
    }

    [Fact]
    public void Parse_ReadsLargeFile_WhenStreamedInBatches()
    {
        // 300 000 rows through a reader that never holds the text: memory stays bounded by the batch and the duplicate index.
        const int n = 300_000;
        long seen = 0;
        var summary = PhotometryCsv.Parse(new GeneratedReader(n), "big.csv", JdUtc(), batch => seen += batch.Length, 4096);
        Assert.True(summary.IsSuccess, string.Join("; ", summary.Errors.Take(3)));
        Assert.Equal(n, seen);
        Assert.Equal(n + 1, summary.LinesRead);
    }

    /// <summary>Produces a CSV on the fly, so the test file is never a string in memory.</summary>
    private sealed class GeneratedReader(int rows) : TextReader
    {
        private int _next = -1;
        private string _pending = string.Empty;
        private int _pos;

        public override int Read(char[] buffer, int index, int count)
        {
            int written = 0;
            while (written < count)
            {
                if (_pos == _pending.Length)
                {
                    if (_next >= rows) break;
                    _pending = _next < 0 ? Header + "\n" : $"S{_next % 100},{2455000.0 + _next * 0.001:F3},V,{12 + (_next % 7) * 0.1:F2},0.01\n";
                    _next++;
                    _pos = 0;
                }
                int take = Math.Min(count - written, _pending.Length - _pos);
                _pending.CopyTo(_pos, buffer, index + written, take);
                _pos += take;
                written += take;
            }
            return written;
        }
    }
}
