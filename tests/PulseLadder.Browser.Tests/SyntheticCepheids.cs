using System.Globalization;
using System.Text;

namespace PulseLadder.Browser.Tests;

/// <summary>One invented Cepheid: its name, true period and light-curve shape.</summary>
internal sealed record SyntheticStar(string Name, double PeriodDays, double MeanV, double AmplitudeV, double RaDeg, double DecDeg);

/// <summary>
/// Invented photometry of Cepheid-like stars with a known period, sampled once a night (so the periodogram has the
/// usual one-day aliases to click on), in V and I, by two observers. Deterministic (fixed seed).
/// </summary>
internal static class SyntheticCepheids
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public const double FirstBjd = 2460200.5;

    public static string StarList(string field, IEnumerable<SyntheticStar> stars)
    {
        var sb = new StringBuilder("star,field,ra_deg,dec_deg,class,ebv,feh\n");
        foreach (var s in stars)
            sb.Append(Inv, $"{s.Name},{field},{s.RaDeg:F5},{s.DecDeg:F5},dcep_f,0.080,-0.35\n");
        return sb.ToString();
    }

    /// <summary>CSV with header star,time,band,mag,mag_err,observer; times in BJD_TDB.</summary>
    public static string Photometry(IEnumerable<SyntheticStar> stars, int nights = 110, int seed = 20261201)
    {
        var rng = new Random(seed);
        var sb = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        foreach (var s in stars)
        {
            for (int n = 0; n < nights; n++)
            {
                // Roughly one visit per night across ~250 nights, at a similar hour: strong one-day aliases.
                double t = FirstBjd + Math.Floor(n * 2.3) + 0.25 + 0.08 * rng.NextDouble();
                string observer = n % 3 == 0 ? "north-dome" : "south-dome";
                foreach (var (band, m0, scale) in new[] { ("V", s.MeanV, 1.0), ("I", s.MeanV - 0.75, 0.55) })
                {
                    double phase = (t - FirstBjd) / s.PeriodDays;
                    phase -= Math.Floor(phase);
                    double shape = 0.5 * Math.Cos(2 * Math.PI * phase) + 0.17 * Math.Cos(4 * Math.PI * phase + 0.9)
                                 + 0.07 * Math.Cos(6 * Math.PI * phase + 1.8);
                    double mag = m0 + s.AmplitudeV * scale * shape + 0.012 * Gauss(rng);
                    sb.Append(Inv, $"{s.Name},{t:F5},{band},{mag:F4},0.012,{observer}\n");
                }
            }
        }
        return sb.ToString();
    }

    private static double Gauss(Random rng)
    {
        double u1 = 1.0 - rng.NextDouble();
        double u2 = rng.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
