namespace PulseLadder.Core.Photometry;

/// <summary>
/// One photometric measurement as stored: the time exactly as uploaded (plus the upload's declared additive offset)
/// in the upload's declared scale, never silently converted.
/// </summary>
/// <param name="Id">Storage id (0 when not stored, e.g. offline analysis).</param>
/// <param name="Time">Time value in <paramref name="Scale"/> after adding the upload's offset (JD or MJD per scale).</param>
/// <param name="Scale">Declared time scale of the upload this point came from.</param>
/// <param name="Band">Normalised band name (see <see cref="Bands"/>).</param>
/// <param name="Mag">Magnitude.</param>
/// <param name="MagErr">1-sigma magnitude error, positive.</param>
/// <param name="Observer">Observer or instrument label; empty when the upload gave none.</param>
/// <param name="Flag">Free-text quality flag from the upload; non-empty means "do not use".</param>
public readonly record struct Observation(
    long Id,
    double Time,
    TimeScale Scale,
    string Band,
    double Mag,
    double MagErr,
    string Observer,
    string? Flag);
