using System.ComponentModel;
using Spectre.Console;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class StatusCommand(IServerClientFactory clients) : Command<StatusCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--server <URL>")]
        public string Server { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--token <TOKEN>"), Description("Personal API token (default: the PULSELADDER_TOKEN environment variable).")]
        public string? Token { get; init; }

        [CommandOption("--upload <ID>"), Description("Progress of one upload instead of the whole campaign.")]
        public long? Upload { get; init; }

        [CommandOption("--wait"), Description("Wait, with a progress bar, until every star is analysed.")]
        public bool Wait { get; init; }

        [CommandOption("--timeout <SECONDS>")]
        public int Timeout { get; init; } = 3600;
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        using var client = clients.Create(s.Server, s.Token);
        string path = s.Upload is { } id ? $"api/v1/uploads/{id}" : "api/v1/progress";
        (long total, long done) Read()
        {
            var j = client.GetJsonAsync(path, ct).GetAwaiter().GetResult();
            return (j.GetProperty("stars_total").GetInt64(), j.GetProperty("stars_done").GetInt64());
        }
        var (total, done) = Read();
        if (s.Wait && done < total)
        {
            var deadline = DateTime.UtcNow.AddSeconds(s.Timeout);
            AnsiConsole.Progress().Start(ctx =>
            {
                var task = ctx.AddTask("stars analysed", maxValue: Math.Max(1, total));
                while (done < total && DateTime.UtcNow < deadline && !ct.IsCancellationRequested)
                {
                    Thread.Sleep(500);
                    (total, done) = Read();
                    task.MaxValue = Math.Max(1, total);
                    task.Value = done;
                }
            });
        }
        Console.WriteLine($"{done} of {total} stars analysed");
        foreach (var f in client.GetJsonAsync("api/v1/fields", ct).GetAwaiter().GetResult().EnumerateArray())
            Console.WriteLine($"  field {f.GetProperty("name").GetString()}: {f.GetProperty("analysed")} analysed, {f.GetProperty("accepted")} accepted");
        return done >= total ? 0 : 1;
    }
}
