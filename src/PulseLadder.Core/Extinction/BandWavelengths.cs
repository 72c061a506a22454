using PulseLadder.Core.Calibration;

namespace PulseLadder.Core.Extinction;

/// <summary>
/// Effective wavelengths (micrometres) used to evaluate an extinction law for each accepted band. One value per
/// band for all stars (the true effective wavelength shifts with the star's colour by a few nm; ignored). The
/// values and their sources are listed in docs/calibrations.md.
/// </summary>
public static class BandWavelengths
{
    private static readonly Dictionary<string, double> Micron = new(StringComparer.Ordinal)
    {
        // Johnson-Cousins. V at 1/1.82 = 0.54945 um: CCM89's reference point (y = 0), so A_V/A_V = 1 exactly for CCM/O'D.
        ["U"] = 0.365, ["B"] = 0.440, ["V"] = 1.0 / 1.82, ["R"] = 0.640, ["I"] = 0.800,
        // 2MASS (Cohen et al. 2003 isophotal wavelengths, from memory); K = Johnson K at 2.20 um (CCM89 Table 3).
        ["J"] = 1.235, ["H"] = 1.662, ["Ks"] = 2.159, ["K"] = 2.20,
        // SDSS (Fukugita et al. 1996 effective wavelengths, from memory).
        ["u"] = 0.3551, ["g"] = 0.4686, ["r"] = 0.6166, ["i"] = 0.7480, ["z"] = 0.8932,
    };

    public static IReadOnlyDictionary<string, double> All => Micron;

    public static bool TryGet(string band, out double micron) => Micron.TryGetValue(band, out micron);

    /// <summary>A_band / A_V for <paramref name="band"/>; throws for an unknown band (bands are validated at ingest).</summary>
    public static double AOverAv(string band, ExtinctionLaw law, double rv)
    {
        if (!Micron.TryGetValue(band, out var lam)) throw new ArgumentException($"no effective wavelength for band '{band}'", nameof(band));
        return ExtinctionLaws.AOverAv(law, lam, rv);
    }
}

/// <summary>Source of a broad-band extinction coefficient table.</summary>
public enum CoefficientTable { Sfd98, Sf11 }

/// <summary>
/// Tabulated A_band/E(B-V) at R_V = 3.1 (IRSA dust service: SFD98 Table 6 and Schlafly &amp; Finkbeiner 2011), from
/// Data/calibration/extinction_coefficients.csv. S&amp;F values multiply the SFD-map E(B-V).
/// </summary>
public static class ExtinctionCoefficients
{
    private static readonly Lazy<Dictionary<(string System, string Band), (double Sfd, double Sf)>> Table = new(LoadTable);

    public static bool TryGet(string system, string band, CoefficientTable source, out double aOverEbv)
    {
        if (Table.Value.TryGetValue((system, band), out var v))
        {
            aOverEbv = source == CoefficientTable.Sfd98 ? v.Sfd : v.Sf;
            return true;
        }
        aOverEbv = 0;
        return false;
    }

    public static IEnumerable<(string System, string Band)> Entries => Table.Value.Keys;

    private static Dictionary<(string, string), (double, double)> LoadTable()
    {
        var errors = new List<CalibrationFileError>();
        var t = CsvTable.Parse(CalibrationRegistry.ReadResource("extinction_coefficients.csv"), errors);
        var d = new Dictionary<(string, string), (double, double)>();
        foreach (var row in t.Rows)
            d[(row.Text("system", errors), row.Text("band", errors))] = (row.Number("sfd98", errors, 0, 10), row.Number("sf11", errors, 0, 10));
        if (errors.Count > 0) throw new InvalidOperationException("embedded extinction table invalid: " + string.Join("; ", errors.Select(e => e.ToString())));
        return d;
    }
}
