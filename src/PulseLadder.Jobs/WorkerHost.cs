using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>
/// A process that only runs the job server (scale-out). It never migrates: it refuses a schema it does not know,
/// and refuses in-memory job storage, with messages naming the setting.
/// </summary>
public static class WorkerHost
{
    public const string DatabaseSetting = "PulseLadder:Database";

    public static IHost Build(string[] args)
    {
        var builder = Host.CreateApplicationBuilder(args);
        var jobs = builder.Configuration.GetSection(JobsOptions.Section).Get<JobsOptions>() ?? new JobsOptions();
        jobs.RunServer = true;
        string setting = builder.Configuration[DatabaseSetting] ?? "";
        if (string.IsNullOrWhiteSpace(setting))
            throw new InvalidOperationException($"A worker needs '{DatabaseSetting}' (postgres:CONNECTION STRING), shared with the web host.");
        var db = Database.FromSetting(setting);
        if (jobs.Storage == "inmemory")
            throw new InvalidOperationException(
                $"A worker process cannot use in-memory job storage: set '{JobsOptions.Section}:Storage' to 'postgres'.");
        // Same folder setting as the web host (PulseLadder:CalibrationDir, default DataDir/calibrations): point both at
        // one shared folder so they hold the same registry; a bad file stops the worker as it stops the web host.
        string dataDir = builder.Configuration["PulseLadder:DataDir"] is { Length: > 0 } dd ? dd : "pulseladder-data";
        string calDir = builder.Configuration[Calibrations.Setting] is { Length: > 0 } cd ? Path.GetFullPath(cd) : Calibrations.DefaultFolder(dataDir);
        var registry = Calibrations.LoadFolderOrThrow(calDir);
        db.EnsureSchemaIsCurrent();
        Console.Error.WriteLine($"pulseladder worker: calibration registry {registry.Hash[..12]} ({registry.Relations.Count} relations; administrator files: {(registry.UserFiles.Count == 0 ? "none" : string.Join(", ", registry.UserFiles))}) from {calDir}");
        if (Calibrations.CompareWithWebHost(db, registry) is { } warning) Console.Error.WriteLine("pulseladder worker: WARNING: " + warning);
        builder.Services.AddPulseLadderCalibrations(registry);
        builder.Services.AddSingleton(db);
        builder.Services.AddSingleton(TimeProvider.System);
        builder.Services.AddPulseLadderJobs(jobs, db, isWorkerOnly: true);
        return builder.Build();
    }
}
