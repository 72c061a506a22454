using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Distances;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Pipeline;

/// <summary>Every setting a stage reads. Stored with each result so a rerun is reproducible.</summary>
public sealed record PipelineSettings
{
    public CleaningSettings Cleaning { get; init; } = new();
    public PeriodSearchSettings PeriodSearch { get; init; } = new();
    public FitSettings Fit { get; init; } = new();
    public DistanceSettings Distance { get; init; } = new();

    public static PipelineSettings Default { get; } = new();
}

/// <summary>What a reviewer imposed on a star; downstream stages honour it on the rerun.</summary>
/// <param name="PeriodDays">A period the reviewer chose (e.g. an alternate peak), or null.</param>
/// <param name="Class">A class the reviewer chose, or null.</param>
public sealed record ReviewOverrides(double? PeriodDays = null, PulseLadder.Core.Photometry.PulsatorClass? Class = null)
{
    public static ReviewOverrides None { get; } = new();
}
