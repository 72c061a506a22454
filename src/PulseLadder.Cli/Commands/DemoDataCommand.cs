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

        [CommandOption("--stars <N>"), System.ComponentModel.Description("Approximate number of stars, at least 30 (default 150).")]
        public int? Stars { get; init; }
    }

    public override int Execute(CommandContext context, Settings settings, CancellationToken cancellationToken)
    {
        var options = settings.Seed is { } s ? new DemoOptions { Seed = s } : new DemoOptions();
        if (settings.Stars is { } n)
        {
            if (n < 30) throw new InvalidOperationException("--stars must be at least 30.");
            options = options with { StarCount = n };
        }
        DemoCampaign.WriteTo(settings.Out, options);
        Console.WriteLine($"Demo campaign written to {Path.GetFullPath(settings.Out)}");
        return 0;
    }
}
