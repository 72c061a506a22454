using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Cleaning;

public sealed class CleanerTests
{
    private static Observation Obs(long id, double t, double mag = 12.0, double err = 0.02, string band = "V", string observer = "a", string? flag = null) =>
        new(id, t, TimeScale.JdUtc, band, mag, err, observer, flag);

    [Fact]
    public void RejectUnusable_RecordsEachReason_AndKeepsOrder()
    {
        var obs = new List<Observation>
        {
            Obs(1, 2455000.1),
            Obs(2, 2455000.2, flag: "cloud"),
            Obs(3, double.NaN),
            Obs(4, 2455000.4, mag: double.PositiveInfinity),
            Obs(5, 2455000.5, err: 0),
            Obs(6, 2455000.6, err: -0.01),
            Obs(7, 2455000.7, err: 0.9),
            Obs(8, 2455000.1),                 // same time, band, observer as 1
            Obs(9, 2455000.1, band: "I"),      // other band: kept
            Obs(10, 2455000.1, observer: "b"), // other observer: kept
            Obs(11, 2455000.8, flag: "   "),   // blank flag means no flag
            Obs(12, 2455000.1, mag: 12.5),     // duplicate with a different magnitude
        };
        var r = Cleaner.RejectUnusable(obs, new CleaningSettings { MaxMagErr = 0.5 });
        Assert.Equal([1L, 9L, 10L, 11L], r.Kept.Select(o => o.Id));
        var reasons = r.Rejected.ToDictionary(x => x.ObservationId, x => x.Reason);
        Assert.Equal("flagged", reasons[2]);
        Assert.Equal("non_finite", reasons[3]);
        Assert.Equal("non_finite", reasons[4]);
        Assert.Equal("error_range", reasons[5]);
        Assert.Equal("error_range", reasons[6]);
        Assert.Equal("error_range", reasons[7]);
        Assert.Equal("duplicate", reasons[8]);
        Assert.Equal("duplicate", reasons[12]);
        Assert.Contains("12.5", r.Rejected.Single(x => x.ObservationId == 12).Detail);
        Assert.All(r.Rejected, x => Assert.Equal("clean", x.Stage));
        Assert.All(r.Rejected, x => Assert.False(string.IsNullOrWhiteSpace(x.Detail)));
        Assert.All(r.Rejected, x => Assert.True(double.IsFinite(x.Time) && double.IsFinite(x.Mag)));
    }

    [Fact]
    public void RejectUnusable_ReturnsEmpty_ForEmptyInput()
    {
        var r = Cleaner.RejectUnusable([], new CleaningSettings());
        Assert.Empty(r.Kept);
        Assert.Empty(r.Rejected);
    }
}
