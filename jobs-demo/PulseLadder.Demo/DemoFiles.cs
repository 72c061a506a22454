using System.Globalization;
using System.Text;

namespace PulseLadder.Demo;

/// <summary>
/// The file set of a demo campaign. Numbers in invariant culture, LF line ends, fixed column order.
/// <list type="bullet">
/// <item>stars.csv: star list (star, field, ra_deg, dec_deg, class, ebv, ebv_err, feh).</item>
/// <item>photometry-&lt;observer&gt;.csv: one per observer (star, time, band, mag, mag_err, observer); time = JD(UTC) - 2450000.</item>
/// <item>truth.csv: the true parameters of every star.</item>
/// <item>observers.csv: sites and the zero-point offsets each observer's magnitudes carry.</item>
/// <item>README.md: the scenario and the model.</item>
/// </list>
/// </summary>
public static class DemoFiles
{
    public const string StarList = "stars.csv", Truth = "truth.csv", ObserverList = "observers.csv", Readme = "README.md";

    /// <summary>Name of the photometry file of <paramref name="observer"/>.</summary>
    public static string PhotometryFileName(string observer) => $"photometry-{observer}.csv";

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    internal static IReadOnlyList<DemoFile> Render(DemoCampaignData data)
    {
        var files = new List<DemoFile> { new(StarList, RenderStars(data)) };
        foreach (var observer in data.Observers)
            files.Add(new DemoFile(PhotometryFileName(observer.Name), RenderPhotometry(data, observer.Name)));
        files.Add(new DemoFile(Truth, RenderTruth(data)));
        files.Add(new DemoFile(ObserverList, RenderObservers(data)));
        files.Add(new DemoFile(Readme, RenderReadme(data)));
        return files;
    }

    private static string F(double v, string format) => v.ToString(format, Inv);

    private static string F(double? v, string format) => v is { } x ? x.ToString(format, Inv) : string.Empty;

    private static string RenderStars(DemoCampaignData data)
    {
        var sb = new StringBuilder();
        sb.Append("star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh\n");
        foreach (var s in data.Stars)
        {
            string cls = data.Options.DeclareClasses ? s.Class : string.Empty;
            sb.Append(s.Name).Append(',').Append(s.Field).Append(',').Append(F(s.RaDeg, "F6")).Append(',').Append(F(s.DecDeg, "F6"))
              .Append(',').Append(cls).Append(',').Append(F(s.ListedEbv, "F3")).Append(",0.020,").Append(F(s.FeH, "F2")).Append('\n');
        }
        return sb.ToString();
    }

    private static string RenderPhotometry(DemoCampaignData data, string observer)
    {
        var sb = new StringBuilder(1 << 20);
        sb.Append("star,time,band,mag,mag_err,observer\n");
        foreach (var m in data.Measurements)
        {
            if (m.Observer != observer) continue;
            sb.Append(m.Star).Append(',');
            AppendFixed(sb, m.Time, 6);
            sb.Append(',').Append(m.Band).Append(',');
            AppendFixed(sb, m.Mag, 3);
            sb.Append(',');
            AppendFixed(sb, m.MagErr, 3);
            sb.Append(',').Append(m.Observer).Append('\n');
        }
        return sb.ToString();
    }

    private static readonly long[] Powers = [1, 10, 100, 1000, 10_000, 100_000, 1_000_000, 10_000_000];

    /// <summary>
    /// Fixed-point text of <paramref name="value"/> with <paramref name="decimals"/> digits (half away from zero),
    /// culture-free; the photometry files have ~10^5 rows, where double.ToString("F6") dominated generation time.
    /// </summary>
    internal static void AppendFixed(StringBuilder sb, double value, int decimals)
    {
        long pow = Powers[decimals];
        long scaled = (long)Math.Round(value * pow, MidpointRounding.AwayFromZero);
        if (scaled < 0)
        {
            sb.Append('-');
            scaled = -scaled;
        }
        Span<char> buf = stackalloc char[24];
        int pos = buf.Length;
        for (int d = 0; d < decimals; d++)
        {
            buf[--pos] = (char)('0' + (int)(scaled % 10));
            scaled /= 10;
        }
        buf[--pos] = '.';
        do
        {
            buf[--pos] = (char)('0' + (int)(scaled % 10));
            scaled /= 10;
        } while (scaled > 0);
        sb.Append(buf[pos..]);
    }

    private static string RenderTruth(DemoCampaignData data)
    {
        var sb = new StringBuilder();
        sb.Append("star,field,class,period_days,fundamental_period_days,epoch_max_light_jd_utc,mean_b_int,mean_v_int,mean_i_int,")
          .Append("abs_v,abs_i,amp_v,mu,distance_pc,ebv,listed_ebv,feh,has_b\n");
        foreach (var s in data.Stars)
        {
            sb.Append(s.Name).Append(',').Append(s.Field).Append(',').Append(s.Class).Append(',')
              .Append(F(s.PeriodDays, "F7")).Append(',').Append(F(s.FundamentalPeriodDays, "F7")).Append(',')
              .Append(F(s.EpochMaxLightJd, "F6")).Append(',')
              .Append(s.HasB ? F(s.MeanB, "F4") : string.Empty).Append(',').Append(F(s.MeanV, "F4")).Append(',').Append(F(s.MeanI, "F4")).Append(',')
              .Append(F(s.AbsV, "F4")).Append(',').Append(F(s.AbsI, "F4")).Append(',').Append(F(s.AmplitudeV, "F3")).Append(',')
              .Append(F(s.DistanceModulus, "F3")).Append(',').Append(F(Math.Pow(10, s.DistanceModulus / 5 + 1), "F1")).Append(',')
              .Append(F(s.Ebv, "F4")).Append(',').Append(F(s.ListedEbv, "F3")).Append(',').Append(F(s.FeH, "F2")).Append(',')
              .Append(s.HasB ? "true" : "false").Append('\n');
        }
        return sb.ToString();
    }

    private static string RenderObservers(DemoCampaignData data)
    {
        var sb = new StringBuilder();
        sb.Append("observer,site,longitude_deg,latitude_deg,zp_b,zp_v,zp_i,measurements\n");
        foreach (var o in data.Observers)
        {
            int n = data.Measurements.Count(m => m.Observer == o.Name);
            sb.Append(o.Name).Append(',').Append(o.Site).Append(',').Append(F(o.LongitudeDeg, "F2")).Append(',').Append(F(o.LatitudeDeg, "F2"))
              .Append(',').Append(F(o.ZeroPointB, "F3")).Append(',').Append(F(o.ZeroPointV, "F3")).Append(',').Append(F(o.ZeroPointI, "F3"))
              .Append(',').Append(n.ToString(Inv)).Append('\n');
        }
        return sb.ToString();
    }

    private static string RenderReadme(DemoCampaignData data)
    {
        var o = data.Options;
        var sb = new StringBuilder();
        sb.Append("# ").Append(data.Consortium).Append(": demo campaign (invented)\n\n");
        sb.Append("Everything here is made up by PulseLadder's demo generator: the collaboration, the sites, the fields and every star.\n");
        sb.Append(string.Create(Inv, $"Seed {o.Seed}, {data.Stars.Count} stars, {o.Seasons} seasons from 2025-08-01, {data.Measurements.Count} measurements.\n\n"));
        sb.Append("## Upload\n\n");
        sb.Append("Times are JD (UTC) minus 2450000: declare time scale `jd_utc` and offset `2450000`.\n\n");
        sb.Append("    pulseladder upload --server URL --stars stars.csv --time-scale jd_utc --time-offset 2450000 photometry-*.csv\n\n");
        sb.Append("## Files\n\n");
        sb.Append("- `stars.csv`: star list (star, field, ra_deg, dec_deg, class, ebv, ebv_err, feh). The class column is ")
          .Append(o.DeclareClasses ? "filled with the true class" : "left empty (the pipeline classifies)")
          .Append("; ebv is the true E(B-V) plus a 0.02 mag error; feh is given for RR Lyrae only.\n");
        sb.Append("- `photometry-<observer>.csv`: star, time, band, mag, mag_err, observer.\n");
        sb.Append("- `truth.csv`: true class, period, fundamentalised period, epoch of maximum V light, intensity-mean B/V/I, absolute V/I, V amplitude, mu, distance, E(B-V), [Fe/H].\n");
        sb.Append("- `observers.csv`: sites and the zero-point offset added to each observer's magnitudes.\n\n");
        sb.Append("## Fields\n\n| field | what | RA | Dec | mu0 | E(B-V) |\n|---|---|---|---|---|---|\n");
        foreach (var f in data.Fields)
            sb.Append(string.Create(Inv, $"| {f.Name} | {f.Description} | {f.RaDeg:F2} | {f.DecDeg:F2} | {f.DistanceModulus:F2} | {f.Ebv:F2} +- {f.EbvScatter:F2} |\n"));
        sb.Append("\n## Observers\n\n| observer | site | longitude | latitude | zero point B/V/I |\n|---|---|---|---|---|\n");
        foreach (var ob in data.Observers)
            sb.Append(string.Create(Inv, $"| {ob.Name} | {ob.Site} | {ob.LongitudeDeg:F2} | {ob.LatitudeDeg:F2} | {ob.ZeroPointB:+0.000;-0.000;0.000} / {ob.ZeroPointV:+0.000;-0.000;0.000} / {ob.ZeroPointI:+0.000;-0.000;0.000} |\n"));
        sb.Append("""

## Model

- Classical Cepheids (F: 2-12 d in ember-knot, 2-60 d in lantern-cloud, 15-60 d in hollow-spiral; first overtone 1-5 d,
  3-5 d in hollow-spiral): M_V = -2.43 (log P - 1) - 4.05, M_I = -2.81 (log P - 1) - 4.78 (Benedict et al. 2007),
  plus a per-star scatter dV ~ N(0, 0.10), dI = 0.7 dV. Overtones use the fundamentalised period
  P0 = P1 / (0.716 - 0.027 log P1) in the same relation. (B-V)0 = 0.416 log P0 + 0.314.
- RR Lyrae (ab 0.45-0.8 d, c 0.28-0.42 d): [Fe/H] ~ N(-1.5, 0.25); M_V = 0.59 + 0.214 ([Fe/H] + 1.5);
  M_I = 0.471 - 1.132 log P0 + 0.205 log Z (Catelan, Pritzl and Smith 2004) with log Z = [Fe/H] + log(0.638 10^0.3 + 0.362) - 1.765
  and log P0 = log P1 + 0.127 for RRc; common per-star scatter N(0, 0.05). (B-V)0 = 0.30 (ab), 0.25 (c).
- Constant stars: V uniform in 12.5-19.5, (V-I)0 in 0.4-1.4, (B-V)0 = 0.85 (V-I)0.
- Extinction: A_V = 3.1 E(B-V), A_I = 0.6 A_V, A_B = A_V + E(B-V); per-star E(B-V) = field mean + N(0, field spread).
- Light curves: m = A0 + a [sin 2 pi phi + R21 sin(4 pi phi + phi21) + R31 sin(6 pi phi + phi31)], scaled so that the
  peak-to-peak amplitude and the intensity mean are the true ones. V amplitudes: F 0.4-1.2, 1O 0.25-0.5, RRab 0.5-1.3
  (falling with period), RRc 0.3-0.55; I = 0.6 V, B = 1.45 V; the same shape in every band.
  R21/R31/phi21/phi31 ~ F: 0.42/0.22/2.5/5.2 (0.18/0.10/3.0/5.6 for 8-13 d); 1O: 0.15/0.05/4.6/3.0;
  RRab: 0.48/0.33/2.45/5.1; RRc: 0.15/0.06/3.0/6.0 (each with a per-star spread).
- Sampling: each observer's site has its own longitude; a field is observable when it transits within 5 h of local
  midnight (a ~150-night season each year). Each night is clear with probability 1 - weather loss; on a clear night
  an observer visits a field with a fixed probability and takes 1 or 2 epochs within about 1.5 h of transit; each
  epoch is B (ember-knot, Sablewood only), V and I a few minutes apart.
- Noise: sigma = min(0.05, 0.01 + 0.04 exp((m - 21) / 1.5)); the reported error scatters 5% around sigma; a fraction
  of measurements (default 0.5%) is shifted by 0.3-1 mag either way (outliers). Each observer's magnitudes carry
  its zero-point offset.
""");
        return sb.ToString();
    }
}
