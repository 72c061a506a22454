namespace PulseLadder.Demo;

/// <summary>Just enough sky geometry to schedule observations near a field's transit at night.</summary>
internal static class DemoSky
{
    private const double SiderealPerSolar = 1.00273790935;

    /// <summary>Greenwich mean sidereal time in hours (common low-precision formula, ~0.1 s over decades; ample for scheduling).</summary>
    public static double GmstHours(double jdUt)
    {
        double h = (18.697374558 + 24.06570982441908 * (jdUt - 2451545.0)) % 24.0;
        return h < 0 ? h + 24 : h;
    }

    /// <summary>
    /// Hours from local mean midnight to the field's transit, in [-12, 12): the transit is at midnight + this value.
    /// A transit within about +-5 h of midnight happens in the dark, which gives each field a ~150-night season.
    /// </summary>
    public static double TransitHoursFromMidnight(double midnightJdUt, double longitudeDeg, double raDeg)
    {
        double lst = GmstHours(midnightJdUt) + longitudeDeg / 15.0;
        double h = (raDeg / 15.0 - lst) % 24.0;
        if (h < -12) h += 24;
        if (h >= 12) h -= 24;
        return h / SiderealPerSolar;
    }
}
