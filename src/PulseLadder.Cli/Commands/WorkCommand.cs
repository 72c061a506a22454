using Microsoft.Extensions.Hosting;
using PulseLadder.Jobs;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class WorkCommand : Command<WorkCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [System.ComponentModel.Description("postgres:CONNECTION STRING of the campaign database (also holds the job queue).")]
        [CommandOption("--database <SETTING>")]
        public string? Database { get; init; }

        [CommandOption("--workers <N>")]
        public int? Workers { get; init; }
    }

    public override int Execute(CommandContext context, Settings settings, CancellationToken cancellationToken)
    {
        var args = new List<string>();
        if (settings.Database is not null) { args.Add("--PulseLadder:Database"); args.Add(settings.Database); args.Add("--PulseLadder:Jobs:Storage"); args.Add("postgres"); }
        if (settings.Workers is { } w) { args.Add("--PulseLadder:Jobs:Workers"); args.Add(w.ToString(System.Globalization.CultureInfo.InvariantCulture)); }
        WorkerHost.Build(args.ToArray()).RunAsync(cancellationToken).GetAwaiter().GetResult();
        return 0;
    }
}
