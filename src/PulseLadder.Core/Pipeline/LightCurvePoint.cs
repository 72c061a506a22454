namespace PulseLadder.Core.Pipeline;

/// <summary>A usable measurement on the analysis time scale (BJD_TDB, full JD days).</summary>
public readonly record struct LightCurvePoint(long ObservationId, double Bjd, string Band, double Mag, double MagErr, string Observer);

/// <summary>Why a measurement was left out of the analysis; every rejection is stored and shown.</summary>
/// <param name="ObservationId">Storage id of the observation (0 offline).</param>
/// <param name="Stage">Stage that rejected it ("clean", "time", "clip", ...).</param>
/// <param name="Reason">Short machine-readable reason code, e.g. "flagged", "non_finite", "error_range", "duplicate", "clipped", "bad_night".</param>
/// <param name="Detail">Human-readable detail (values, thresholds).</param>
public sealed record Rejection(long ObservationId, string Stage, string Reason, string Detail)
{
    /// <summary>Time, band and magnitude of the rejected point for display (time as BJD_TDB where known, else as given).</summary>
    public double Time { get; init; }
    public string Band { get; init; } = "";
    public double Mag { get; init; }
}
