using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using PulseLadder.Core.Calibration;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// The calibration registry of a process: the embedded relations plus every administrator file (*.csv, columns as
/// relations.csv) in the calibration folder, read once at start-up by the web host and by every worker, so both
/// hold the same registry when they read the same folder (<see cref="CalibrationRegistry.Hash"/> is stored with each
/// analysis and logged at start-up to check that).
/// </summary>
public static class Calibrations
{
    /// <summary>Configuration key of the folder; empty or missing means <see cref="DefaultFolder"/>.</summary>
    public const string Setting = "PulseLadder:CalibrationDir";

    /// <summary>DataDir/calibrations.</summary>
    public static string DefaultFolder(string dataDir) => Path.Combine(Path.GetFullPath(dataDir), "calibrations");

    /// <summary>
    /// Embedded relations plus the folder's *.csv files in ordinal name order, each validated (errors name the file,
    /// line and column). A missing folder means no administrator relations. I/O errors propagate.
    /// </summary>
    public static CalibrationLoadResult LoadFolder(string folder)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(folder);
        var registry = CalibrationRegistry.Embedded;
        var errors = new List<CalibrationFileError>();
        if (!Directory.Exists(folder)) return new CalibrationLoadResult(registry, errors);
        foreach (var path in Directory.GetFiles(folder, "*.csv").Order(StringComparer.Ordinal))
        {
            var res = registry.WithUserRelations(File.ReadAllText(path), Path.GetFileName(path));
            registry = res.Registry;
            errors.AddRange(res.Errors);
        }
        return new CalibrationLoadResult(registry, errors);
    }

    /// <summary>
    /// As <see cref="LoadFolder"/>, refusing any error: a bad file stops the process with every problem listed
    /// (docs/calibrations.md says why a refusal, not a skip).
    /// </summary>
    public static CalibrationRegistry LoadFolderOrThrow(string folder)
    {
        var res = LoadFolder(folder);
        if (!res.Ok)
            throw new InvalidOperationException(
                $"Calibration files in '{folder}' (setting '{Setting}') are invalid; fix or remove them and start again:"
                + Environment.NewLine + string.Join(Environment.NewLine, res.Errors.Select(e => "  " + e)));
        return res.Registry;
    }

    /// <summary>Audit-log action under which the web host records the registry hash it runs with (subject = hash).</summary>
    public const string AuditAction = "calibrations:loaded";

    /// <summary>
    /// Web host, at start-up after migrating: records the registry hash in the audit log when it differs from the last
    /// one recorded (so the log shows every change of administrator files, and workers can compare). Returns whether
    /// an entry was written.
    /// </summary>
    public static bool RecordInUse(Database db, CalibrationRegistry registry, string folder, string now)
    {
        ArgumentNullException.ThrowIfNull(db);
        ArgumentNullException.ThrowIfNull(registry);
        using var c = db.Open();
        if (AuditStore.LatestOfAction(c, AuditAction) is { } last && last.Subject == registry.Hash) return false;
        AuditStore.Append(c, null, now, "web", AuditAction, registry.Hash,
            $"{registry.Relations.Count} relations; administrator files: {(registry.UserFiles.Count == 0 ? "none" : string.Join(", ", registry.UserFiles))}; folder {folder}");
        return true;
    }

    /// <summary>
    /// Worker, at start-up: a warning naming both hashes and the setting when the web host last recorded a different
    /// registry, else null (also null when the web host has recorded none yet).
    /// </summary>
    public static string? CompareWithWebHost(Database db, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(db);
        ArgumentNullException.ThrowIfNull(registry);
        using var c = db.Open();
        if (AuditStore.LatestOfAction(c, AuditAction) is not { } last || last.Subject == registry.Hash) return null;
        return $"this worker's calibration registry {registry.Hash[..12]} differs from the web host's {last.Subject[..Math.Min(12, last.Subject.Length)]} "
            + $"({last.Detail}); point '{Setting}' of every process at the same files. Analyses record the hash they used.";
    }

    /// <summary>Registers <paramref name="registry"/> as the process's one registry (replacing the embedded fallback).</summary>
    public static IServiceCollection AddPulseLadderCalibrations(this IServiceCollection services, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        services.RemoveAll<CalibrationRegistry>();
        services.AddSingleton(registry);
        return services;
    }
}
