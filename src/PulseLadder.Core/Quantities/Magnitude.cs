namespace PulseLadder.Core.Quantities;

/// <summary>An astronomical magnitude (smaller is brighter).</summary>
public readonly record struct Magnitude(double Value)
{
    public static Magnitude FromValue(double value) => new(value);

    /// <summary>Relative flux 10^(-0.4 m).</summary>
    public double ToRelativeFlux() => Math.Pow(10.0, -0.4 * Value);

    public static Magnitude FromRelativeFlux(double flux) => new(-2.5 * Math.Log10(flux));
}
