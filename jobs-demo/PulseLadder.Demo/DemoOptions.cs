namespace PulseLadder.Demo;

/// <summary>Knobs of the demo campaign. Same options (seed included) give byte-identical files.</summary>
public sealed record DemoOptions
{
    /// <summary>Seed of every random draw.</summary>
    public ulong Seed { get; init; } = 20251201;

    /// <summary>Approximate number of stars (at least 30); the per-field class mix scales with it (150 is the designed mix).</summary>
    public int StarCount { get; init; } = 150;

    /// <summary>Observing seasons (years from 2025-08-01), 1 to 5.</summary>
    public int Seasons { get; init; } = 2;

    /// <summary>Fraction of nights lost to weather at each site, 0 to 0.9.</summary>
    public double WeatherLoss { get; init; } = 0.30;

    /// <summary>Fraction of measurements turned into outliers (0.3-1 mag off), 0 to 0.1.</summary>
    public double OutlierFraction { get; init; } = 0.005;

    /// <summary>Write each star's true class into the star list's class column (default: left empty, so the classifier decides).</summary>
    public bool DeclareClasses { get; init; }

    internal void Validate()
    {
        if (StarCount < 30) throw new ArgumentOutOfRangeException(nameof(StarCount), StarCount, "at least 30 stars");
        if (Seasons is < 1 or > 5) throw new ArgumentOutOfRangeException(nameof(Seasons), Seasons, "1 to 5 seasons");
        if (WeatherLoss is < 0 or > 0.9 || double.IsNaN(WeatherLoss)) throw new ArgumentOutOfRangeException(nameof(WeatherLoss), WeatherLoss, "0 to 0.9");
        if (OutlierFraction is < 0 or > 0.1 || double.IsNaN(OutlierFraction)) throw new ArgumentOutOfRangeException(nameof(OutlierFraction), OutlierFraction, "0 to 0.1");
    }
}
