namespace PulseLadder.Core.Quantities;

/// <summary>A barycentric Julian date in the TDB time scale (full JD, days).</summary>
public readonly record struct Bjd(double Days)
{
    public static Bjd FromDays(double days) => new(days);
}
