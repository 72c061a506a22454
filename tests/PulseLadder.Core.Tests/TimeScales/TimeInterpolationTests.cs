using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.TimeScales;

namespace PulseLadder.Core.Tests.TimeScales;

/// <summary>
/// The batch conversion of a star's observations (interpolated TT -> BJD_TDB, <see cref="TtToBjdInterpolator"/>) against
/// the exact per-value chain (itself checked against astropy in TimeReferenceTests), and against astropy directly.
/// </summary>
public sealed class TimeInterpolationTests(Xunit.Abstractions.ITestOutputHelper output)
{
    [Theory]
    [InlineData(10.0, 41.0)]
    [InlineData(80.9, -69.75)]
    [InlineData(270.0, -29.0)]   // near the ecliptic: largest Roemer amplitude
    [InlineData(0.0, 89.0)]
    public void BatchConversion_WithinTenMicrosecondsOfExact_OverTwoDecades(double raDeg, double decDeg)
    {
        var pos = SkyPosition.FromDegrees(raDeg, decDeg);
        var rng = new Random(5);
        var scales = new[] { TimeScale.JdUtc, TimeScale.JdTt, TimeScale.HjdUtc, TimeScale.HjdTt, TimeScale.MjdUtc };
        var obs = new List<Observation>();
        for (int i = 0; i < 4000; i++)
        {
            var scale = scales[i % scales.Length];
            double jd = 2_450_000 + 7300 * rng.NextDouble();
            obs.Add(new Observation(i + 1, scale is TimeScale.MjdUtc ? jd - 2_400_000.5 : jd, scale, "V", 15, 0.01, "o", null));
        }
        var batch = BarycentricTime.ToBjdTdb(obs, pos);
        Assert.Equal(obs.Count, batch.Points.Count);
        double worst = 0;
        for (int i = 0; i < obs.Count; i++)
        {
            double exact = TimeConversion.ToBjdTdb(obs[i].Time, obs[i].Scale, pos)!.Value;
            worst = Math.Max(worst, Math.Abs(batch.Points[i].Bjd - exact) * 86400);
        }
        // 6.6 us interpolation bound (h = 6 d, see TtToBjdInterpolator) plus one unit in the last place of a full-JD double
        // (4.7e-10 d = 40 us at JD 2.46e6) for each of the two results compared.
        double ulp = (Math.BitIncrement(2_460_000.0) - 2_460_000.0) * 86400;
        output.WriteLine($"worst difference from the exact chain: {worst * 1e6:F1} us (one JD ulp: {ulp * 1e6:F1} us)");
        Assert.True(worst <= 10e-6 + 2 * ulp, $"worst {worst * 1e6:F1} us");
    }

    [Fact]
    public void BatchConversion_MatchesAstropyWithinTenthSecond()
    {
        // The astropy 5.2.1 / pyerfa reference values of TimeReferenceTests, through the batch path.
        using var d = TimeReferenceTests.Load();
        double worst = 0;
        foreach (var c in d.RootElement.GetProperty("cases").EnumerateArray())
        {
            var pos = SkyPosition.FromDegrees(c.GetProperty("ra_deg").GetDouble(), c.GetProperty("dec_deg").GetDouble());
            double expected = c.GetProperty("bjd_tdb").GetDouble();
            var obs = new List<Observation>();
            foreach (var input in c.GetProperty("inputs").EnumerateObject())
            {
                Assert.True(PulseLadder.Core.Photometry.TimeScales.TryParse(input.Name, out var scale));
                obs.Add(new Observation(obs.Count + 1, input.Value.GetDouble(), scale, "V", 15, 0.01, "o", null));
            }
            foreach (var p in BarycentricTime.ToBjdTdb(obs, pos).Points)
                worst = Math.Max(worst, Math.Abs(p.Bjd - expected) * 86400);
        }
        Assert.True(worst <= 0.1, $"worst {worst:F4} s");
    }
}
