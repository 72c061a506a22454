namespace PulseLadder.Core.Quantities;

/// <summary>ICRS (J2000) position in degrees. RA in [0, 360), Dec in [-90, 90].</summary>
public readonly record struct SkyPosition
{
    public double RaDeg { get; }
    public double DecDeg { get; }

    private SkyPosition(double ra, double dec) { RaDeg = ra; DecDeg = dec; }

    public static SkyPosition FromDegrees(double raDeg, double decDeg)
    {
        if (!double.IsFinite(raDeg) || raDeg < 0 || raDeg >= 360)
            throw new ArgumentOutOfRangeException(nameof(raDeg), raDeg, "RA must be in [0, 360) degrees.");
        if (!double.IsFinite(decDeg) || decDeg < -90 || decDeg > 90)
            throw new ArgumentOutOfRangeException(nameof(decDeg), decDeg, "Dec must be in [-90, 90] degrees.");
        return new SkyPosition(raDeg, decDeg);
    }

    public static bool IsValid(double raDeg, double decDeg) =>
        double.IsFinite(raDeg) && raDeg >= 0 && raDeg < 360 && double.IsFinite(decDeg) && decDeg >= -90 && decDeg <= 90;
}
