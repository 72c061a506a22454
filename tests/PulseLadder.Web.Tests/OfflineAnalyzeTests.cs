using System.Globalization;
using PulseLadder.Cli;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Web.Tests;

/// <summary>
/// <c>pulseladder analyze</c> on real OGLE-III photometry of LMC Cepheids (tests/data/open/lmc-cepheids; OGLE
/// Collection of Variable Stars, Soszynski et al. 2008, AcA 58, 163; see its SOURCE.md and NOTICE).
/// </summary>
public sealed class OfflineAnalyzeTests
{
    private static readonly string Data = Path.Combine(AppContext.BaseDirectory, "data", "open", "lmc-cepheids");

    private sealed record Catalogue(string Star, string Mode, double Period, double PeriodErr, double Ra, double Dec, double? MeanI, double? MeanV);

    private static List<Catalogue> ReadCatalogue()
    {
        var lines = File.ReadAllLines(Path.Combine(Data, "catalogue", "ogle3_values.csv"));
        var h = lines[0].Split(',');
        int I(string n) => Array.IndexOf(h, n);
        static double? D(string s) => double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : null;
        return lines.Skip(1).Select(l => SplitCsv(l)).Select(f => new Catalogue(f[I("star_id")], f[I("mode")], D(f[I("period_d")])!.Value,
            D(f[I("period_err_d")]) ?? 0, D(f[I("ra_deg")])!.Value, D(f[I("dec_deg")])!.Value, D(f[I("mean_I_mag")]), D(f[I("mean_V_mag")]))).ToList();
    }

    private static string[] SplitCsv(string line)
    {
        var cells = new List<string>();
        var cur = new System.Text.StringBuilder();
        bool q = false;
        foreach (char ch in line)
        {
            if (ch == '"') q = !q;
            else if (ch == ',' && !q) { cells.Add(cur.ToString()); cur.Clear(); }
            else cur.Append(ch);
        }
        cells.Add(cur.ToString());
        return cells.ToArray();
    }

    [Fact]
    public void Analyze_RecoversOgleCataloguePeriodsAndLmcDistance_OnThreeColumnFiles()
    {
        var cat = ReadCatalogue();
        string dir = Path.Combine(Path.GetTempPath(), "plx-offline", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(dir);
        string stars = Path.Combine(dir, "stars.csv");
        File.WriteAllText(stars, "star,field,ra_deg,dec_deg,class\n" + string.Concat(cat.Select(c =>
            string.Create(CultureInfo.InvariantCulture, $"{c.Star},LMC,{c.Ra},{c.Dec},{(c.Mode == "F" ? "dcep_f" : "dcep_1o")}\n"))));
        var files = Directory.GetFiles(Path.Combine(Data, "ogle3"), "*.dat", SearchOption.AllDirectories)
            .Where(f => cat.Any(c => Path.GetFileNameWithoutExtension(f) == c.Star)).Order(StringComparer.Ordinal).ToList();
        Assert.NotEmpty(files);

        // OGLE times are HJD - 2450000 (SOURCE.md); the band is the folder name (I/ or V/).
        var results = OfflineAnalysis.Run(stars, files, TimeScale.HjdUtc, 2450000, null, null, PipelineSettings.Default);
        var records = results.Select(AnalyzeRecord.From).ToDictionary(r => r.Star);

        int checkedStars = 0;
        foreach (var c in cat.Where(c => records.ContainsKey(c.Star)))
        {
            var r = records[c.Star];
            Assert.NotNull(r.PeriodDays);
            // Within 3 sigma of our error and the catalogue's combined (the catalogue used OGLE-II+III baselines).
            double sigma = Math.Sqrt(Math.Pow(r.PeriodErrDays ?? 0, 2) + c.PeriodErr * c.PeriodErr);
            Assert.True(Math.Abs(r.PeriodDays!.Value - c.Period) <= 3 * sigma, $"{c.Star}: period {r.PeriodDays} +- {r.PeriodErrDays} vs catalogue {c.Period} +- {c.PeriodErr}");
            if (c.MeanI is { } mi && r.MeanMag.TryGetValue("I", out var gotI))
                Assert.True(Math.Abs(gotI - mi) < 0.02, $"{c.Star}: <I> {gotI} vs OGLE-III {mi}");
            checkedStars++;
        }
        Assert.True(checkedStars >= 12);

        // LMC distance: Cepheids with V and I get a reddening-free Wesenheit distance from a parallax-calibrated
        // Galactic relation; the median must agree with the geometric 18.477 +- 0.026 (Pietrzynski et al. 2019,
        // Nature 567, 200) within the relation's zero-point error plus the scatter of a handful of stars.
        var mus = records.Values.Where(r => r.DistanceModulus is not null && r.MeanMag.ContainsKey("V") && r.MeanMag.ContainsKey("I"))
            .Select(r => r.DistanceModulus!.Value).Order().ToList();
        Assert.True(mus.Count >= 8, $"only {mus.Count} stars with V, I and a distance");
        double median = mus[mus.Count / 2];
        Assert.InRange(median, 18.477 - 0.2, 18.477 + 0.2);

        // The same run through the JSON writer keeps the stable field names other tools read.
        string json = System.Text.Json.JsonSerializer.Serialize(records.Values.First());
        foreach (var name in new[] { "\"star\"", "\"field\"", "\"class\"", "\"period_days\"", "\"period_err_days\"", "\"fap\"", "\"mean_mag\"",
                     "\"amplitude\"", "\"ebv\"", "\"distance_modulus\"", "\"distance_modulus_err\"", "\"distance_pc\"", "\"distance_pc_err\"", "\"flags\"" })
            Assert.Contains(name, json);
    }

    [Fact]
    public void Analyze_RefusesInputWithFileAndLine_WhenARowIsBad()
    {
        string dir = Path.Combine(Path.GetTempPath(), "plx-offline", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(dir);
        File.WriteAllText(Path.Combine(dir, "stars.csv"), "star,field,ra_deg,dec_deg\nS1,F,10,-20\n");
        string phot = Path.Combine(dir, "S1.dat");
        File.WriteAllText(phot, "2165.85632 14.401 0.006\n2171.87872 14.5x18 0.006\n");
        var e = Assert.Throws<InputRefusedException>(() => OfflineAnalysis.Run(Path.Combine(dir, "stars.csv"), [phot], TimeScale.HjdUtc, 2450000, null, "I", PipelineSettings.Default));
        Assert.Contains(e.Problems, p => p.Contains("S1.dat:2:") && p.Contains("mag"));
    }
}
