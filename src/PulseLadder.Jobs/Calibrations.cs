using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using PulseLadder.Core.Calibration;

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

    /// <summary>Registers <paramref name="registry"/> as the process's one registry (replacing the embedded fallback).</summary>
    public static IServiceCollection AddPulseLadderCalibrations(this IServiceCollection services, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        services.RemoveAll<CalibrationRegistry>();
        services.AddSingleton(registry);
        return services;
    }
}
