using PulseLadder.Core.Ingest;

namespace PulseLadder.Core.Tests.Ingest;

public sealed class CsvHeaderTests
{
    [Theory]
    [InlineData("star,time,band,mag,mag_err", new[] { "star", "time", "band", "mag", "mag_err" })]
    [InlineData("star;time;band;mag;mag_err", new[] { "star", "time", "band", "mag", "mag_err" })]
    [InlineData("star\ttime\tband\tmag\tmag_err", new[] { "star", "time", "band", "mag", "mag_err" })]
    // The separator is the one that occurs most outside quotes, as the parsers decide; a stray ';' does not win.
    [InlineData("star,time,band,mag,\"a;b\",note;x", new[] { "star", "time", "band", "mag", "a;b", "note;x" })]
    public void Columns_SplitsLikeTheParsers_ForEachSeparator(string header, string[] expected) =>
        Assert.Equal(expected, CsvHeader.Columns(header));
}
