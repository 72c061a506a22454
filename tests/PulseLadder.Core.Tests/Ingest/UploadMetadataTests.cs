using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

public class UploadMetadataTests
{
    [Theory]
    [InlineData("jd_utc", "2450000", TimeScale.JdUtc, 2450000.0)]
    [InlineData("HJD_UTC", "", TimeScale.HjdUtc, 0.0)]
    [InlineData("bmjd_tdb", null, TimeScale.BmjdTdb, 0.0)]
    [InlineData("mjd_tt", "-0.5", TimeScale.MjdTt, -0.5)]
    public void TryParse_ReadsScaleAndOffset_WhenValid(string scale, string? offset, TimeScale expected, double expectedOffset)
    {
        Assert.True(UploadMetadata.TryParse(scale, offset, out var s, out var o, out var error));
        Assert.Equal(expected, s);
        Assert.Equal(expectedOffset, o);
        Assert.Null(error);
    }

    // The stored codes are the lower-case names of the IVOA time scales with their reference point (common practice in
    // this project's storage): every scale has one, and it reads back as the same scale.
    [Fact]
    public void ToCode_RoundTripsEveryScale()
    {
        foreach (var scale in Enum.GetValues<TimeScale>())
        {
            string code = scale.ToCode();
            Assert.True(PulseLadder.Core.Photometry.TimeScales.TryParse(code, out var back), code);
            Assert.Equal(scale, back);
        }
        Assert.Equal("bjd_tdb", TimeScale.BjdTdb.ToCode());
        Assert.Throws<ArgumentOutOfRangeException>(() => ((TimeScale)99).ToCode());
    }

    [Fact]
    public void TryParse_ReportsUnknownScale_WhenScaleGuessable()
    {
        Assert.False(UploadMetadata.TryParse("jd", "0", out _, out _, out var error));
        Assert.Equal("unknown time scale 'jd' (accepted: jd_utc, mjd_utc, jd_tt, mjd_tt, hjd_utc, hjd_tt, bjd_tdb, bmjd_tdb)", error);
    }

    [Theory]
    [InlineData("2,450,000")]
    [InlineData("2450000,5")]
    [InlineData("NaN")]
    public void TryParse_ReportsBadOffset_WhenNotInvariantFiniteNumber(string offset)
    {
        Assert.False(UploadMetadata.TryParse("jd_utc", offset, out _, out _, out var error));
        Assert.Equal($"time offset '{offset}' is not a finite number", error);
    }
}
