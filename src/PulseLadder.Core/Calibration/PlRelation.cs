using System.Text.Json.Serialization;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Calibration;

/// <summary>Whether a relation gives absolute magnitudes or apparent LMC magnitudes (then M = m - mu_anchor).</summary>
[JsonConverter(typeof(JsonStringEnumConverter<RelationKind>))]
public enum RelationKind { Absolute, Apparent }

/// <summary>Metallicity variable of the relation's gamma term.</summary>
[JsonConverter(typeof(JsonStringEnumConverter<MetallicityScale>))]
public enum MetallicityScale
{
    /// <summary>Z = [Fe/H] in dex.</summary>
    FeH,
    /// <summary>Z = log10 Z from [Fe/H] with the Salaris et al. (1993) alpha-enhancement scaling.</summary>
    LogZSalaris,
}

/// <summary>
/// One calibrated relation M = a + b (log10 P - p0) + gamma (Z - z_ref), on a single band or a Wesenheit index
/// W = mag - R (color1 - color2). Magnitudes in mag, periods in days. A row of Data/calibration/relations.csv
/// or of an administrator's file (same columns).
/// </summary>
public sealed record PlRelation
{
    public required string Id { get; init; }
    /// <summary>Relations of one family share a calibration (the routes of one star are computed within one family).</summary>
    public required string Family { get; init; }
    public required IReadOnlyList<PulsatorClass> Classes { get; init; }
    public required RelationKind Kind { get; init; }
    /// <summary>Band of the magnitude (the first term of a Wesenheit index).</summary>
    public required string Mag { get; init; }
    public string? Color1 { get; init; }
    public string? Color2 { get; init; }
    /// <summary>Wesenheit ratio R (0 for a single-band relation).</summary>
    public double WesenheitR { get; init; }
    public required double A { get; init; }
    public double AErr { get; init; }
    public required double B { get; init; }
    public double BErr { get; init; }
    public double P0 { get; init; }
    public double Gamma { get; init; }
    public double GammaErr { get; init; }
    public MetallicityScale MetallicityScale { get; init; }
    public double ZRef { get; init; }
    /// <summary>[Fe/H] assumed when the star list gives none, and its error.</summary>
    public double FeHDefault { get; init; }
    public double FeHDefaultErr { get; init; }
    /// <summary>[alpha/Fe] used by the log Z scaling.</summary>
    public double AlphaFe { get; init; }
    /// <summary>Intrinsic (instability-strip) scatter about the relation, mag.</summary>
    public double Scatter { get; init; }
    public double LogPMin { get; init; }
    public double LogPMax { get; init; }
    /// <summary>True: relation is for fundamental-mode periods and overtone periods are fundamentalised first.</summary>
    public bool NeedsFundamentalPeriod { get; init; } = true;
    public required string AnchorId { get; init; }
    public string Source { get; init; } = "";
    public string Table { get; init; } = "";
    /// <summary>Provenance tag: C confirmed, M from memory, X derived.</summary>
    public string Tag { get; init; } = "";
    public string Notes { get; init; } = "";
    /// <summary>True for a relation an administrator added (a file in the calibration folder), false for the embedded defaults.</summary>
    public bool UserSupplied { get; init; }
    /// <summary>Administrator file the relation came from (name without folder), or null.</summary>
    public string? UserFile { get; init; }

    public bool IsWesenheit => Color1 is not null && Color2 is not null;

    /// <summary>Display name of the magnitude: "V", "W_VI" (V - R(V-I)), "W_I" (I - R(V-I))...</summary>
    public string BandLabel => !IsWesenheit ? Mag : Mag == Color1 ? $"W_{Color1}{Color2}" : $"W_{Mag}";

    /// <summary>Bands the relation needs from the star.</summary>
    public IEnumerable<string> RequiredBands()
    {
        yield return Mag;
        if (Color1 is not null && Color1 != Mag) yield return Color1;
        if (Color2 is not null && Color2 != Mag && Color2 != Color1) yield return Color2;
    }

    /// <summary>Metallicity variable Z for a star of [Fe/H] = <paramref name="feh"/>.</summary>
    public double MetallicityVariable(double feh) => MetallicityScale switch
    {
        MetallicityScale.LogZSalaris => feh + Math.Log10(0.638 * Math.Pow(10.0, AlphaFe) + 0.362) - 1.765,
        _ => feh,
    };

    /// <summary>Relation magnitude (absolute, or apparent LMC for <see cref="RelationKind.Apparent"/>) at the nominal coefficients.</summary>
    public double RelationMagnitude(double logP, double feh) => A + B * (logP - P0) + Gamma * (MetallicityVariable(feh) - ZRef);

    public bool InPeriodRange(double logP) => logP >= LogPMin && logP <= LogPMax;
}

/// <summary>A distance anchor: for LMC-anchored (apparent) relations the modulus subtracted, with its errors.</summary>
public sealed record CalibrationAnchor
{
    public required string Id { get; init; }
    public string Kind { get; init; } = "";
    public double? Mu { get; init; }
    public double MuErrStat { get; init; }
    public double MuErrSys { get; init; }
    public string Source { get; init; } = "";
    public string Tag { get; init; } = "";
    public string Notes { get; init; } = "";

    /// <summary>Total anchor error (stat and sys in quadrature), mag.</summary>
    public double MuErr => Math.Sqrt(MuErrStat * MuErrStat + MuErrSys * MuErrSys);
}

/// <summary>Intrinsic period-colour relation colour0 = a + b log10 P for estimating E(B-V).</summary>
public sealed record PeriodColourRelation
{
    public required string Id { get; init; }
    public required IReadOnlyList<PulsatorClass> Classes { get; init; }
    public required string Color1 { get; init; }
    public required string Color2 { get; init; }
    public double A { get; init; }
    public double B { get; init; }
    public double Scatter { get; init; }
    public double LogPMin { get; init; }
    public double LogPMax { get; init; }
    public string Source { get; init; } = "";
    public string Tag { get; init; } = "";
    public string Notes { get; init; } = "";

    public double IntrinsicColour(double logP) => A + B * logP;
}

/// <summary>A photometric transformation target = mag + c0 + c1 (color1 - color2), used for a band the star lacks.</summary>
public sealed record BandTransform
{
    public required string Id { get; init; }
    public required string Target { get; init; }
    public required string Mag { get; init; }
    public required string Color1 { get; init; }
    public required string Color2 { get; init; }
    public double C0 { get; init; }
    public double C1 { get; init; }
    /// <summary>Scatter of the transformation (mag), added in quadrature to the derived band's error.</summary>
    public double Scatter { get; init; }
    public string Source { get; init; } = "";
    public string Tag { get; init; } = "";
    public string Notes { get; init; } = "";
}
