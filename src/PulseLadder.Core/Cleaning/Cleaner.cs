using System.Globalization;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Cleaning;

/// <summary>Settings of the cleaning stage (all rejections are recorded with their reason).</summary>
public sealed record CleaningSettings
{
    /// <summary>Largest accepted magnitude error; larger errors are rejected as "error_range".</summary>
    public double MaxMagErr { get; init; } = 0.5;
    /// <summary>Residual clipping threshold in robust sigmas (1.4826 MAD).</summary>
    public double ClipSigma { get; init; } = 4.0;
    public int MaxClipIterations { get; init; } = 5;
}

/// <summary>Output of <see cref="Cleaner.RejectUnusable"/>.</summary>
public sealed record CleaningOutcome(IReadOnlyList<Observation> Kept, IReadOnlyList<Rejection> Rejected);

/// <summary>Stage "clean": drops flagged, non-finite, out-of-range and duplicate points, saying why for each.</summary>
public static class Cleaner
{
    /// <summary>
    /// Keeps the usable observations (input order preserved) and records one <see cref="Rejection"/> (stage "clean")
    /// per dropped point, checked in this order: "flagged" (non-empty <see cref="Observation.Flag"/>), "non_finite"
    /// (time, magnitude or error NaN/infinite), "error_range" (error &lt;= 0 or &gt; <see cref="CleaningSettings.MaxMagErr"/>),
    /// "duplicate" (same time value, scale, band and observer as an earlier kept point; the first is kept, and a
    /// duplicate with a different magnitude says so in its detail). Empty input gives an empty outcome.
    /// </summary>
    public static CleaningOutcome RejectUnusable(IReadOnlyList<Observation> observations, CleaningSettings settings)
    {
        var kept = new List<Observation>(observations.Count);
        var rejected = new List<Rejection>();
        var seen = new Dictionary<(double, TimeScale, string, string), double>();
        foreach (var o in observations)
        {
            string? reason = null, detail = null;
            if (!string.IsNullOrWhiteSpace(o.Flag))
            {
                reason = "flagged";
                detail = "flag \"" + o.Flag!.Trim() + "\" set in the upload";
            }
            else if (!double.IsFinite(o.Time) || !double.IsFinite(o.Mag) || !double.IsFinite(o.MagErr))
            {
                reason = "non_finite";
                detail = "time, magnitude or error is not a finite number (" + Fmt(o.Time) + ", " + Fmt(o.Mag) + ", " + Fmt(o.MagErr) + ")";
            }
            else if (o.MagErr <= 0 || o.MagErr > settings.MaxMagErr)
            {
                reason = "error_range";
                detail = "magnitude error " + Fmt(o.MagErr) + " outside (0, " + Fmt(settings.MaxMagErr) + "]";
            }
            else
            {
                var key = (o.Time, o.Scale, o.Band ?? "", o.Observer ?? "");
                if (seen.TryGetValue(key, out double firstMag))
                {
                    reason = "duplicate";
                    detail = "same time, band and observer as an earlier point"
                        + (firstMag == o.Mag ? "" : " (magnitude " + Fmt(o.Mag) + " vs " + Fmt(firstMag) + "; first kept)");
                }
                else
                {
                    seen[key] = o.Mag;
                }
            }

            if (reason is null)
            {
                kept.Add(o);
                continue;
            }
            rejected.Add(new Rejection(o.Id, "clean", reason, detail ?? "")
            {
                Time = double.IsFinite(o.Time) ? o.Scale.ToFullJulianDay(o.Time) : 0.0,
                Band = o.Band ?? "",
                Mag = double.IsFinite(o.Mag) ? o.Mag : 0.0,
            });
        }
        return new CleaningOutcome(kept, rejected);
    }

    private static string Fmt(double v) => v.ToString("G6", CultureInfo.InvariantCulture);
}
