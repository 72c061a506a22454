using System.Globalization;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Core.TimeScales;

/// <summary>Output of <see cref="BarycentricTime.ToBjdTdb(IReadOnlyList{Observation}, SkyPosition)"/>.</summary>
/// <param name="Points">Points with BJD_TDB times (full JD).</param>
/// <param name="Rejected">Points that could not be converted (e.g. a UTC date past the leap-second table).</param>
/// <param name="Method">Description of the conversion used (stored as provenance).</param>
public sealed record TimeConversionOutcome(IReadOnlyList<LightCurvePoint> Points, IReadOnlyList<Rejection> Rejected, string Method);

/// <summary>Stage "times": puts every declared time scale on BJD_TDB using the star's position.</summary>
public static class BarycentricTime
{
    /// <summary>
    /// Converts every observation to BJD_TDB (see <see cref="TimeConversion"/> for the chain and its accuracy).
    /// Points that cannot be converted (UTC after the leap-second table's expiry, non-finite time) are returned as
    /// rejections of stage "time". Empty input gives an empty outcome. UTC values before 1960 are converted with
    /// TAI-UTC = 0 and counted in <see cref="TimeConversionOutcome.Method"/>. Output order follows the input.
    /// The TT -> BJD_TDB step is interpolated between exact evaluations every 6 days (<see cref="TtToBjdInterpolator"/>,
    /// within ~10 us of the exact chain).
    /// </summary>
    public static TimeConversionOutcome ToBjdTdb(IReadOnlyList<Observation> observations, SkyPosition position)
    {
        var points = new List<LightCurvePoint>(observations.Count);
        var rejected = new List<Rejection>();
        int preUtc = 0;
        var tt = new TtToBjdInterpolator(position);
        foreach (var o in observations)
        {
            var r = TimeConversion.Convert(o.Time, o.Scale, position, tt);
            if (r.BjdTdb is { } bjd)
            {
                if (r.PreUtc) preUtc++;
                points.Add(new LightCurvePoint(o.Id, bjd, o.Band, o.Mag, o.MagErr, o.Observer));
            }
            else
            {
                rejected.Add(new Rejection(o.Id, "time", r.FailureReason ?? "time_conversion", r.Detail ?? "")
                {
                    Time = double.IsFinite(o.Time) ? o.Scale.ToFullJulianDay(o.Time) : 0.0,
                    Band = o.Band,
                    Mag = double.IsFinite(o.Mag) ? o.Mag : 0.0,
                });
            }
        }
        string method = TimeConversion.Method;
        if (preUtc > 0)
            method += string.Create(CultureInfo.InvariantCulture,
                $"; {preUtc} UTC point(s) before 1960 taken as UT with TAI-UTC=0 (error up to ~35 s)");
        return new TimeConversionOutcome(points, rejected, method);
    }
}
