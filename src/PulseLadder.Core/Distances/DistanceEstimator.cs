using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Distances;

/// <summary>Settings of the distance stage.</summary>
public sealed record DistanceSettings
{
    public double Rv { get; init; } = 3.1;
    /// <summary>Relation id to use for classical Cepheids (null: the registry's default for the bands present).</summary>
    public string? CepheidRelationId { get; init; }
    public int MonteCarloDraws { get; init; } = 2000;
    public int Seed { get; init; } = 20261201;
}

/// <summary>Distance of one star by one route (a relation in one band or Wesenheit index).</summary>
public sealed record DistanceRoute
{
    public string RelationId { get; init; } = "";
    public string Band { get; init; } = "";
    public double AbsoluteMag { get; init; }
    public double ApparentMag { get; init; }
    public double Extinction { get; init; }
    public double Mu { get; init; }
    public double MuErr { get; init; }
    public IReadOnlyList<string> Flags { get; init; } = [];
}

/// <summary>Output of <see cref="DistanceEstimator.EstimateDistance"/>; FailureReason set when no distance is possible.</summary>
public sealed record DistanceResult
{
    public string? FailureReason { get; init; }
    public string RelationId { get; init; } = "";
    public string Band { get; init; } = "";
    public double? Ebv { get; init; }
    public string EbvSource { get; init; } = "";
    public double Mu { get; init; }
    public double MuErr { get; init; }
    public double MuErrStat { get; init; }
    public double MuErrSys { get; init; }
    public double DistancePc { get; init; }
    public double DistancePcErr { get; init; }
    public IReadOnlyList<DistanceRoute> Routes { get; init; } = [];
    public IReadOnlyList<string> Flags { get; init; } = [];
}

/// <summary>Stage "period-luminosity + extinction -> distance".</summary>
public static class DistanceEstimator
{
    public static DistanceResult EstimateDistance(StarInfo star, PulsatorClass cls, double periodDays, double periodErrDays, IReadOnlyList<BandFit> fits, DistanceSettings settings)
        => throw new NotImplementedException("contract: implemented by the distance work");
}
