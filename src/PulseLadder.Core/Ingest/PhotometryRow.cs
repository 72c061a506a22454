using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Ingest;

/// <summary>One accepted photometry row: the star it belongs to, its observation and the source line.</summary>
public readonly record struct PhotometryRow(string Star, Observation Observation, long Line);
