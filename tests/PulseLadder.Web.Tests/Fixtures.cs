using System.Globalization;
using System.Text;

namespace PulseLadder.Web.Tests;

/// <summary>Small synthetic uploads with known answers.</summary>
internal static class Fixtures
{
    public const string StarList = "star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh\n" +
        "T-CEP-1,test-field,80.5,-69.2,dcep_f,0.10,0.02,\n" +
        "T-CEP-2,test-field,80.7,-69.3,,0.12,0.02,\n";

    /// <summary>A non-sinusoidal Cepheid light curve in V and I, one point per night over two seasons (JD_UTC - 2450000).</summary>
    public static string Photometry(string star, double period, double meanV, int nights = 120, double t0 = 11000.3, int seed = 1)
    {
        var rng = new Random(seed);
        var sb = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        for (int n = 0; n < nights; n++)
        {
            if (rng.NextDouble() < 0.2) continue;
            double t = t0 + n + (n >= nights / 2 ? 200 : 0) + 0.05 * rng.NextDouble();
            double ph = 2 * Math.PI * (t - t0) / period;
            double shape = 0.35 * Math.Sin(ph) + 0.14 * Math.Sin(2 * ph + 1.0) + 0.05 * Math.Sin(3 * ph + 2.0);
            foreach (var (band, scale, offset) in new[] { ("V", 1.0, 0.0), ("I", 0.6, -0.7) })
            {
                double m = meanV + offset + scale * shape + 0.015 * Gauss(rng);
                sb.Append(CultureInfo.InvariantCulture, $"{star},{t:F5},{band},{m:F4},0.015,site{n % 3}\n");
            }
        }
        return sb.ToString();
    }

    private static double Gauss(Random r) => Math.Sqrt(-2 * Math.Log(1 - r.NextDouble())) * Math.Cos(2 * Math.PI * r.NextDouble());

    public static MultipartFormDataContent Form(string? stars, IEnumerable<(string Name, string Content)> photometry, string? timeScale = "jd_utc", string? offset = "2450000")
    {
        var form = new MultipartFormDataContent();
        if (stars is not null) form.Add(new StringContent(stars), "stars", "stars.csv");
        foreach (var (name, content) in photometry) form.Add(new StringContent(content), "photometry", name);
        if (timeScale is not null) form.Add(new StringContent(timeScale), "time_scale");
        if (offset is not null) form.Add(new StringContent(offset), "time_offset");
        return form;
    }
}
