using PulseLadder.Core.Classification;
using PulseLadder.Core.Distances;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Pipeline;

/// <summary>Everything one analysis of one star produced, with the settings and version that produced it.</summary>
public sealed record StarAnalysis
{
    public string Star { get; init; } = "";
    public string Field { get; init; } = "";
    public string PipelineVersion { get; init; } = Pipeline.PipelineVersion.Current;
    public PipelineSettings Settings { get; init; } = PipelineSettings.Default;
    public ReviewOverrides Overrides { get; init; } = ReviewOverrides.None;
    /// <summary>"ok", or the reason code of the stage that stopped the analysis (e.g. "too_few_points").</summary>
    public string Outcome { get; init; } = "ok";
    public string TimeMethod { get; init; } = "";
    public int PointsIn { get; init; }
    public int PointsUsed { get; init; }
    public IReadOnlyList<Rejection> Rejections { get; init; } = [];
    public PeriodSearchResult? Search { get; init; }
    public PeriodEstimate? Period { get; init; }
    public IReadOnlyList<BandFit> Fits { get; init; } = [];
    public IReadOnlyList<ObserverOffset> ObserverOffsets { get; init; } = [];
    public ClassSuggestion? Class { get; init; }
    /// <summary>
    /// The class from this star's own light curve (period, amplitude, Fourier parameters; declared and reviewer classes
    /// still win), before any field PL test: what the field pass builds the field's PL lines from. Equals
    /// <see cref="Class"/> when no field context was used.
    /// </summary>
    public ClassSuggestion? LightCurveClass { get; init; }
    /// <summary>
    /// The field context (fitted PL lines and the hash of the star set) the class used, or null when none: stored so a
    /// rerun with the same context reproduces the class (docs/light-curves.md, "Field PL pass").
    /// </summary>
    public FieldContext? FieldContext { get; init; }
    /// <summary><see cref="PulseLadder.Core.Calibration.CalibrationRegistry.Hash"/> of the registry the distance used.</summary>
    public string CalibrationRegistryHash { get; init; } = "";
    public DistanceResult? Distance { get; init; }
    /// <summary>
    /// SHA-256 (hex) of the observations the analysis read (ids, times, magnitudes, errors, band, observer, flag, scale),
    /// set by the service's analysis job; part of its input hash, so a later pass over the stored result (the field PL
    /// pass) can rebuild that hash without reading the observations again. Null for results made outside the service.
    /// </summary>
    public string? ObservationsDigest { get; init; }
    /// <summary>Conditions a reviewer should look at (e.g. "pdm_disagrees", "poor_phase_coverage").</summary>
    public IReadOnlyList<string> Flags { get; init; } = [];
}
