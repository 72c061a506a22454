using System.ComponentModel;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class ExportCommand : Command<ExportCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--server <URL>")]
        public string Server { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--field <NAME>"), Description("Field name (or numeric id).")]
        public string Field { get; init; } = "";

        [CommandOption("--format <FORMAT>"), Description("csv or json.")]
        public string Format { get; init; } = "csv";

        [CommandOption("--accepted-only")]
        public bool AcceptedOnly { get; init; }

        [CommandOption("--out <FILE>"), Description("Output file (default: standard output).")]
        public string? Out { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        using var client = new ServerClient(s.Server);
        long? id = null;
        foreach (var f in client.GetJsonAsync("api/v1/fields", ct).GetAwaiter().GetResult().EnumerateArray())
            if (f.GetProperty("name").GetString() == s.Field || f.GetProperty("field_id").GetInt64().ToString(System.Globalization.CultureInfo.InvariantCulture) == s.Field)
                id = f.GetProperty("field_id").GetInt64();
        if (id is null) { Console.Error.WriteLine($"pulseladder export: no field '{s.Field}'"); return 1; }
        var bytes = client.GetBytesAsync($"api/v1/fields/{id}/export?format={Uri.EscapeDataString(s.Format)}&accepted_only={(s.AcceptedOnly ? "true" : "false")}", ct).GetAwaiter().GetResult();
        if (s.Out is null) { using var o = Console.OpenStandardOutput(); o.Write(bytes); }
        else File.WriteAllBytes(s.Out, bytes);
        return 0;
    }
}
