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
/// error ~10 us over 1600-2200; coefficients written from memory, agreement with astropy/ERFA &lt; 20 us is tested); TDB -> BJD_TDB with the Roemer delay r_earth . n / c, the Earth's barycentric
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
    public static TimeValueResult Convert(double value, TimeScale scale, SkyPosition position) => Convert(value, scale, position, null);

    /// <summary>As above; the TT -> BJD_TDB step through <paramref name="tt"/> when given (a star's many values).</summary>
    internal static TimeValueResult Convert(double value, TimeScale scale, SkyPosition position, TtToBjdInterpolator? tt)
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
                return new(FromTt(jd, position, tt), null, null, false);
            case TimeScale.HjdTt:
                return new(FromTt(UndoHeliocentric(jd, position, 0.0), position, tt), null, null, false);
            case TimeScale.JdUtc:
            case TimeScale.MjdUtc:
                return FromUtc(jd, position, tt);
            case TimeScale.HjdUtc:
            {
                // The heliocentric correction is a function of the dynamical time; TT-UTC (<= 70 s) only shifts
                // the ephemeris epoch, so it is applied to the evaluation time inside the iteration.
                double dt = TtMinusUtcSeconds(jd, out _) / SecondsPerDay;
                double jdUtc = UndoHeliocentric(jd, position, dt);
                return FromUtc(jdUtc, position, tt);
            }
            default:
                return new(null, "unknown_time_scale", "time scale " + scale + " is not supported", false);
        }
    }

    /// <summary>Convenience form of <see cref="Convert"/>: BJD_TDB, or null when the value cannot be converted.</summary>
    public static double? ToBjdTdb(double value, TimeScale scale, SkyPosition position) => Convert(value, scale, position).BjdTdb;

    private static TimeValueResult FromUtc(double jdUtc, SkyPosition position, TtToBjdInterpolator? tt)
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
        return new(FromTt(jdTt, position, tt), null, null, status == UtcStatus.PreUtc);
    }

    private static double FromTt(double jdTt, SkyPosition position, TtToBjdInterpolator? tt) =>
        tt is null ? FromTt(jdTt, position) : tt.BjdFromTt(jdTt);

    /// <summary>BJD_TDB - TT in days at TT JD <paramref name="jdTt"/>, summed in small numbers (no full-JD rounding).</summary>
    internal static double BjdMinusTtDays(double jdTt, SkyPosition position)
    {
        double tdbMinusTt = TdbMinusTtSeconds(jdTt) / SecondsPerDay;
        return tdbMinusTt + BarycentricCorrectionSeconds(jdTt + tdbMinusTt, position) / SecondsPerDay;
    }

    /// <summary>TT JD -> BJD_TDB JD (TDB - TT, then the Roemer delay at TDB), evaluated exactly.</summary>
    internal static double FromTt(double jdTt, SkyPosition position)
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

/// <summary>
/// BJD_TDB - TT of one star as a smooth function of TT, interpolated between exact evaluations
/// (<see cref="TimeConversion.BjdMinusTtDays"/>) on nodes every <see cref="NodeSpacingDays"/> days: a star's observations
/// share nodes, so the ephemeris (Meeus Sun, four Keplerian giant planets: ~80 sines per value) runs a few dozen times
/// per observing season instead of once per observation. Six-point Lagrange interpolation (nodes k-2 .. k+3 around
/// the interval [k, k+1]): the error is at most max|x (x^2-1) (x^2-4) (x-3)|/720 h^6 max|d6f/dt6| = 0.0049 h^6 max|d6f/dt6|,
/// with f the Roemer delay, 499 s sin(2 pi t / P) plus its eccentricity harmonics (8.3 s at 2/P, 0.14 s at 3/P, P =
/// 365.25 d): max|d6f/dt6| ~ (499 + 64 x 8.3 + 729 x 0.14) s (2 pi / P)^6 = 2.9e-8 s/d^6, so 6.6 us at h = 6 d, far below
/// the conversion's own error (~0.05 s against astropy, docs/time-scales.md); measured in TimeInterpolationTests.
/// Not thread-safe: one per star conversion.
/// </summary>
internal sealed class TtToBjdInterpolator(SkyPosition position)
{
    /// <summary>Node spacing, days.</summary>
    internal const double NodeSpacingDays = 6.0;

    private readonly Dictionary<long, double> _nodes = [];

    // Denominators prod_{m != j} (j - m) of the Lagrange weights for nodes j = -2 .. 3.
    private static readonly double[] Denominators = [-120, 24, -12, 12, -24, 120];

    /// <summary>BJD_TDB (full JD) for TT JD <paramref name="jdTt"/>.</summary>
    public double BjdFromTt(double jdTt)
    {
        double u = jdTt / NodeSpacingDays;
        long k = (long)Math.Floor(u);
        double x = u - k; // in [0, 1): between nodes k and k + 1
        double v = 0;
        for (int j = -2; j <= 3; j++)
        {
            double w = 1;
            for (int m = -2; m <= 3; m++) if (m != j) w *= x - m;
            v += Node(k + j) * w / Denominators[j + 2];
        }
        return jdTt + v;
    }

    /// <summary>BJD_TDB - TT in days at node <paramref name="k"/> (TT JD = k h).</summary>
    private double Node(long k)
    {
        if (_nodes.TryGetValue(k, out double v)) return v;
        v = TimeConversion.BjdMinusTtDays(k * NodeSpacingDays, position);
        _nodes[k] = v;
        return v;
    }
}
