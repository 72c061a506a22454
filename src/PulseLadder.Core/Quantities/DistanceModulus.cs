namespace PulseLadder.Core.Quantities;

/// <summary>A distance modulus mu = 5 log10(d / 10 pc), in magnitudes.</summary>
public readonly record struct DistanceModulus(double Value)
{
    public static DistanceModulus FromMagnitudes(double mu) => new(mu);

    public static DistanceModulus FromParsecs(double parsecs) => new(5.0 * Math.Log10(parsecs) - 5.0);

    /// <summary>d = 10^(mu/5 + 1) pc.</summary>
    public double ToParsecs() => Math.Pow(10.0, Value / 5.0 + 1.0);

    /// <summary>First-order distance error: sigma_d = d ln(10)/5 sigma_mu.</summary>
    public double ParsecErrorFor(double sigmaMu) => ToParsecs() * Math.Log(10.0) / 5.0 * sigmaMu;
}
