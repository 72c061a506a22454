using Hangfire;
using Hangfire.PostgreSql;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using PulseLadder.Storage;

namespace PulseLadder.Jobs;

/// <summary>The one call that wires Hangfire: in-memory storage (embedded) or PostgreSQL (scale-out).</summary>
public static class JobsSetup
{
    /// <param name="services">Service collection; a <see cref="Database"/> and a TimeProvider must be registered.</param>
    /// <param name="options">Validated job options.</param>
    /// <param name="database">The campaign database (its PostgreSQL connection also holds Hangfire's tables).</param>
    /// <param name="isWorkerOnly">True for worker processes: they refuse in-memory storage (it cannot be shared).</param>
    public static IServiceCollection AddPulseLadderJobs(this IServiceCollection services, JobsOptions options, Database database, bool isWorkerOnly)
    {
        if (options.Validate() is { } error) throw new InvalidOperationException(error);
        if (isWorkerOnly && options.Storage == "inmemory")
            throw new InvalidOperationException(
                $"A worker process cannot use in-memory job storage: set '{JobsOptions.Section}:Storage' to 'postgres' " +
                "(and 'PulseLadder:Database' to a postgres: connection) so the web host and the workers share one queue.");
        if (options.Storage == "postgres" && database.Dialect != Dialect.Postgres)
            throw new InvalidOperationException($"'{JobsOptions.Section}:Storage' = 'postgres' needs 'PulseLadder:Database' to be a postgres: connection.");

        services.AddHangfire(cfg =>
        {
            cfg.SetDataCompatibilityLevel(CompatibilityLevel.Version_180)
               .UseSimpleAssemblyNameTypeSerializer()
               .UseRecommendedSerializerSettings();
            if (options.Storage == "inmemory") cfg.UseInMemoryStorage();
            else cfg.UsePostgreSqlStorage(o => o.UseNpgsqlConnection(database.ConnectionString), new PostgreSqlStorageOptions
            {
                SchemaName = "hangfire",
                PrepareSchemaIfNecessary = true,
                // A job whose worker died is handed to another worker after this long. Live workers keep extending
                // it (sliding), so a long analysis is not handed out twice, and a killed worker's job returns quickly
                // instead of after a fixed 5 minutes.
                InvisibilityTimeout = TimeSpan.FromSeconds(30),
                UseSlidingInvisibilityTimeout = true,
                QueuePollInterval = TimeSpan.FromMilliseconds(200),
                // Hangfire takes a job's state lock for each state change (milliseconds). A worker SIGKILLed while
                // holding one leaves the lock row behind, and with the default 10 minutes every other worker that
                // picks that job up waits that long (seen in the fault test). Locks older than this count as abandoned.
                DistributedLockTimeout = TimeSpan.FromSeconds(30),
            });
        });
        if (options.RunServer)
        {
            services.AddHangfireServer(o =>
            {
                o.WorkerCount = options.EffectiveWorkers;
                // Summaries are short and follow a person's decision: serve them before the bulk of star analyses.
                o.Queues = ["summary", "analysis", "default"];
                o.SchedulePollingInterval = TimeSpan.FromSeconds(1);
            });
        }
        services.AddSingleton(options);
        services.AddSingleton<IAnalysisQueue, HangfireAnalysisQueue>();
        // The embedded relations unless the host registered a registry with administrator files (Calibrations).
        services.TryAddSingleton(Core.Calibration.CalibrationRegistry.Embedded);
        services.AddTransient<AnalyzeStarJob>();
        services.AddTransient<FieldSummaryJob>();
        return services;
    }
}
