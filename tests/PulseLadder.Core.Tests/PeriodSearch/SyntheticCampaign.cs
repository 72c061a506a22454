using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>
/// Synthetic ground-based campaign, built to provoke aliases: one site, one visit per clear night at about the same
/// sidereal time (+- 2 h), ~30 % of nights lost to weather, seasonal gaps (the star is up ~240 d a year), two
/// seasons, V and I taken back to back, three observers with their own zero points per band, Gaussian noise.
/// Light-curve shapes are Fourier series (common practice for Cepheids and RR Lyrae; amplitude ratios chosen to be
/// typical, from memory: Cepheid R21 ~ 0.4, RRab sawtooth-like with R_k ~ 1/k, RRc nearly sinusoidal).
/// </summary>
public static class SyntheticCampaign
{
    public enum Kind { Cepheid, RRab, RRc }

    public sealed record Star(Kind Kind, double PeriodDays, List<LightCurvePoint> Points);

    private const double SiderealDay = 0.9972695663;

    /// <summary>Observer zero points (mag) per band, relative to "alice".</summary>
    public static readonly (string Name, double V, double I, double Share)[] Observers =
    [
        ("alice", 0.00, 0.00, 0.5),
        ("bob", 0.035, -0.02, 0.3),
        ("carol", -0.025, 0.045, 0.2),
    ];

    public static Star Make(Kind kind, int seed)
    {
        var rng = new Random(seed);
        double period = kind switch
        {
            Kind.Cepheid => Math.Exp(Math.Log(2) + rng.NextDouble() * (Math.Log(60) - Math.Log(2))),
            Kind.RRab => 0.45 + rng.NextDouble() * 0.35,
            _ => 0.28 + rng.NextDouble() * 0.14,
        };
        // Peak-to-peak V amplitude 0.3-1 mag; I about 0.6 of V (common practice).
        double ampV = kind switch
        {
            Kind.Cepheid => 0.3 + rng.NextDouble() * 0.7,
            Kind.RRab => 0.6 + rng.NextDouble() * 0.4,
            _ => 0.3 + rng.NextDouble() * 0.2,
        };
        double[] r; double[] phi;
        switch (kind)
        {
            case Kind.Cepheid:
                r = [1, 0.35 + 0.1 * rng.NextDouble(), 0.15 + 0.1 * rng.NextDouble(), 0.05 + 0.05 * rng.NextDouble()];
                phi = [0, 2.0 + 0.5 * rng.NextDouble(), 4.0 + 0.8 * rng.NextDouble(), 0.3 + rng.NextDouble()];
                break;
            case Kind.RRab:
                r = [1, 0.5, 0.33, 0.25, 0.2, 0.15];
                phi = [0, 0.1 * rng.NextDouble(), 0.1 * rng.NextDouble(), 0.1 * rng.NextDouble(), 0, 0];
                break;
            default:
                r = [1, 0.1 + 0.1 * rng.NextDouble()];
                phi = [0, 4.5 + rng.NextDouble()];
                break;
        }
        // Normalise the shape to unit peak-to-peak.
        double Shape(double ph)
        {
            double s = 0;
            for (int k = 0; k < r.Length; k++) s += r[k] * Math.Sin(2 * Math.PI * (k + 1) * ph + phi[k]);
            return s;
        }
        double lo = double.MaxValue, hi = double.MinValue;
        for (int i = 0; i < 1000; i++) { double v = Shape(i / 1000.0); lo = Math.Min(lo, v); hi = Math.Max(hi, v); }
        double norm = 1 / (hi - lo);
        double phase0 = rng.NextDouble();
        double sigma = 0.02 + 0.01 * rng.NextDouble();
        double meanV = 12 + 3 * rng.NextDouble(), meanI = meanV - 0.7;

        var pts = new List<LightCurvePoint>();
        double start = 2_460_000.5 + rng.NextDouble() * 365;
        long id = 1;
        for (int night = 0; night < 730; night++)
        {
            double dayOfYear = night % 365.25;
            if (dayOfYear > 240) continue;            // seasonal gap
            if (rng.NextDouble() < 0.30) continue;    // weather
            // Same sidereal time every night: the clock time drifts by ~3.9 min per day.
            double t = start + night * SiderealDay + (rng.NextDouble() * 4 - 2) / 24.0;
            double u = rng.NextDouble();
            int o = u < Observers[0].Share ? 0 : u < Observers[0].Share + Observers[1].Share ? 1 : 2;
            for (int b = 0; b < 2; b++)
            {
                double tb = t + b * 0.004;
                double ph = (tb - start) / period + phase0;
                double amp = b == 0 ? ampV : 0.6 * ampV;
                double mean = b == 0 ? meanV : meanI;
                double zp = b == 0 ? Observers[o].V : Observers[o].I;
                double mag = mean + amp * norm * Shape(ph) + zp + sigma * Gauss(rng);
                pts.Add(new LightCurvePoint(id++, tb, b == 0 ? "V" : "I", mag, sigma, Observers[o].Name));
            }
        }
        return new Star(kind, period, pts);
    }

    private static double Gauss(Random rng)
    {
        double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
