namespace PulseLadder.Jobs;

/// <summary>Configuration section "PulseLadder:Jobs".</summary>
public sealed class JobsOptions
{
    public const string Section = "PulseLadder:Jobs";

    /// <summary>"inmemory" (embedded default) or "postgres" (scale-out; uses the PostgreSQL connection of PulseLadder:Database).</summary>
    public string Storage { get; set; } = "inmemory";

    /// <summary>Worker threads of this process's job server; 0 means one per core.</summary>
    public int Workers { get; set; }

    /// <summary>Whether this process runs a job server at all (the web host may leave all work to worker processes).</summary>
    public bool RunServer { get; set; } = true;

    /// <summary>
    /// Stars per analysis job when many are queued at once (1: one job per star). A job costs the queue a fixed
    /// ~0.3 ms in memory and ~15-27 ms on PostgreSQL (enqueue, fetch, three state changes: docs/PERFORMANCE.md),
    /// against ~14 ms of analysis per star; batching keeps that overhead to a few percent. 0 means the default:
    /// 8 in memory, 64 on PostgreSQL (~3% there; 32 measured 5.9% once the analysis got faster in session 4).
    /// </summary>
    public int BatchSize { get; set; }

    public int EffectiveBatchSize => BatchSize > 0 ? BatchSize : Storage == "postgres" ? 64 : 8;

    public int EffectiveWorkers => Workers > 0 ? Workers : Environment.ProcessorCount;

    /// <summary>Returns an error message naming the setting, or null when valid.</summary>
    public string? Validate()
    {
        if (Storage is not ("inmemory" or "postgres"))
            return $"Setting '{Section}:Storage' must be 'inmemory' or 'postgres', not '{Storage}'.";
        if (Workers < 0 || Workers > 256) return $"Setting '{Section}:Workers' must be between 0 and 256.";
        if (BatchSize < 0 || BatchSize > 1000) return $"Setting '{Section}:BatchSize' must be between 0 and 1000.";
        return null;
    }
}
