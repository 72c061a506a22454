using System.Globalization;
using PulseLadder.Web.Api;

namespace PulseLadder.Web.Export;

/// <summary>
/// One export column: the same name in CSV, JSON and VOTable. <see cref="Unit"/> is an IVOA VOUnit string
/// ("" for dimensionless), <see cref="Ucd"/> an IVOA UCD1+ word list. A value is a double, a string or null.
/// </summary>
internal sealed record ExportColumn(string Name, ExportKind Kind, string Unit, string Ucd, string Description, Func<StarRowDto, object?> Value);

internal enum ExportKind { Text, Number }

/// <summary>The known export columns (fixed ones plus per-band mean magnitude and amplitude) and their selection.</summary>
internal static class ExportColumns
{
    /// <summary>
    /// Every column available for these rows, in the stable export order: per-band columns follow the bands
    /// present, in name order (the CSV layout of earlier versions).
    /// </summary>
    public static IReadOnlyList<ExportColumn> Available(IReadOnlyList<StarRowDto> rows)
    {
        var bands = rows.SelectMany(r => r.MeanMag.Keys.Concat(r.Amplitude.Keys)).Distinct().Order(StringComparer.Ordinal).ToList();
        var list = new List<ExportColumn>
        {
            Text("star", "meta.id;meta.main", "Star name", r => r.Star),
            Text("field", "meta.id.parent", "Field name", r => r.Field),
            Text("state", "meta.code.status", "Review state: awaiting, accepted or rejected", r => r.State),
            Text("class", "src.class", "Pulsator class code (dcep_f, dcep_1o, t2cep, rrab, rrc, ...)", r => r.Class),
            Num("period_days", "d", "time.period;src.var", "Pulsation period", r => r.PeriodDays),
            Num("period_err_days", "d", "stat.error;time.period", "1-sigma error of the period", r => r.PeriodErrDays),
            Num("fap", "", "stat.probability", "False-alarm probability of the best periodogram peak", r => r.Fap),
        };
        list.AddRange(bands.Select(b => Num("mean_mag_" + b, "mag", "phot.mag;" + BandUcd(b), $"Intensity-mean {b} magnitude",
            r => r.MeanMag.TryGetValue(b, out var v) ? v : null)));
        list.AddRange(bands.Select(b => Num("amplitude_" + b, "mag", "src.var.amplitude;" + BandUcd(b), $"Peak-to-peak {b} amplitude of the Fourier fit",
            r => r.Amplitude.TryGetValue(b, out var v) ? v : null)));
        list.AddRange([
            Num("ebv", "mag", "phot.color.excess", "Colour excess E(B-V) used", r => r.Ebv),
            Num("distance_modulus", "mag", "phot.mag.distMod", "Distance modulus (Monte Carlo median)", r => r.DistanceModulus),
            Num("distance_modulus_err", "mag", "stat.error;phot.mag.distMod", "Total 1-sigma error of the distance modulus", r => r.DistanceModulusErr),
            Num("distance_pc", "pc", "pos.distance", "Distance", r => r.DistancePc),
            Num("distance_pc_err", "pc", "stat.error;pos.distance", "1-sigma error of the distance", r => r.DistancePcErr),
            Text("relation_id", "meta.id", "Id of the period-luminosity relation used (see the methods text)", r => r.RelationId),
            Num("ra_deg", "deg", "pos.eq.ra;meta.main", "Right ascension (ICRS)", r => r.RaDeg),
            Num("dec_deg", "deg", "pos.eq.dec;meta.main", "Declination (ICRS)", r => r.DecDeg),
            Text("flags", "meta.code", "Review flags, ';'-separated", r => string.Join(';', r.Flags)),
        ]);
        return list;
    }

    /// <summary>
    /// The columns named in <paramref name="columns"/> (comma-separated, in the order given), or all when empty.
    /// Returns the first unknown or repeated name instead when there is one.
    /// </summary>
    public static (IReadOnlyList<ExportColumn>? Columns, string? Error) Select(IReadOnlyList<ExportColumn> available, string? columns)
    {
        if (string.IsNullOrWhiteSpace(columns)) return (available, null);
        var byName = available.ToDictionary(c => c.Name, StringComparer.Ordinal);
        var chosen = new List<ExportColumn>();
        foreach (var raw in columns.Split(','))
        {
            var name = raw.Trim();
            if (!byName.TryGetValue(name, out var col))
                return (null, $"Unknown column '{name}'. Known columns: {string.Join(", ", available.Select(c => c.Name))}.");
            if (chosen.Contains(col)) return (null, $"Column '{name}' is listed twice.");
            chosen.Add(col);
        }
        return (chosen, null);
    }

    /// <summary>UCD1+ spectral word of a photometric band (em.opt.* / em.IR.*); unknown bands get the generic "em.opt".</summary>
    internal static string BandUcd(string band) => band switch
    {
        "U" => "em.opt.U",
        "B" => "em.opt.B",
        "V" => "em.opt.V",
        "R" or "Rc" => "em.opt.R",
        "I" or "Ic" => "em.opt.I",
        "J" => "em.IR.J",
        "H" => "em.IR.H",
        "K" or "Ks" => "em.IR.K",
        "3.6" or "W1" => "em.IR.3-4um",
        "4.5" or "W2" => "em.IR.4-8um",
        _ => "em.opt",
    };

    internal static string Format(object? v) => v switch
    {
        null => "",
        double d => d.ToString("R", CultureInfo.InvariantCulture),
        string s => s,
        _ => Convert.ToString(v, CultureInfo.InvariantCulture) ?? "",
    };

    private static ExportColumn Text(string name, string ucd, string description, Func<StarRowDto, string?> get) =>
        new(name, ExportKind.Text, "", ucd, description, r => get(r));

    private static ExportColumn Num(string name, string unit, string ucd, string description, Func<StarRowDto, double?> get) =>
        new(name, ExportKind.Number, unit, ucd, description, r => get(r));
}
