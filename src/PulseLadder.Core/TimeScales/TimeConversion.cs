using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Core.TimeScales;

/// <summary>Result of converting one time value: a BJD_TDB, or a reason code why not.</summary>
/// <param name="BjdTdb">Barycentric Julian date (TDB, full JD), or null when <paramref name="FailureReason"/> is set.</param>
/// <param name="FailureReason">"leap_table_expired", "non_finite_time" or null.</param>
/// <param name="PreUtc">True when the UTC value predates 1960 and was treated as UT with TAI-UTC = 0.</param>
public readonly record struct TimeValueResult(double? BjdTdb, string? FailureReason, string? Detail, bool PreUtc);

/// <summary>
/// Per-value time-scale conversions to BJD_TDB (full Julian days). Chain: UTC -> TT with the embedded leap-second
/// table (<see cref="LeapSecondTable"/>); TT -> TDB with the leading periodic terms of Fairhead &amp; Bretagnon (1990)
/// in the form of Kaplan 2005 (USNO Circular 179, eq. 2.6: the 1.657 ms annual term plus five smaller terms;
/// error ~10 us over 1600-2200); TDB -> BJD_TDB with the Roemer delay r_earth . n / c, the Earth's barycentric
/// position from <see cref="SolarSystem"/>. The geocentre is the reference point (an observatory's offset is at most
/// 21 ms); the Shapiro delay (&lt; 0.1 ms except within a few degrees of the Sun) and the Einstein delay beyond
/// TT -> TDB are neglected. HJD inputs: the heliocentric correction (r_earth,helio . n / c) is undone by iteration on
/// the same ephemeris, then the barycentric one applied. Accuracy against astropy/ERFA: see docs/time-scales.md.
/// </summary>
public static class TimeConversion
{
    /// <summary>Light travel time for 1 AU (IAU 2012 au = 149597870700 m exactly, c = 299792458 m/s), seconds.</summary>
    public const double AuLightSeconds = 149597870700.0 / 299792458.0;

    private const double SecondsPerDay = 86400.0;
    private const double TtMinusTai = 32.184;

    /// <summary>Description of the method, stored as provenance with every analysis.</summary>
    public static string Method { get; } =
        "BJD_TDB (geocentre): UTC->TT by IERS leap-second list (expires "
        + LeapSecondTable.JdToIsoDate(LeapSecondTable.Embedded.ExpiresJd)
        + "; 1960-1971 rubber-second drift, pre-1960 TAI-UTC=0); TT->TDB Fairhead&Bretagnon leading terms (Kaplan 2005);"
        + " Roemer delay with Meeus(1998) ch.25 Sun precessed to J2000 + Standish Keplerian Jupiter..Neptune reflex;"
        + " HJD inputs: heliocentric correction undone first; Shapiro delay neglected";

    /// <summary>TT - UTC in seconds at UTC JD <paramref name="jdUtc"/>, with the table status.</summary>
    internal static double TtMinusUtcSeconds(double jdUtc, out UtcStatus status) =>
        TtMinusTai + LeapSecondTable.Embedded.TaiMinusUtc(jdUtc, out status);

    /// <summary>TT - UTC in seconds (32.184 + TAI-UTC); 69.184 s since 2017-01-01.</summary>
    public static double TtMinusUtcSeconds(double jdUtc) => TtMinusUtcSeconds(jdUtc, out _);

    /// <summary>TDB - TT in seconds at TT Julian date <paramref name="jdTt"/> (Kaplan 2005 eq. 2.6).</summary>
    public static double TdbMinusTtSeconds(double jdTt)
    {
        double t = (jdTt - 2451545.0) / 36525.0;
        return 0.001657 * Math.Sin(628.3076 * t + 6.2401)
             + 0.000022 * Math.Sin(575.3385 * t + 4.2970)
             + 0.000014 * Math.Sin(1256.6152 * t + 6.1969)
             + 0.000005 * Math.Sin(606.9777 * t + 4.0212)
             + 0.000005 * Math.Sin(52.9691 * t + 0.4444)
             + 0.000002 * Math.Sin(21.3299 * t + 5.5431)
             + 0.000010 * t * Math.Sin(628.3076 * t + 4.2490);
    }

    /// <summary>Barycentric (Roemer) correction BJD - JD in seconds at TDB JD <paramref name="jdTdb"/> for a star at <paramref name="position"/>.</summary>
    public static double BarycentricCorrectionSeconds(double jdTdb, SkyPosition position) =>
        SolarSystem.BarycentricEarth(jdTdb).Dot(SolarSystem.Direction(position.RaDeg, position.DecDeg)) * AuLightSeconds;

    /// <summary>Heliocentric correction HJD - JD in seconds at (dynamical-time) JD <paramref name="jd"/>.</summary>
    public static double HeliocentricCorrectionSeconds(double jd, SkyPosition position) =>
        SolarSystem.HeliocentricEarth(jd).Dot(SolarSystem.Direction(position.RaDeg, position.DecDeg)) * AuLightSeconds;

    /// <summary>Meeus low-precision Sun at dynamical-time JD <paramref name="jde"/> (all the quantities of Meeus Example 25.a).</summary>
    public static SunPosition SunPosition(double jde) => SolarSystem.Sun(jde);

    /// <summary>Converts a value in <paramref name="scale"/> (MJD scales as MJD) to BJD_TDB; never throws.</summary>
    public static TimeValueResult Convert(double value, TimeScale scale, SkyPosition position)
    {
        if (!double.IsFinite(value)) return new(null, "non_finite_time", "time is not a finite number", false);
        double jd = scale.ToFullJulianDay(value);
        switch (scale)
        {
            case TimeScale.BjdTdb:
            case TimeScale.BmjdTdb:
                return new(jd, null, null, false);
            case TimeScale.JdTt:
            case TimeScale.MjdTt:
                return new(FromTt(jd, position), null, null, false);
            case TimeScale.HjdTt:
                return new(FromTt(UndoHeliocentric(jd, position, 0.0), position), null, null, false);
            case TimeScale.JdUtc:
            case TimeScale.MjdUtc:
                return FromUtc(jd, position);
            case TimeScale.HjdUtc:
            {
                // The heliocentric correction is a function of the dynamical time; TT-UTC (<= 70 s) only shifts
                // the ephemeris epoch, so it is applied to the evaluation time inside the iteration.
                double dt = TtMinusUtcSeconds(jd, out _) / SecondsPerDay;
                double jdUtc = UndoHeliocentric(jd, position, dt);
                return FromUtc(jdUtc, position);
            }
            default:
                return new(null, "unknown_time_scale", "time scale " + scale + " is not supported", false);
        }
    }

    /// <summary>Convenience form of <see cref="Convert"/>: BJD_TDB, or null when the value cannot be converted.</summary>
    public static double? ToBjdTdb(double value, TimeScale scale, SkyPosition position) => Convert(value, scale, position).BjdTdb;

    private static TimeValueResult FromUtc(double jdUtc, SkyPosition position)
    {
        double ttMinusUtc = TtMinusUtcSeconds(jdUtc, out var status);
        if (status == UtcStatus.Expired)
        {
            string expiry = LeapSecondTable.JdToIsoDate(LeapSecondTable.Embedded.ExpiresJd);
            return new(null, "leap_table_expired",
                "UTC date " + LeapSecondTable.JdToIsoDate(jdUtc) + " is past the leap-second table's expiry " + expiry
                + "; TT-UTC is not known there (update Data/time/leap-seconds.list from IERS Bulletin C)", false);
        }
        double jdTt = jdUtc + ttMinusUtc / SecondsPerDay;
        return new(FromTt(jdTt, position), null, null, status == UtcStatus.PreUtc);
    }

    private static double FromTt(double jdTt, SkyPosition position)
    {
        double jdTdb = jdTt + TdbMinusTtSeconds(jdTt) / SecondsPerDay;
        return jdTdb + BarycentricCorrectionSeconds(jdTdb, position) / SecondsPerDay;
    }

    // Solves hjd = jd + corr(jd + dt) for jd; corr changes by < 10 s/day, so three fixed-point steps reach < 1 us.
    private static double UndoHeliocentric(double hjd, SkyPosition position, double dtToDynamical)
    {
        double jd = hjd;
        for (int i = 0; i < 3; i++)
            jd = hjd - HeliocentricCorrectionSeconds(jd + dtToDynamical, position) / SecondsPerDay;
        return jd;
    }
}
