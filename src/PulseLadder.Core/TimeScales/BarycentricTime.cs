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
    public static TimeConversionOutcome ToBjdTdb(IReadOnlyList<Observation> observations, SkyPosition position)
        => throw new NotImplementedException("contract: implemented by the light-curve work");
}
