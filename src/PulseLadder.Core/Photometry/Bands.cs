namespace PulseLadder.Core.Photometry;

/// <summary>
/// Photometric bands PulseLadder accepts. Names are case-sensitive where the trade distinguishes them
/// (SDSS lower-case ugriz versus Johnson-Cousins UBVRI).
/// </summary>
public static class Bands
{
    /// <summary>Accepted band names with their system (used for extinction wavelengths and for display).</summary>
    public static IReadOnlyDictionary<string, string> Known { get; } = new Dictionary<string, string>(StringComparer.Ordinal)
    {
        ["U"] = "Johnson-Cousins", ["B"] = "Johnson-Cousins", ["V"] = "Johnson-Cousins",
        ["R"] = "Johnson-Cousins", ["I"] = "Johnson-Cousins",
        ["J"] = "2MASS", ["H"] = "2MASS", ["Ks"] = "2MASS", ["K"] = "2MASS",
        ["u"] = "SDSS", ["g"] = "SDSS", ["r"] = "SDSS", ["i"] = "SDSS", ["z"] = "SDSS",
    };

    /// <summary>Normalises common spellings (e.g. "Ic" to "I", "Rc" to "R", "KS" to "Ks"); false when unknown.</summary>
    public static bool TryNormalize(string? raw, out string band)
    {
        band = string.Empty;
        if (string.IsNullOrWhiteSpace(raw)) return false;
        var s = raw.Trim();
        s = s switch
        {
            "Ic" or "IC" or "I_C" => "I",
            "Rc" or "RC" or "R_C" => "R",
            "KS" or "ks" or "K_s" => "Ks",
            _ => s,
        };
        if (!Known.ContainsKey(s)) return false;
        band = s;
        return true;
    }
}
