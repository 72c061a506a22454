using System.ComponentModel;
using Microsoft.Extensions.Configuration;
using PulseLadder.Web;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary>
/// Where the campaign database is, for the commands that work on it directly (user, backup, reproduce): the same
/// options and environment settings (PulseLadder__DataDir, PulseLadder__Database, ...) as <c>serve</c>.
/// </summary>
public class DatabaseSettings : CommandSettings
{
    [CommandOption("--data-dir <DIR>"), Description("Folder of the SQLite database (default ./pulseladder-data).")]
    public string? DataDir { get; init; }

    [CommandOption("--database <SETTING>"), Description("sqlite:PATH or postgres:CONNECTION STRING (else PulseLadder__Database).")]
    public string? Database { get; init; }

    /// <summary>The service's options as <c>serve</c> would resolve them with these command-line values.</summary>
    internal PulseLadderOptions ResolveOptions()
    {
        var overrides = new Dictionary<string, string?>();
        if (DataDir is not null) overrides["PulseLadder:DataDir"] = DataDir;
        if (Database is not null) overrides["PulseLadder:Database"] = Database;
        var config = new ConfigurationBuilder().AddEnvironmentVariables().AddInMemoryCollection(overrides).Build();
        var options = config.GetSection(PulseLadderOptions.Section).Get<PulseLadderOptions>() ?? new PulseLadderOptions();
        if (options.Validate() is { } error) throw new InvalidOperationException(error);
        return options;
    }

    /// <summary>
    /// Opens the database the server would use and brings its schema up to date (this build's migrations, under the
    /// same lock as the web host), so the first admin can be created before the server's first start.
    /// </summary>
    internal Storage.Database OpenDatabase()
    {
        var options = ResolveOptions();
        if (!options.EffectiveDatabase.StartsWith("postgres:", StringComparison.OrdinalIgnoreCase))
            Directory.CreateDirectory(Path.GetFullPath(options.DataDir));
        var db = Storage.Database.FromSetting(options.EffectiveDatabase);
        db.Migrate(TimeProvider.System);
        return db;
    }

    /// <summary>
    /// The database the server uses, only if it exists (never creates or migrates one): null, with the missing
    /// SQLite file named on <paramref name="error"/>, when there is none.
    /// </summary>
    internal Storage.Database? OpenExisting(string command, TextWriter error)
    {
        string setting = ResolveOptions().EffectiveDatabase;
        if (setting.StartsWith("sqlite:", StringComparison.OrdinalIgnoreCase) && !File.Exists(setting["sqlite:".Length..]))
        {
            error.WriteLine($"pulseladder {command}: no database at {setting["sqlite:".Length..]}");
            return null;
        }
        return Storage.Database.FromSetting(setting);
    }
}
