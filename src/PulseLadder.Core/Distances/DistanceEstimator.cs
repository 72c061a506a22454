using System.Text.Json.Serialization;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Extinction;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Distances;

/// <summary>Which route a star's result reports when several can be computed.</summary>
[JsonConverter(typeof(JsonStringEnumConverter<RoutePreference>))]
public enum RoutePreference
{
    /// <summary>Wesenheit (reddening-free) when its bands exist, else near-infrared, else optical bands with E(B-V).</summary>
    WesenheitFirst,
    /// <summary>A single band corrected with E(B-V) (near-infrared first), Wesenheit only when no band route works.</summary>
    ReddeningCorrectedFirst,
}

/// <summary>Settings of the distance stage. All recorded with each result.</summary>
public sealed record DistanceSettings
{
    /// <summary>Total-to-selective extinction ratio R_V = A_V/E(B-V).</summary>
    public double Rv { get; init; } = 3.1;
    /// <summary>1-sigma uncertainty of R_V used by the Monte Carlo (SCIENCE 5.1 suggests N(3.1, 0.2)); a systematic term.</summary>
    public double RvErr { get; init; } = 0.2;
    public ExtinctionLaw ExtinctionLaw { get; init; } = ExtinctionLaw.Ccm89;
    /// <summary>Relation id to use for classical Cepheids (null: the registry's default for the bands present).</summary>
    public string? CepheidRelationId { get; init; }
    /// <summary>Relation id for Type II Cepheids (null: registry default).</summary>
    public string? TypeIICepheidRelationId { get; init; }
    /// <summary>Relation id for RR Lyrae stars (null: registry default).</summary>
    public string? RRLyraeRelationId { get; init; }
    public RoutePreference RoutePreference { get; init; } = RoutePreference.WesenheitFirst;
    /// <summary>Per-field default E(B-V) (mag) used when the star list gives none.</summary>
    public double? DefaultEbv { get; init; }
    public double? DefaultEbvErr { get; init; }
    /// <summary>Error assumed for a star-list E(B-V) given without one (mag).</summary>
    public double StarEbvErrIfMissing { get; init; } = 0.03;
    /// <summary>
    /// When no E(B-V) is given at all, estimate it from the intensity-mean colour minus a Galactic intrinsic
    /// period-colour relation (Tammann, Sandage &amp; Reindl 2003). Wrong for Magellanic-Cloud Cepheids (bluer).
    /// </summary>
    public bool EstimateEbvFromColour { get; init; } = true;
    /// <summary>Error assumed for a star-list [Fe/H] (dex; the star list carries no error column).</summary>
    public double FeHErr { get; init; } = 0.15;
    /// <summary>Compute routes with every usable relation of the class, not only the chosen relation's family.</summary>
    public bool RoutesAcrossFamilies { get; init; }
    public int MonteCarloDraws { get; init; } = 2000;
    public int Seed { get; init; } = 20261201;
}

/// <summary>Linear (first-order) error budget of one route's distance modulus, every term in mag.</summary>
public sealed record ErrorBudget
{
    public double Photometry { get; init; }
    public double Period { get; init; }
    public double Reddening { get; init; }
    public double Metallicity { get; init; }
    public double Scatter { get; init; }
    public double ZeroPoint { get; init; }
    public double Slope { get; init; }
    public double Gamma { get; init; }
    public double Anchor { get; init; }
    public double Rv { get; init; }
    /// <summary>Photometry, period, reddening and metallicity of the star (what averaging over stars reduces).</summary>
    public double Measurement { get; init; }
    /// <summary>Measurement plus intrinsic scatter.</summary>
    public double Statistical { get; init; }
    /// <summary>Zero point, slope, gamma, anchor and R_V: common to all stars of a field, never divided by sqrt(N).</summary>
    public double Systematic { get; init; }
    public double Total { get; init; }
}

/// <summary>Distance of one star by one route (a relation in one band or Wesenheit index).</summary>
public sealed record DistanceRoute
{
    public string RelationId { get; init; } = "";
    public string Band { get; init; } = "";
    /// <summary>Absolute magnitude (or Wesenheit) from the relation at the nominal inputs.</summary>
    public double AbsoluteMag { get; init; }
    /// <summary>Observed intensity-mean magnitude (or Wesenheit index) before extinction correction.</summary>
    public double ApparentMag { get; init; }
    /// <summary>A_band subtracted (0 for Wesenheit routes).</summary>
    public double Extinction { get; init; }
    /// <summary>Residual extinction per unit E(B-V) of a Wesenheit index under the chosen law (0 = fully reddening-free).</summary>
    public double? WesenheitResidualPerEbv { get; init; }
    /// <summary>Distance modulus: Monte Carlo median (nominal value when draws = 0).</summary>
    public double Mu { get; init; }
    /// <summary>Total 1-sigma error: half the 16-84 percentile width.</summary>
    public double MuErr { get; init; }
    public double MuErrStat { get; init; }
    public double MuErrSys { get; init; }
    public double Mu16 { get; init; }
    public double Mu84 { get; init; }
    /// <summary>Distance modulus at the nominal inputs (no Monte Carlo).</summary>
    public double MuNominal { get; init; }
    public double DistancePc { get; init; }
    public double DistancePc16 { get; init; }
    public double DistancePc84 { get; init; }
    public ErrorBudget Budget { get; init; } = new();
    /// <summary>Relation term gamma (Z - z_ref) included in <see cref="AbsoluteMag"/>.</summary>
    public double MetallicityTerm { get; init; }
    /// <summary>Change of mu when R_V rises by its 1-sigma error (signed; fully correlated between stars).</summary>
    public double RvSensitivity { get; init; }
    public IReadOnlyList<string> Flags { get; init; } = [];
}

/// <summary>Output of <see cref="DistanceEstimator.EstimateDistance"/>; FailureReason set when no distance is possible.</summary>
public sealed record DistanceResult
{
    /// <summary>
    /// Null on success, else: "unclassified", "not_variable", "no_relation_for_class", "no_period",
    /// "unknown_relation", "no_usable_band", "no_reddening".
    /// </summary>
    public string? FailureReason { get; init; }
    public string RelationId { get; init; } = "";
    public string Band { get; init; } = "";
    public double? Ebv { get; init; }
    public double? EbvErr { get; init; }
    /// <summary>"star_list", "field_default", "period_colour:&lt;relation id&gt;", or "none".</summary>
    public string EbvSource { get; init; } = "";
    public double Mu { get; init; }
    public double MuErr { get; init; }
    public double MuErrStat { get; init; }
    public double MuErrSys { get; init; }
    /// <summary>Statistical error without the relation's intrinsic scatter (photometry, period, reddening, [Fe/H]); linear.</summary>
    public double MuErrMeasurement { get; init; }
    public double Mu16 { get; init; }
    public double Mu84 { get; init; }
    public double DistancePc { get; init; }
    public double DistancePcErr { get; init; }
    public double DistancePc16 { get; init; }
    public double DistancePc84 { get; init; }
    /// <summary>Period fed to the relation (fundamentalised for overtone pulsators), days.</summary>
    public double PeriodUsedDays { get; init; }
    public double LogPUsed { get; init; }
    /// <summary>Fundamentalisation applied (relation id), or null.</summary>
    public string? Fundamentalisation { get; init; }
    public double? FeH { get; init; }
    /// <summary>"star_list" or "relation_default".</summary>
    public string FeHSource { get; init; } = "";
    public double Rv { get; init; }
    public string ExtinctionLaw { get; init; } = "";
    /// <summary>Extinction-corrected apparent magnitude (or Wesenheit) of the reported route.</summary>
    public double ApparentMag0 { get; init; }
    public double MetallicityTerm { get; init; }
    public double RvSensitivity { get; init; }
    public string AnchorId { get; init; } = "";
    public double? AnchorMu { get; init; }
    /// <summary>The relation's coefficients as used (for reproducibility even if the registry changes later).</summary>
    public PlRelation? Relation { get; init; }
    public int Draws { get; init; }
    /// <summary>Seed of the System.Random actually used (settings seed mixed with the star name).</summary>
    public int Seed { get; init; }
    public IReadOnlyList<DistanceRoute> Routes { get; init; } = [];
    public IReadOnlyList<string> Flags { get; init; } = [];
}

/// <summary>Stage "period-luminosity + extinction -> distance".</summary>
public static class DistanceEstimator
{
    /// <summary>
    /// Distance of one star from its class, period (days, observed mode) and per-band intensity means, using the
    /// embedded calibration registry. Expected failures come back as <see cref="DistanceResult.FailureReason"/>.
    /// Deterministic: the Monte Carlo uses System.Random seeded from settings.Seed and the star name.
    /// </summary>
    public static DistanceResult EstimateDistance(StarInfo star, PulsatorClass cls, double periodDays, double periodErrDays, IReadOnlyList<BandFit> fits, DistanceSettings settings)
        => EstimateDistance(star, cls, periodDays, periodErrDays, fits, settings, CalibrationRegistry.Embedded);

    /// <summary>As the overload above, with an explicit registry (embedded plus administrator relations).</summary>
    public static DistanceResult EstimateDistance(StarInfo star, PulsatorClass cls, double periodDays, double periodErrDays, IReadOnlyList<BandFit> fits, DistanceSettings settings, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(star);
        ArgumentNullException.ThrowIfNull(fits);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(registry);
        if (settings.MonteCarloDraws is < 0 or > 1_000_000) throw new ArgumentOutOfRangeException(nameof(settings), "MonteCarloDraws must be 0..1e6");
        if (!(settings.Rv > 0)) throw new ArgumentOutOfRangeException(nameof(settings), "Rv must be positive");
        return DistanceComputation.Run(star, cls, periodDays, periodErrDays, fits, settings, registry);
    }
}
