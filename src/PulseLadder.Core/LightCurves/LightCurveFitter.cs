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

    // Added by the light-curve work. Phi21/Phi31 above are SINE-series values (Simon & Lee 1981:
    // m = A0 + sum A_k sin(2 pi k phi + phi_k), phi_k1 = phi_k - k phi_1 mod 2 pi, in [0, 2 pi)); the cosine-series
    // values used by OGLE are Phi21Cosine = Phi21 + pi/2 and Phi31Cosine = Phi31 + pi (mod 2 pi). Null where the
    // order is too low (R21/phi21 need order >= 2, R31/phi31 order >= 3) or the band was a template fit.

    /// <summary>Phi21 of the cosine series (OGLE convention), radians in [0, 2 pi).</summary>
    public double? Phi21Cosine { get; init; }
    /// <summary>Phi31 of the cosine series (OGLE convention), radians in [0, 2 pi).</summary>
    public double? Phi31Cosine { get; init; }
    public double? R21Err { get; init; }
    public double? R31Err { get; init; }
    /// <summary>Error of Phi21 (same for both series conventions), radians.</summary>
    public double? Phi21Err { get; init; }
    public double? Phi31Err { get; init; }
    /// <summary>Error of the peak-to-peak amplitude (linear propagation at the fitted extrema).</summary>
    public double AmplitudeErr { get; init; }
    /// <summary>Error of the magnitude mean A0.</summary>
    public double MagnitudeMeanErr { get; init; }
    /// <summary>Error of the epoch of maximum light, days.</summary>
    public double EpochOfMaxErr { get; init; }
    /// <summary>"fourier" (own fit) or "template:&lt;band&gt;" (shape of that band scaled in amplitude and shifted).</summary>
    public string Model { get; init; } = "fourier";
    /// <summary>For template fits: amplitude scale relative to the template band (1 when fixed).</summary>
    public double? TemplateScale { get; init; }
    /// <summary>Observer whose zero point the band's magnitudes refer to ("" when the upload named none).</summary>
    public string ReferenceObserver { get; init; } = "";
    /// <summary>Weighted chi-square per degree of freedom of the final fit.</summary>
    public double ReducedChiSquare { get; init; }
    /// <summary>Fourier orders tried, with their BIC (empty for template fits).</summary>
    public IReadOnlyList<OrderScore> OrderScores { get; init; } = [];

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


/// <summary>BIC of one Fourier order; <paramref name="Rejected"/> names a guard that excluded it ("ringing"), else null.</summary>
public sealed record OrderScore(int Order, double ChiSquare, double Bic, string? Rejected);

/// <summary>Output of <see cref="LightCurveFitter.FitBands"/>.</summary>
/// <param name="Fits">One fit per band that had enough points (bands ordered by name, ordinal).</param>
/// <param name="Clipped">Points left out by the fit: "clipped" (residual outlier), "bad_night", "band_too_sparse", "non_finite".</param>
/// <param name="Offsets">Zero-point offset of every non-reference observer per band: its magnitudes are
/// <c>model + Offset</c>, so <c>Mag - Offset</c> puts a point on the band's reference observer.</param>
/// <param name="Kept">The points the fits used, unshifted (input order); use <see cref="CorrectedMag"/> to apply offsets.</param>
public sealed record LightCurveFitOutcome(
    IReadOnlyList<BandFit> Fits,
    IReadOnlyList<Rejection> Clipped,
    IReadOnlyList<ObserverOffset> Offsets,
    IReadOnlyList<LightCurvePoint> Kept)
{
    /// <summary>Offset of (band, observer); 0 for reference observers and unknown pairs.</summary>
    public double OffsetFor(string band, string observer)
    {
        foreach (var o in Offsets)
            if (o.Band == band && o.Observer == observer) return o.Offset;
        return 0.0;
    }

    /// <summary>Magnitude of <paramref name="p"/> on its band's reference zero point (Mag - offset).</summary>
    public double CorrectedMag(LightCurvePoint p) => p.Mag - OffsetFor(p.Band, p.Observer);
}

/// <summary>Stage "fold and fit": per-band Fourier fits at the chosen period, with model-based clipping.</summary>
public static class LightCurveFitter
{
    /// <summary>
    /// Fits every band at <paramref name="periodDays"/>: shape (Fourier order chosen by BIC under guards) plus a
    /// zero-point offset per non-reference observer, iterative clipping of residuals from the model (robust scale
    /// 1.4826 MAD of error-normalised residuals), whole nights with far larger residuals than the star's others
    /// rejected, bands too sparse for their own shape fitted with the best band's shape as template. All bands share
    /// <see cref="BandFit.PhaseZeroBjd"/> = the epoch of maximum light of the band with most points.
    /// Never throws: a non-positive or non-finite period or empty input gives an empty outcome.
    /// See docs/light-curves.md for the rules and thresholds.
    /// </summary>
    public static LightCurveFitOutcome FitBands(IReadOnlyList<LightCurvePoint> points, double periodDays, FitSettings fit, CleaningSettings cleaning)
        => BandFitter.Run(points, periodDays, fit, cleaning);
}
