using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>Settings of the period search.</summary>
public sealed record PeriodSearchSettings
{
    /// <summary>Grid oversampling n0: frequency step 1/(n0 T).</summary>
    public double Oversampling { get; init; } = 10;
    /// <summary>Shortest period searched (days); null: from the class, else 0.2 d.</summary>
    public double? MinPeriodDays { get; init; }
    /// <summary>Longest period searched (days); null: from the class and the baseline.</summary>
    public double? MaxPeriodDays { get; init; }
    /// <summary>Number of distinct peaks reported.</summary>
    public int TopPeaks { get; init; } = 5;
    /// <summary>Seed for any bootstrap (stored with the result).</summary>
    public int Seed { get; init; } = 20261201;
}

/// <summary>One periodogram peak with its significance and its relation to the other peaks.</summary>
public sealed record PeriodPeak(double Frequency, double Power, double? Fap, string FapMethod, IReadOnlyList<string> Aliases)
{
    public double PeriodDays => 1.0 / Frequency;
}

/// <summary>A curve for plotting: x and y of equal length.</summary>
public sealed record Curve(double[] X, double[] Y);

/// <summary>Output of <see cref="PeriodFinder.FindPeriods"/>.</summary>
public sealed record PeriodSearchResult
{
    /// <summary>Null when a period was found; else a reason code ("too_few_points", "no_significant_period").</summary>
    public string? FailureReason { get; init; }
    public double MinFrequency { get; init; }
    public double FrequencyStep { get; init; }
    public int FrequencyCount { get; init; }
    public double BaselineDays { get; init; }
    /// <summary>How the power was computed (kernel variant, exact or approximate), for provenance.</summary>
    public string Method { get; init; } = "";
    /// <summary>Distinct peaks, highest first.</summary>
    public IReadOnlyList<PeriodPeak> Peaks { get; init; } = [];
    /// <summary>Periodogram thinned for plotting (frequency, power), keeping every local maximum.</summary>
    public Curve Periodogram { get; init; } = new([], []);
    /// <summary>Spectral window of the sampling on the same (thinned) frequencies.</summary>
    public Curve Window { get; init; } = new([], []);
}

/// <summary>The refined period with its uncertainty and the second opinion.</summary>
public sealed record PeriodEstimate
{
    public double PeriodDays { get; init; }
    public double PeriodErrDays { get; init; }
    public double Frequency { get; init; }
    public double FrequencyErr { get; init; }
    /// <summary>"refined" (nonlinear least squares), or "reviewer" when a person chose it.</summary>
    public string Method { get; init; } = "";
    /// <summary>Phase dispersion minimisation theta at the chosen period, and the period PDM prefers among the candidates.</summary>
    public double? PdmTheta { get; init; }
    public double? PdmPreferredPeriodDays { get; init; }
    public bool PdmDisagrees { get; init; }
}

/// <summary>Stage "period search" and "refine period".</summary>
public static class PeriodFinder
{
    public static PeriodSearchResult FindPeriods(IReadOnlyList<LightCurvePoint> points, PulsatorClass classHint, PeriodSearchSettings settings)
        => throw new NotImplementedException("contract: implemented by the period-engine work");

    /// <summary>Refines <paramref name="frequency"/> by nonlinear least squares; PDM compares it with the other candidates.</summary>
    public static PeriodEstimate RefinePeriod(IReadOnlyList<LightCurvePoint> points, double frequency, PeriodSearchResult search, PeriodSearchSettings settings)
        => throw new NotImplementedException("contract: implemented by the period-engine work");
}
