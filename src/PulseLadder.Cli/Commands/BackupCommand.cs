using System.ComponentModel;
using PulseLadder.Storage;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary>
/// Writes a consistent snapshot of the embedded SQLite database, safe while the service runs (SQLite online backup).
/// Exit codes: 0 written, 1 refused (target exists, PostgreSQL database, failed integrity check), 2 no database.
/// </summary>
public sealed class BackupCommand : Command<BackupCommand.Settings>
{
    public sealed class Settings : DatabaseSettings
    {
        [CommandOption("--out <FILE>"), Description("Snapshot file to write (required).")]
        public string? Out { get; init; }

        [CommandOption("--force"), Description("Overwrite the snapshot file when it exists.")]
        public bool Force { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct) => Run(s, Console.Out, Console.Error);

    internal static int Run(Settings s, TextWriter output, TextWriter error)
    {
        if (string.IsNullOrWhiteSpace(s.Out)) { error.WriteLine("pulseladder backup: --out FILE is required"); return 2; }
        if (s.OpenExisting("backup", error) is not { } db) return 2;
        var r = Backup.ToFile(db, s.Out, s.Force);
        (r.Ok ? output : error).WriteLine((r.Ok ? "" : "pulseladder backup: ") + r.Message);
        return r.Ok ? 0 : 1;
    }
}
