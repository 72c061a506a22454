using System.Globalization;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Quantities;
using PulseLadder.Core.TimeScales;

namespace PulseLadder.Core.Tests.LightCurves;

/// <summary>
/// Reader for the open OGLE-III test data in tests/data/open (SOURCE.md there): catalogue rows as dictionaries and
/// light curves (HJD - 2450000, mag, err; band = folder) as observations on hjd_utc, put on BJD_TDB.
/// </summary>
internal static class OgleData
{
    public static string Root
    {
        get
        {
            var dir = new DirectoryInfo(AppContext.BaseDirectory);
            while (dir is not null && !Directory.Exists(Path.Combine(dir.FullName, "data", "open")))
                dir = dir.Parent;
            Assert.NotNull(dir);
            return Path.Combine(dir!.FullName, "data", "open");
        }
    }

    public static List<Dictionary<string, string>> Catalogue(string relativePath)
    {
        var lines = File.ReadAllLines(Path.Combine(Root, relativePath)).Where(l => l.Length > 0).ToList();
        var header = SplitCsv(lines[0]);
        return lines.Skip(1).Select(l =>
        {
            var cells = SplitCsv(l);
            var row = new Dictionary<string, string>(StringComparer.Ordinal);
            for (int i = 0; i < header.Count; i++) row[header[i]] = i < cells.Count ? cells[i] : "";
            return row;
        }).ToList();
    }

    private static List<string> SplitCsv(string line)
    {
        var cells = new List<string>();
        var cur = new System.Text.StringBuilder();
        bool quoted = false;
        foreach (char ch in line)
        {
            if (ch == '"') quoted = !quoted;
            else if (ch == ',' && !quoted) { cells.Add(cur.ToString()); cur.Clear(); }
            else cur.Append(ch);
        }
        cells.Add(cur.ToString());
        return cells;
    }

    public static double D(this Dictionary<string, string> row, string key) => double.Parse(row[key], CultureInfo.InvariantCulture);

    public static bool Has(this Dictionary<string, string> row, string key) => row.TryGetValue(key, out var v) && v.Length > 0;

    public static List<Observation> ReadLightCurve(string folder, string relativeFile, string band, string observer = "OGLE", long firstId = 1)
    {
        var list = new List<Observation>();
        long id = firstId;
        foreach (var line in File.ReadAllLines(Path.Combine(Root, folder, relativeFile)))
        {
            var p = line.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            if (p.Length < 3) continue;
            list.Add(new Observation(id++, double.Parse(p[0], CultureInfo.InvariantCulture) + 2450000.0, TimeScale.HjdUtc, band,
                double.Parse(p[1], CultureInfo.InvariantCulture), double.Parse(p[2], CultureInfo.InvariantCulture), observer, null));
        }
        return list;
    }

    public static List<LightCurvePoint> ToPoints(IReadOnlyList<Observation> obs, double raDeg, double decDeg) =>
        BarycentricTime.ToBjdTdb(obs, SkyPosition.FromDegrees(raDeg, decDeg)).Points.ToList();

    /// <summary>The star's I and V (where present) light curves as BJD_TDB points.</summary>
    public static List<LightCurvePoint> CepheidPoints(Dictionary<string, string> row)
    {
        var obs = new List<Observation>();
        if (row.Has("I_file")) obs.AddRange(ReadLightCurve("lmc-cepheids", row["I_file"], "I"));
        if (row.Has("V_file")) obs.AddRange(ReadLightCurve("lmc-cepheids", row["V_file"], "V", firstId: 100000));
        return ToPoints(obs, row.D("ra_deg"), row.D("dec_deg"));
    }
}
