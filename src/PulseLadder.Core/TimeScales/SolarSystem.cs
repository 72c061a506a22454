namespace PulseLadder.Core.TimeScales;

/// <summary>A rectangular vector in astronomical units.</summary>
public readonly record struct Vector3(double X, double Y, double Z)
{
    public static Vector3 operator +(Vector3 a, Vector3 b) => new(a.X + b.X, a.Y + b.Y, a.Z + b.Z);
    public static Vector3 operator -(Vector3 a, Vector3 b) => new(a.X - b.X, a.Y - b.Y, a.Z - b.Z);
    public static Vector3 operator -(Vector3 a) => new(-a.X, -a.Y, -a.Z);
    public static Vector3 operator *(double s, Vector3 a) => new(s * a.X, s * a.Y, s * a.Z);
    public double Dot(Vector3 b) => X * b.X + Y * b.Y + Z * b.Z;
    public double Length => Math.Sqrt(Dot(this));
}

/// <summary>
/// Low-precision Sun after Meeus, Astronomical Algorithms (2nd ed. 1998), chapter 25, with every intermediate
/// quantity of Example 25.a exposed for tests. Angles in degrees, distance in AU.
/// </summary>
public readonly record struct SunPosition(
    double T, double MeanLongitude, double MeanAnomaly, double Eccentricity, double EquationOfCentre,
    double TrueLongitude, double Radius, double Omega, double ApparentLongitude,
    double MeanObliquity, double ApparentObliquity, double ApparentRa, double ApparentDec);

/// <summary>
/// Positions of the Sun, the Earth and the solar-system barycentre good for light-time corrections at the
/// 0.1 s level (6.6e-4 AU light travel is 0.33 s; we need ~2e-4 AU):
/// <list type="bullet">
/// <item>Geocentric Sun: Meeus 1998 ch. 25 low-precision theory (geometric longitude L0 + C, radius R, mean
/// equinox of date; ~0.01 deg), turned to equatorial coordinates with the mean obliquity and precessed to
/// J2000/ICRS with the IAU 1976 precession angles (Lieske et al. 1977, as in Meeus ch. 21).</item>
/// <item>Sun relative to the barycentre: the reflex of Jupiter, Saturn, Uranus and Neptune (together &gt; 99.9 % of
/// the offset, up to ~0.01 AU = 5 s), their heliocentric positions from the Keplerian mean elements of
/// E. M. Standish, "Keplerian Elements for Approximate Positions of the Major Planets" (JPL Solar System
/// Dynamics, Table 1, valid 1800-2050; coefficients from memory, checked against astropy/ERFA through the
/// barycentric corrections in the tests), masses as Sun/planet ratios of the IAU 2009 system. The terrestrial
/// planets (&lt; 3e-6 AU together) and the Earth-Moon split (4700 km = 0.016 s) are neglected.</item>
/// </list>
/// Times are TDB Julian dates (TT is close enough: &lt; 2 ms).
/// </summary>
public static class SolarSystem
{
    private const double Deg = Math.PI / 180.0;
    private const double ArcSec = Deg / 3600.0;

    /// <summary>Mean obliquity of the ecliptic at J2000 (IAU 1976), degrees.</summary>
    public const double ObliquityJ2000Deg = 23.4392911;

    /// <summary>Meeus low-precision Sun at <paramref name="jde"/> (dynamical-time Julian date).</summary>
    public static SunPosition Sun(double jde)
    {
        double t = (jde - 2451545.0) / 36525.0;
        double l0 = Normalize(280.46646 + t * (36000.76983 + t * 0.0003032));
        double m = Normalize(357.52911 + t * (35999.05029 - t * 0.0001537));
        double e = 0.016708634 - t * (0.000042037 + t * 0.0000001267);
        double mr = m * Deg;
        double c = (1.914602 - t * (0.004817 + t * 0.000014)) * Math.Sin(mr)
                 + (0.019993 - t * 0.000101) * Math.Sin(2 * mr)
                 + 0.000289 * Math.Sin(3 * mr);
        double trueLon = Normalize(l0 + c);
        double nu = (m + c) * Deg;
        double r = 1.000001018 * (1 - e * e) / (1 + e * Math.Cos(nu));
        double omega = Normalize(125.04 - 1934.136 * t);
        double lambda = trueLon - 0.00569 - 0.00478 * Math.Sin(omega * Deg);
        double eps0 = MeanObliquityDeg(t);
        double eps = eps0 + 0.00256 * Math.Cos(omega * Deg);
        double lr = lambda * Deg, er = eps * Deg;
        double ra = Normalize(Math.Atan2(Math.Cos(er) * Math.Sin(lr), Math.Cos(lr)) / Deg);
        double dec = Math.Asin(Math.Sin(er) * Math.Sin(lr)) / Deg;
        return new SunPosition(t, l0, m, e, c, trueLon, r, omega, Normalize(lambda), eps0, eps, ra, dec);
    }

    /// <summary>Mean obliquity (IAU 1976, Meeus eq. 22.2), degrees, T in Julian centuries from J2000.</summary>
    public static double MeanObliquityDeg(double t) =>
        23.0 + 26.0 / 60.0 + (21.448 - t * (46.8150 + t * (0.00059 - t * 0.001813))) / 3600.0;

    /// <summary>Geometric geocentric position of the Sun, ICRS (J2000 mean equator and equinox) axes, AU.</summary>
    public static Vector3 GeocentricSun(double jdTdb)
    {
        var s = Sun(jdTdb);
        double lon = s.TrueLongitude * Deg;
        double eps = s.MeanObliquity * Deg;
        var ofDate = new Vector3(
            s.Radius * Math.Cos(lon),
            s.Radius * Math.Sin(lon) * Math.Cos(eps),
            s.Radius * Math.Sin(lon) * Math.Sin(eps));
        return PrecessToJ2000(ofDate, s.T);
    }

    /// <summary>Position of the Sun relative to the solar-system barycentre, ICRS axes, AU.</summary>
    public static Vector3 BarycentricSun(double jdTdb)
    {
        double t = (jdTdb - 2451545.0) / 36525.0;
        var sum = new Vector3(0, 0, 0);
        double massSum = 1.0;
        foreach (var p in GiantPlanets)
        {
            double mu = 1.0 / p.SunOverPlanet;
            sum += mu * HeliocentricEcliptic(p, t);
            massSum += mu;
        }
        // Barycentre condition: Sun + sum_i mu_i (Sun + r_i) = 0  =>  Sun = -sum mu_i r_i / (1 + sum mu_i).
        return EclipticJ2000ToIcrs((-1.0 / massSum) * sum);
    }

    /// <summary>Position of the geocentre relative to the solar-system barycentre, ICRS axes, AU.</summary>
    public static Vector3 BarycentricEarth(double jdTdb) => BarycentricSun(jdTdb) - GeocentricSun(jdTdb);

    /// <summary>Position of the geocentre relative to the Sun's centre, ICRS axes, AU.</summary>
    public static Vector3 HeliocentricEarth(double jdTdb) => -GeocentricSun(jdTdb);

    /// <summary>Unit vector towards an ICRS direction.</summary>
    public static Vector3 Direction(double raDeg, double decDeg)
    {
        double a = raDeg * Deg, d = decDeg * Deg;
        return new Vector3(Math.Cos(d) * Math.Cos(a), Math.Cos(d) * Math.Sin(a), Math.Sin(d));
    }

    // Inverse of the IAU 1976 precession J2000 -> date (Meeus eq. 21.3/21.4 with J2000 as the starting epoch):
    // P = Rz(-z) Ry(theta) Rz(-zeta); from date to J2000 is the transpose.
    private static Vector3 PrecessToJ2000(Vector3 v, double t)
    {
        double zeta = (2306.2181 + (0.30188 + 0.017998 * t) * t) * t * ArcSec;
        double z = (2306.2181 + (1.09468 + 0.018203 * t) * t) * t * ArcSec;
        double theta = (2004.3109 - (0.42665 + 0.041833 * t) * t) * t * ArcSec;
        double cz = Math.Cos(zeta), sz = Math.Sin(zeta);
        double cZ = Math.Cos(z), sZ = Math.Sin(z);
        double ct = Math.Cos(theta), st = Math.Sin(theta);
        // Rows of P (J2000 -> date).
        double p11 = cZ * ct * cz - sZ * sz, p12 = -cZ * ct * sz - sZ * cz, p13 = -cZ * st;
        double p21 = sZ * ct * cz + cZ * sz, p22 = -sZ * ct * sz + cZ * cz, p23 = -sZ * st;
        double p31 = st * cz, p32 = -st * sz, p33 = ct;
        // Transpose applied.
        return new Vector3(
            p11 * v.X + p21 * v.Y + p31 * v.Z,
            p12 * v.X + p22 * v.Y + p32 * v.Z,
            p13 * v.X + p23 * v.Y + p33 * v.Z);
    }

    private static Vector3 EclipticJ2000ToIcrs(Vector3 v)
    {
        double e = ObliquityJ2000Deg * Deg;
        double c = Math.Cos(e), s = Math.Sin(e);
        return new Vector3(v.X, c * v.Y - s * v.Z, s * v.Y + c * v.Z);
    }

    private readonly record struct Elements(
        string Name, double SunOverPlanet,
        double A, double ADot, double E, double EDot, double I, double IDot,
        double L, double LDot, double Peri, double PeriDot, double Node, double NodeDot);

    // Standish, JPL, Table 1 (1800-2050): a [AU], e, I, L, long. perihelion, long. node [deg] and rates per century.
    // Sun/planet mass ratios: IAU 2009 (system masses).
    private static readonly Elements[] GiantPlanets =
    [
        new("Jupiter", 1047.348644,
            5.20288700, -0.00011607, 0.04838624, -0.00013253, 1.30439695, -0.00183714,
            34.39644051, 3034.74612775, 14.72847983, 0.21252668, 100.47390909, 0.20469106),
        new("Saturn", 3497.9018,
            9.53667594, -0.00125060, 0.05386179, -0.00050991, 2.48599187, 0.00193609,
            49.95424423, 1222.49362201, 92.59887831, -0.41897216, 113.66242448, -0.28867794),
        new("Uranus", 22902.98,
            19.18916464, -0.00196176, 0.04725744, -0.00004397, 0.77263783, -0.00242939,
            313.23810451, 428.48202785, 170.95427630, 0.40805281, 74.01692503, 0.04240589),
        new("Neptune", 19412.26,
            30.06992276, 0.00026291, 0.00859048, 0.00005105, 1.77004347, 0.00035372,
            -55.12002969, 218.45945325, 44.96476227, -0.32241464, 131.78422574, -0.00508664),
    ];

    private static Vector3 HeliocentricEcliptic(Elements p, double t)
    {
        double a = p.A + p.ADot * t;
        double e = p.E + p.EDot * t;
        double inc = (p.I + p.IDot * t) * Deg;
        double l = p.L + p.LDot * t;
        double peri = p.Peri + p.PeriDot * t;
        double node = p.Node + p.NodeDot * t;
        double argPeri = (peri - node) * Deg;
        double m = Normalize180(l - peri) * Deg;
        double ecc = m + e * Math.Sin(m);
        for (int k = 0; k < 10; k++)
        {
            double d = (ecc - e * Math.Sin(ecc) - m) / (1 - e * Math.Cos(ecc));
            ecc -= d;
            if (Math.Abs(d) < 1e-12) break;
        }
        double xp = a * (Math.Cos(ecc) - e);
        double yp = a * Math.Sqrt(1 - e * e) * Math.Sin(ecc);
        double co = Math.Cos(argPeri), so = Math.Sin(argPeri);
        double cn = Math.Cos(node * Deg), sn = Math.Sin(node * Deg);
        double ci = Math.Cos(inc), si = Math.Sin(inc);
        return new Vector3(
            (co * cn - so * sn * ci) * xp + (-so * cn - co * sn * ci) * yp,
            (co * sn + so * cn * ci) * xp + (-so * sn + co * cn * ci) * yp,
            so * si * xp + co * si * yp);
    }

    private static double Normalize(double deg)
    {
        double r = deg % 360.0;
        return r < 0 ? r + 360.0 : r;
    }

    private static double Normalize180(double deg)
    {
        double r = Normalize(deg);
        return r > 180 ? r - 360 : r;
    }
}
