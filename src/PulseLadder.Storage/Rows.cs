namespace PulseLadder.Storage;

// Plain row types, one per table, mapped by Dapper (snake_case columns to PascalCase properties).

public sealed class FieldRow
{
    public long Id { get; init; }
    public string Name { get; init; } = "";
    public string? CalibrationId { get; init; }
    public double? DefaultEbv { get; init; }
    public string CreatedAt { get; init; } = "";
}

public sealed class StarRow
{
    public long Id { get; init; }
    public string Name { get; init; } = "";
    public long FieldId { get; init; }
    public string FieldName { get; init; } = "";
    public double RaDeg { get; init; }
    public double DecDeg { get; init; }
    public string? DeclaredClass { get; init; }
    public double? Ebv { get; init; }
    public double? EbvErr { get; init; }
    public double? Feh { get; init; }
    public long Revision { get; init; }
    public string ReviewState { get; init; } = ReviewStates.Awaiting;
    public double? ChosenPeriodDays { get; init; }
    public string? ChosenClass { get; init; }
    public string CreatedAt { get; init; } = "";
}

/// <summary>Review states of a star (our names; stored as text).</summary>
public static class ReviewStates
{
    public const string Awaiting = "awaiting";
    public const string Accepted = "accepted";
    public const string Rejected = "rejected";
}

public sealed class UploadRow
{
    public long Id { get; init; }
    public string Kind { get; init; } = "";
    public string FileName { get; init; } = "";
    public string Sha256 { get; init; } = "";
    public string? TimeScale { get; init; }
    public double TimeOffset { get; init; }
    public long Rows { get; init; }
    public string UploadedBy { get; init; } = "";
    public string UploadedAt { get; init; } = "";
    public long BatchId { get; init; }
}

public sealed class AnalysisRow
{
    public long Id { get; init; }
    public long StarId { get; init; }
    public long Revision { get; init; }
    public string PipelineVersion { get; init; } = "";
    public string Outcome { get; init; } = "";
    public string? Class { get; init; }
    public double? PeriodDays { get; init; }
    public double? PeriodErrDays { get; init; }
    public double? Fap { get; init; }
    public double? DistanceModulus { get; init; }
    public double? DistanceModulusErr { get; init; }
    public double? DistancePc { get; init; }
    public double? DistancePcErr { get; init; }
    public string Flags { get; init; } = "";
    public string SummaryJson { get; init; } = "{}";
    public string ResultJson { get; init; } = "";
    public string InputHash { get; init; } = "";
    public string CreatedAt { get; init; } = "";
}

public sealed class DecisionRow
{
    public long Id { get; init; }
    public long StarId { get; init; }
    public long? AnalysisId { get; init; }
    public string Action { get; init; } = "";
    public double? PeriodDays { get; init; }
    public string? Class { get; init; }
    public string? Note { get; init; }
    public string DecidedBy { get; init; } = "";
    public string DecidedAt { get; init; } = "";
}

public sealed class FieldSummaryRow
{
    public long FieldId { get; init; }
    public string PipelineVersion { get; init; } = "";
    public long NUsed { get; init; }
    public double? Mu { get; init; }
    public double? MuErr { get; init; }
    public string ResultJson { get; init; } = "";
    public string ComputedAt { get; init; } = "";
}

public sealed class AuditRow
{
    public long Id { get; init; }
    public string At { get; init; } = "";
    public string Actor { get; init; } = "";
    public string Action { get; init; } = "";
    public string Subject { get; init; } = "";
    public string Detail { get; init; } = "";
}
