using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.TimeScales;

namespace PulseLadder.Core.Tests.TimeScales;

public sealed class TimeConversionTests
{
    // Positions of SCIENCE.md CV-2..CV-4 (J2000).
    private static readonly SkyPosition DeltaCep = SkyPosition.FromDegrees(Hms(22, 29, 10.265), Dms(58, 24, 54.71));
    private static readonly SkyPosition RRLyr = SkyPosition.FromDegrees(Hms(19, 25, 27.913), Dms(42, 47, 3.69));
    private static readonly SkyPosition LCar = SkyPosition.FromDegrees(Hms(9, 45, 14.811), -Dms(62, 30, 28.45));

    private static double Hms(double h, double m, double s) => 15.0 * (h + m / 60.0 + s / 3600.0);
    private static double Dms(double d, double m, double s) => d + m / 60.0 + s / 3600.0;

    [Fact]
    public void SunPosition_ReproducesMeeusExample25a_At1992Oct13()
    {
        // Meeus, Astronomical Algorithms 2nd ed. (1998), Example 25.a; SCIENCE.md CV-1 (recomputed values).
        var s = TimeConversion.SunPosition(2448908.5);
        Assert.Equal(-0.072183436, s.T, 1e-9);
        Assert.Equal(201.80720, s.MeanLongitude, 1e-4);
        Assert.Equal(278.99397, s.MeanAnomaly, 1e-4);
        Assert.Equal(0.016711668, s.Eccentricity, 1e-9);
        Assert.Equal(-1.89732, s.EquationOfCentre, 1e-4);
        Assert.Equal(199.90987, s.TrueLongitude, 1e-4);
        Assert.Equal(0.99766, s.Radius, 1e-5);
        Assert.Equal(264.65, s.Omega, 1e-2);
        Assert.Equal(199.90894, s.ApparentLongitude, 1e-4);
        Assert.Equal(23.43999, s.ApparentObliquity, 1e-4);
        Assert.Equal(198.38083, s.ApparentRa, 1e-4);
        Assert.Equal(-7.78507, s.ApparentDec, 1e-4);
    }

    [Theory]
    // SCIENCE.md CV-2/CV-3/CV-4: astropy 5.2.1 light_travel_time(kind='heliocentric'), geocentre, UTC input.
    [InlineData("dcep", 2451545.0, 31.30)]
    [InlineData("dcep", 2455000.5, -91.40)]
    [InlineData("dcep", 2459000.5, -157.42)]
    [InlineData("dcep", 2460310.5, 34.16)]
    [InlineData("rrlyr", 2451545.0, -195.89)]
    [InlineData("rrlyr", 2455000.5, 173.04)]
    [InlineData("lcar", 2459000.5, 123.26)]
    public void HeliocentricCorrection_MatchesCheckValues_WithinTwoTenthsSecond(string star, double jdUtc, double expectedSeconds)
    {
        var pos = star switch { "dcep" => DeltaCep, "rrlyr" => RRLyr, _ => LCar };
        double jdTt = jdUtc + TimeConversion.TtMinusUtcSeconds(jdUtc) / 86400.0;
        Assert.Equal(expectedSeconds, TimeConversion.HeliocentricCorrectionSeconds(jdTt, pos), 0.2);
    }

    [Fact]
    public void ToBjdTdb_MatchesCheckValue_ForDeltaCepIn2020()
    {
        // SCIENCE.md CV-5: astropy (ERFA ephemeris) BJD_TDB = 2459000.498971 for JD_UTC 2459000.5.
        var bjd = TimeConversion.ToBjdTdb(2459000.5, TimeScale.JdUtc, DeltaCep);
        Assert.NotNull(bjd);
        Assert.Equal(2459000.498971, bjd!.Value, 3e-6);
        double jdTdb = 2459000.5 + (TimeConversion.TtMinusUtcSeconds(2459000.5) + TimeConversion.TdbMinusTtSeconds(2459000.5)) / 86400.0;
        Assert.Equal(-158.08, TimeConversion.BarycentricCorrectionSeconds(jdTdb, DeltaCep), 0.1);
    }

    [Theory]
    [InlineData(2451545.0)]
    [InlineData(2455000.5)]
    [InlineData(2459000.5)]
    public void HeliocentricCorrection_IsNearZero_AtEclipticPole(double jdUtc)
    {
        // SCIENCE.md CV-6: alpha = 18h, delta = +66.560709 deg: |HJD - JD| < 0.05 s.
        var pole = SkyPosition.FromDegrees(270.0, 66.560709);
        Assert.True(Math.Abs(TimeConversion.HeliocentricCorrectionSeconds(jdUtc, pole)) < 0.05);
    }

    [Theory]
    // SCIENCE.md CV-7: IERS leap seconds (via astropy/ERFA): 68.184 s in 2016, 69.184 s from 2017-01-01.
    [InlineData(2457540.5, 68.184)] // 2016-06-01
    [InlineData(2457905.5, 69.184)] // 2017-06-01
    [InlineData(2460676.5, 69.184)] // 2025-01-01
    public void TtMinusUtc_MatchesIersValues(double jdUtc, double expected)
    {
        Assert.Equal(expected, TimeConversion.TtMinusUtcSeconds(jdUtc), 1e-9);
    }

    [Fact]
    public void Convert_TreatsModifiedScalesAsMjd()
    {
        // SCIENCE.md CV-8: MJD = JD - 2400000.5 (JD 2451545.0 = MJD 51544.5).
        var pos = DeltaCep;
        Assert.Equal(TimeConversion.ToBjdTdb(2451545.0, TimeScale.JdUtc, pos)!.Value, TimeConversion.ToBjdTdb(51544.5, TimeScale.MjdUtc, pos)!.Value, 1e-9);
        Assert.Equal(2451545.0, TimeConversion.ToBjdTdb(51544.5, TimeScale.BmjdTdb, pos)!.Value, 1e-9);
    }

    [Fact]
    public void Convert_RejectsUtcAfterLeapTableExpiry_ButAcceptsTdb()
    {
        // The embedded IERS list (tzdata 2025b copy) says "File expires on 28 June 2026".
        double jd2027 = 2461406.5; // 2027-01-01
        var r = TimeConversion.Convert(jd2027, TimeScale.JdUtc, DeltaCep);
        Assert.Null(r.BjdTdb);
        Assert.Equal("leap_table_expired", r.FailureReason);
        Assert.Contains("2026-06-28", r.Detail);
        Assert.Equal(jd2027, TimeConversion.ToBjdTdb(jd2027, TimeScale.BjdTdb, DeltaCep));
        Assert.NotNull(TimeConversion.ToBjdTdb(jd2027, TimeScale.JdTt, DeltaCep));
    }

    [Fact]
    public void EmbeddedLeapTable_IsFoundUnderManifestName_WithIersEntries()
    {
        var names = typeof(TimeConversion).Assembly.GetManifestResourceNames();
        Assert.Contains(LeapSecondTable.ResourceName, names);
        // IERS: 28 leap seconds from 1972-07-01 to 2017-01-01, plus the 1972-01-01 starting value of 10 s.
        Assert.Equal(28, LeapSecondTable.Embedded.Count);
        Assert.Equal("2026-06-28", LeapSecondTable.JdToIsoDate(LeapSecondTable.Embedded.ExpiresJd));
    }

    [Fact]
    public void ToBjdTdb_KeepsOrderAndRejectsExpiredPointsWithReason()
    {
        var obs = new List<Observation>
        {
            new(1, 2459000.5, TimeScale.JdUtc, "V", 4.0, 0.01, "a", null),
            new(2, 2461406.5, TimeScale.JdUtc, "V", 4.1, 0.01, "a", null),
            new(3, 59000.0, TimeScale.MjdTt, "V", 4.2, 0.01, "a", null),
        };
        var outcome = BarycentricTime.ToBjdTdb(obs, DeltaCep);
        Assert.Equal([1L, 3L], outcome.Points.Select(p => p.ObservationId));
        var rej = Assert.Single(outcome.Rejected);
        Assert.Equal(("time", "leap_table_expired", 2L), (rej.Stage, rej.Reason, rej.ObservationId));
        Assert.Contains("Roemer", outcome.Method);
        Assert.Empty(BarycentricTime.ToBjdTdb([], DeltaCep).Points);
    }

    [Fact]
    public void ToBjdTdb_SaysSoInMethod_ForPre1960Utc()
    {
        var obs = new List<Observation> { new(1, 2430000.5, TimeScale.JdUtc, "V", 4.0, 0.01, "", null) };
        var outcome = BarycentricTime.ToBjdTdb(obs, DeltaCep);
        Assert.Single(outcome.Points);
        Assert.Contains("before 1960", outcome.Method);
    }
}
