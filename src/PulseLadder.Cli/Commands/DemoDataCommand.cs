using PulseLadder.Demo;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class DemoDataCommand : Command<DemoDataCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--out <DIR>")]
        public string Out { get; init; } = "demo-out";

        [CommandOption("--seed <N>")]
        public ulong? Seed { get; init; }
    }

    public override int Execute(CommandContext context, Settings settings, CancellationToken cancellationToken)
    {
        var options = settings.Seed is { } s ? new DemoOptions { Seed = s } : new DemoOptions();
        DemoCampaign.WriteTo(settings.Out, options);
        Console.WriteLine($"Demo campaign written to {Path.GetFullPath(settings.Out)}");
        return 0;
    }
}
