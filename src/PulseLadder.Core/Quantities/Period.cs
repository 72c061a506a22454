namespace PulseLadder.Core.Quantities;

/// <summary>A pulsation period. Always positive and finite; stored in days.</summary>
public readonly record struct Period
{
    public double Days { get; }

    private Period(double days) => Days = days;

    /// <summary>Creates a period from days; throws for non-positive or non-finite input (a bug, not a data error).</summary>
    public static Period FromDays(double days)
    {
        if (!(days > 0) || !double.IsFinite(days))
            throw new ArgumentOutOfRangeException(nameof(days), days, "A period must be positive and finite.");
        return new Period(days);
    }

    /// <summary>Creates a period from a frequency in cycles per day.</summary>
    public static Period FromFrequency(double cyclesPerDay) => FromDays(1.0 / cyclesPerDay);

    /// <summary>Frequency in cycles per day.</summary>
    public double Frequency => 1.0 / Days;

    public double Log10Days => Math.Log10(Days);

    public override string ToString() => Days.ToString("R", System.Globalization.CultureInfo.InvariantCulture) + " d";
}
