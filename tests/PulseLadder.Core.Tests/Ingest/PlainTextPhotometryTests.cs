using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

public class PlainTextPhotometryTests
{
    private static readonly string OgleDir = Path.Combine(AppContext.BaseDirectory, "data", "open", "lmc-cepheids", "ogle3");

    private static PhotometryParseOptions HjdOffset() => new(TimeScale.HjdUtc, 2450000);

    private static ParseResult<PhotometryRow> Parse(string text, PhotometryParseOptions? options = null, string star = "S1", string band = "I") =>
        PlainTextPhotometry.Parse(new StringReader(text), "lc.dat", star, band, options ?? HjdOffset());

    [Fact]
    public void Parse_ReadsEveryLineWithZeroErrors_WhenRealOgleFiles()
    {
        // Open data: OGLE-III LMC Cepheid light curves (tests/data/open/lmc-cepheids, see SOURCE.md), HJD - 2450000.
        foreach (var band in new[] { "I", "V" })
        {
            var files = Directory.GetFiles(Path.Combine(OgleDir, band), "*.dat");
            Assert.NotEmpty(files);
            foreach (var file in files)
            {
                string star = Path.GetFileNameWithoutExtension(file);
                using var stream = File.OpenRead(file);
                var r = PlainTextPhotometry.Parse(stream, Path.GetFileName(file), star, band, HjdOffset());
                Assert.True(r.IsSuccess, string.Join("; ", r.Errors.Take(3)));
                int dataLines = File.ReadLines(file).Count(l => l.Trim().Length > 0 && !l.TrimStart().StartsWith('#'));
                Assert.Equal(dataLines, r.Rows.Count);
                Assert.All(r.Rows, row =>
                {
                    Assert.Equal(star, row.Star);
                    Assert.Equal(band, row.Observation.Band);
                    // SOURCE.md: OGLE-III 2001-2009, with OGLE-II points from 1997 merged for two stars.
                    Assert.InRange(row.Observation.Time, 2450449.5, 2455197.5); // 1997-01-01 .. 2010-01-01
                });
            }
        }
    }

    [Fact]
    public void Parse_ReadsOgleLine_WhenOffsetDeclared()
    {
        var r = Parse("# HJD-2450000 I err\n2165.85632 14.401 0.006\n\n2166.8 \t 14.5   0.007\n");
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Equal(2, r.Rows.Count);
        Assert.Equal(new Observation(0, 2452165.85632, TimeScale.HjdUtc, "I", 14.401, 0.006, "", null), r.Rows[0].Observation);
        Assert.Equal(4, r.Rows[1].Line);
    }

    [Fact]
    public void Parse_ReportsTimeOutOfRange_WhenOgleFileWithoutOffset()
    {
        var r = Parse("2165.85632 14.401 0.006\n", new PhotometryParseOptions(TimeScale.HjdUtc, 0));
        var e = Assert.Single(r.Errors);
        Assert.Equal(IngestIssueCode.TimeOutOfRange, e.Code);
        Assert.Equal("time", e.Column);
        Assert.Equal("time 2165.85632 + offset 0 is JD 2165.9 (hjd_utc), outside the plausible range JD 2411368.5..2488069.5 (1890-2100): missing or wrong time offset?", e.Message);
    }

    [Fact]
    public void Parse_ReportsWrongColumnCount_WhenFourColumns()
    {
        var e = Assert.Single(Parse("2165.85632 14.401 0.006 1\n").Errors);
        Assert.Equal(IngestIssueCode.WrongColumnCount, e.Code);
        Assert.Equal("expected 3 fields, found 4", e.Message);
    }

    [Fact]
    public void Parse_ReportsNotANumber_WhenErrorColumnText()
    {
        var e = Assert.Single(Parse("2165.85632 14.401 err\n").Errors);
        Assert.Equal("mag_err", e.Column);
        Assert.Equal("'err' is not a number", e.Message);
    }

    [Fact]
    public void Parse_ReportsBadParameter_WhenBandUnknown()
    {
        var r = Parse("2165.85632 14.401 0.006\n", band: "W");
        var e = Assert.Single(r.Errors);
        Assert.Equal(IngestIssueCode.BadParameter, e.Code);
        Assert.Equal(0, e.Line);
        Assert.Equal("band", e.Column);
        Assert.Empty(r.Rows);
    }

    [Fact]
    public void Parse_ReportsUnknownStar_WhenStarParameterNotListed()
    {
        var options = HjdOffset() with { KnownStars = new HashSet<string> { "OTHER" } };
        var e = Assert.Single(Parse("2165.85632 14.401 0.006\n", options).Errors);
        Assert.Equal(IngestIssueCode.UnknownStar, e.Code);
        Assert.Equal("star 'S1' is not in the star list", e.Message);
    }

    [Fact]
    public void Parse_ReportsDuplicateRow_WhenTimeRepeats()
    {
        var e = Assert.Single(Parse("2165.85632 14.401 0.006\n2165.85632 14.402 0.006\n").Errors);
        Assert.Equal(IngestIssueCode.DuplicateRow, e.Code);
        Assert.Equal("duplicate of line 1 (same star, time, band and observer)", e.Message);
    }
}
