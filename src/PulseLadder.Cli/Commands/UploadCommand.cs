using System.ComponentModel;
using System.Text.Json;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class UploadCommand(IServerClientFactory clients) : Command<UploadCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandArgument(0, "[PHOTOMETRY]")]
        public string[] Files { get; init; } = [];

        [CommandOption("--server <URL>"), Description("Server address, e.g. http://127.0.0.1:5000.")]
        public string Server { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--token <TOKEN>"), Description("Personal API token (default: the PULSELADDER_TOKEN environment variable).")]
        public string? Token { get; init; }

        [CommandOption("--stars <FILE>")]
        public string? Stars { get; init; }

        [CommandOption("--time-scale <SCALE>")]
        public string? TimeScale { get; init; }

        [CommandOption("--time-offset <DAYS>")]
        public string? TimeOffset { get; init; }

        [CommandOption("--star <NAME>")]
        public string? Star { get; init; }

        [CommandOption("--band <BAND>")]
        public string? Band { get; init; }

        [CommandOption("--observer <NAME>")]
        public string? Observer { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        using var client = clients.Create(s.Server, s.Token);
        var fields = new Dictionary<string, string?>
        {
            ["time_scale"] = s.TimeScale, ["time_offset"] = s.TimeOffset, ["star"] = s.Star, ["band"] = s.Band, ["observer"] = s.Observer,
        };
        var (ok, body) = client.UploadAsync(s.Stars, s.Files, fields, ct).GetAwaiter().GetResult();
        if (!ok)
        {
            Console.Error.WriteLine(body.TryGetProperty("detail", out var d) ? d.GetString() : body.ToString());
            if (body.TryGetProperty("errors", out var errs) && errs.ValueKind == JsonValueKind.Array)
                foreach (var e in errs.EnumerateArray())
                    Console.Error.WriteLine($"{e.GetProperty("file").GetString()}:{e.GetProperty("line").GetInt64()}: {(e.TryGetProperty("column", out var col) && col.ValueKind == JsonValueKind.String ? col.GetString() + ": " : "")}{e.GetProperty("message").GetString()}");
            return 1;
        }
        Console.WriteLine($"upload {body.GetProperty("upload_id")}: {body.GetProperty("observations_added")} observations, " +
            $"{body.GetProperty("stars_added")} new stars, {body.GetProperty("stars_queued")} stars queued" +
            (body.GetProperty("duplicate").GetBoolean() ? " (identical content was uploaded before: nothing added)" : ""));
        return 0;
    }
}
