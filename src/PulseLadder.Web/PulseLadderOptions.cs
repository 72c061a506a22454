namespace PulseLadder.Web;

/// <summary>Configuration section "PulseLadder".</summary>
public sealed class PulseLadderOptions
{
    public const string Section = "PulseLadder";

    /// <summary>Folder for the SQLite file and other local state (embedded default).</summary>
    public string DataDir { get; set; } = "pulseladder-data";

    /// <summary>"sqlite:PATH" or "postgres:CONNECTION STRING"; empty means sqlite in <see cref="DataDir"/>.</summary>
    public string Database { get; set; } = "";

    /// <summary>Largest accepted upload request, bytes.</summary>
    public long MaxUploadBytes { get; set; } = 1L << 30;

    /// <summary>Largest number of photometry rows per upload.</summary>
    public int MaxUploadRows { get; set; } = 20_000_000;

    /// <summary>
    /// Uploads whose photometry files total at most this many bytes keep their parsed rows from the validating reading
    /// and are stored from memory (~3 bytes of memory per byte of CSV); larger ones are read a second time inside the
    /// storing transaction, so memory stays flat however large the file. 0 always reads twice.
    /// </summary>
    public long InMemoryUploadBytes { get; set; } = 32L << 20;

    /// <summary>Sign-in and single-user mode (section PulseLadder:Auth).</summary>
    public Auth.AuthOptions Auth { get; set; } = new();

    /// <summary>Request rates and time limits (section PulseLadder:Limits).</summary>
    public Auth.LimitsOptions Limits { get; set; } = new();

    /// <summary>
    /// Folder of administrator calibration files (*.csv, columns as the embedded relations.csv), read at start-up;
    /// empty means DataDir/calibrations. Workers read the same setting and must see the same files.
    /// </summary>
    public string CalibrationDir { get; set; } = "";

    public string EffectiveCalibrationDir => string.IsNullOrWhiteSpace(CalibrationDir)
        ? Jobs.Calibrations.DefaultFolder(DataDir)
        : Path.GetFullPath(CalibrationDir);

    public string EffectiveDatabase => string.IsNullOrWhiteSpace(Database)
        ? "sqlite:" + Path.Combine(Path.GetFullPath(DataDir), "pulseladder.db")
        : Database;

    public string? Validate()
    {
        if (!string.IsNullOrWhiteSpace(Database) && !Database.StartsWith("sqlite:", StringComparison.OrdinalIgnoreCase)
            && !Database.StartsWith("postgres:", StringComparison.OrdinalIgnoreCase))
            return $"Setting '{Section}:Database' must start with 'sqlite:' or 'postgres:'.";
        if (MaxUploadBytes < 1024) return $"Setting '{Section}:MaxUploadBytes' must be at least 1024.";
        if (MaxUploadRows < 1) return $"Setting '{Section}:MaxUploadRows' must be positive.";
        if (InMemoryUploadBytes < 0) return $"Setting '{Section}:InMemoryUploadBytes' must be 0 or more.";
        return Auth.Validate() ?? Limits.Validate();
    }
}
