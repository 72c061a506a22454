using System.ComponentModel;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using PulseLadder.Web;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class ServeCommand : Command<ServeCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--urls <URLS>"), Description("Addresses to listen on (default http://127.0.0.1:5000).")]
        public string Urls { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--data-dir <DIR>"), Description("Folder for the SQLite database (default ./pulseladder-data).")]
        public string? DataDir { get; init; }

        [CommandOption("--database <SETTING>"), Description("sqlite:PATH or postgres:CONNECTION STRING.")]
        public string? Database { get; init; }

        [CommandOption("--jobs <STORAGE>"), Description("Job storage: inmemory (default) or postgres.")]
        public string? Jobs { get; init; }

        [CommandOption("--workers <N>"), Description("Job worker threads in this process (default: one per core; 0 with --no-jobs).")]
        public int? Workers { get; init; }

        [CommandOption("--no-jobs"), Description("Run no job server here (workers elsewhere do the work).")]
        public bool NoJobs { get; init; }

        [CommandOption("--demo"), Description("Load the invented demo campaign when the database is empty (implies --single-user).")]
        public bool Demo { get; init; }

        [CommandOption("--single-user"), Description("No sign-in: every request acts as the local admin. Loopback addresses only.")]
        public bool SingleUser { get; init; }
    }

    public override int Execute(CommandContext context, Settings settings, CancellationToken cancellationToken)
    {
        var args = new List<string> { "--urls", settings.Urls };
        void Set(string key, string? value) { if (value is not null) { args.Add($"--{key}"); args.Add(value); } }
        Set("PulseLadder:DataDir", settings.DataDir);
        Set("PulseLadder:Database", settings.Database);
        Set("PulseLadder:Jobs:Storage", settings.Jobs);
        Set("PulseLadder:Jobs:Workers", settings.Workers?.ToString(System.Globalization.CultureInfo.InvariantCulture));
        if (settings.NoJobs) Set("PulseLadder:Jobs:RunServer", "false");
        // The demo is one person trying the service on their own machine: no account to create first.
        if (settings.SingleUser || settings.Demo) Set("PulseLadder:Auth:SingleUser", "true");
        var app = PulseLadderWeb.Build(args.ToArray());
        if (settings.Demo)
        {
            var db = app.Services.GetRequiredService<PulseLadder.Storage.Database>();
            int stars = DemoLoader.LoadIfEmpty(db, app.Services.GetRequiredService<TimeProvider>());
            Console.WriteLine(stars > 0 ? $"Loaded the demo campaign: {stars} stars queued for analysis." : "Database not empty: demo campaign not loaded.");
        }
        Console.WriteLine($"PulseLadder is serving on {settings.Urls}" + (settings.SingleUser || settings.Demo
            ? " in single-user mode (no sign-in; every request is the local admin)"
            : ""));
        app.StartAsync(cancellationToken).GetAwaiter().GetResult();
        app.WaitForShutdownAsync(cancellationToken).GetAwaiter().GetResult();
        return 0;
    }
}
