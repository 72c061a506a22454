using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.LightCurves;

/// <summary>Settings of the Fourier fit.</summary>
public sealed record FitSettings
{
    public int MaxOrder { get; init; } = 8;
}

/// <summary>Zero-point offset of one observer in one band relative to the band's reference observer.</summary>
public sealed record ObserverOffset(string Band, string Observer, double Offset, double Error, int Points);

/// <summary>
/// Fourier fit of one band: m(phi) = A0 + sum_k [Cos[k-1] cos(2 pi k phi) + Sin[k-1] sin(2 pi k phi)],
/// phi = (t - PhaseZeroBjd) / P mod 1.
/// </summary>
public sealed record BandFit
{
    public string Band { get; init; } = "";
    public int Points { get; init; }
    public int Order { get; init; }
    public double PeriodDays { get; init; }
    public double PhaseZeroBjd { get; init; }
    public double A0 { get; init; }
    public double[] Cos { get; init; } = [];
    public double[] Sin { get; init; } = [];
    public double IntensityMeanMag { get; init; }
    public double IntensityMeanErr { get; init; }
    public double MagnitudeMean { get; init; }
    public double Amplitude { get; init; }
    public double EpochOfMaxBjd { get; init; }
    public double? R21 { get; init; }
    public double? R31 { get; init; }
    public double? Phi21 { get; init; }
    public double? Phi31 { get; init; }
    public double LargestPhaseGap { get; init; }
    public double ResidualRms { get; init; }
    public IReadOnlyList<string> Flags { get; init; } = [];

    /// <summary>Fitted magnitude at phase <paramref name="phase"/> (cycles).</summary>
    public double Evaluate(double phase)
    {
        double m = A0;
        for (int k = 1; k <= Cos.Length; k++)
        {
            double a = 2 * Math.PI * k * phase;
            m += Cos[k - 1] * Math.Cos(a) + Sin[k - 1] * Math.Sin(a);
        }
        return m;
    }
}

/// <summary>Output of <see cref="LightCurveFitter.FitBands"/>.</summary>
public sealed record LightCurveFitOutcome(
    IReadOnlyList<BandFit> Fits,
    IReadOnlyList<Rejection> Clipped,
    IReadOnlyList<ObserverOffset> Offsets,
    IReadOnlyList<LightCurvePoint> Kept);

/// <summary>Stage "fold and fit": per-band Fourier fits at the chosen period, with model-based clipping.</summary>
public static class LightCurveFitter
{
    public static LightCurveFitOutcome FitBands(IReadOnlyList<LightCurvePoint> points, double periodDays, FitSettings fit, CleaningSettings cleaning)
        => throw new NotImplementedException("contract: implemented by the light-curve work");
}
