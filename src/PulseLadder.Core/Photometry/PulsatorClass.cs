namespace PulseLadder.Core.Photometry;

/// <summary>Variable-star classes PulseLadder distinguishes.</summary>
public enum PulsatorClass
{
    /// <summary>Not yet known (no declaration and no suggestion yet).</summary>
    Unknown,
    /// <summary>Classical (delta) Cepheid, fundamental mode.</summary>
    ClassicalCepheidFundamental,
    /// <summary>Classical Cepheid, first overtone.</summary>
    ClassicalCepheidFirstOvertone,
    /// <summary>Type II Cepheid (BL Her, W Vir, RV Tau).</summary>
    TypeIICepheid,
    /// <summary>RR Lyrae, fundamental mode (RRab).</summary>
    RRLyraeAB,
    /// <summary>RR Lyrae, first overtone (RRc).</summary>
    RRLyraeC,
    /// <summary>Variable, but none of the classes above.</summary>
    OtherVariable,
    /// <summary>No significant variability.</summary>
    NotVariable,
}

public static class PulsatorClasses
{
    private static readonly (string Code, PulsatorClass Class)[] Codes =
    [
        ("unknown", PulsatorClass.Unknown),
        ("dcep_f", PulsatorClass.ClassicalCepheidFundamental),
        ("dcep_1o", PulsatorClass.ClassicalCepheidFirstOvertone),
        ("t2cep", PulsatorClass.TypeIICepheid),
        ("rrab", PulsatorClass.RRLyraeAB),
        ("rrc", PulsatorClass.RRLyraeC),
        ("other", PulsatorClass.OtherVariable),
        ("constant", PulsatorClass.NotVariable),
    ];

    public static IReadOnlyList<string> AllCodes { get; } = Codes.Select(c => c.Code).ToArray();

    public static string ToCode(this PulsatorClass c) => Codes.First(x => x.Class == c).Code;

    /// <summary>Parses our codes and the usual catalogue spellings (DCEP, DCEP_F, CEP_1O, RRAB, RRc, T2CEP...).</summary>
    public static bool TryParse(string? raw, out PulsatorClass c)
    {
        c = PulsatorClass.Unknown;
        if (string.IsNullOrWhiteSpace(raw)) return false;
        var s = raw.Trim().ToLowerInvariant().Replace('-', '_').Replace(' ', '_');
        foreach (var (code, cls) in Codes)
        {
            if (s == code) { c = cls; return true; }
        }
        (bool ok, PulsatorClass v) r = s switch
        {
            "dcep" or "cep" or "cep_f" or "dcep_fu" or "cepf" => (true, PulsatorClass.ClassicalCepheidFundamental),
            "cep_1o" or "dcep_fo" or "dcep_1" or "dcep_s" => (true, PulsatorClass.ClassicalCepheidFirstOvertone),
            "t2c" or "cw" or "cwa" or "cwb" or "bl_her" or "w_vir" or "rv_tau" or "rv" => (true, PulsatorClass.TypeIICepheid),
            "rrab" or "rr_ab" or "rra" => (true, PulsatorClass.RRLyraeAB),
            "rr_c" or "rrc" => (true, PulsatorClass.RRLyraeC),
            "const" or "cst" or "nonvariable" or "non_variable" => (true, PulsatorClass.NotVariable),
            _ => (false, PulsatorClass.Unknown),
        };
        c = r.v;
        return r.ok;
    }

    public static bool IsCepheid(this PulsatorClass c) =>
        c is PulsatorClass.ClassicalCepheidFundamental or PulsatorClass.ClassicalCepheidFirstOvertone or PulsatorClass.TypeIICepheid;

    public static bool IsRRLyrae(this PulsatorClass c) => c is PulsatorClass.RRLyraeAB or PulsatorClass.RRLyraeC;
}
