using System.ComponentModel;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class ExportCommand(IServerClientFactory clients) : Command<ExportCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--server <URL>")]
        public string Server { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--field <NAME>"), Description("Field name (or numeric id); omit for the whole campaign in one table.")]
        public string? Field { get; init; }

        [CommandOption("--format <FORMAT>"), Description("csv, json or votable (IVOA VOTable 1.4).")]
        public string Format { get; init; } = "csv";

        [CommandOption("--columns <LIST>"), Description("Comma-separated subset of the export columns, in the order wanted (default: all).")]
        public string? Columns { get; init; }

        [CommandOption("--accepted-only")]
        public bool AcceptedOnly { get; init; }

        [CommandOption("--out <FILE>"), Description("Output file (default: standard output).")]
        public string? Out { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        using var client = clients.Create(s.Server);
        string query = $"export?format={Uri.EscapeDataString(s.Format)}&accepted_only={(s.AcceptedOnly ? "true" : "false")}"
            + (string.IsNullOrWhiteSpace(s.Columns) ? "" : "&columns=" + Uri.EscapeDataString(s.Columns));
        string path = "api/v1/" + query;
        if (!string.IsNullOrEmpty(s.Field))
        {
            long? id = null;
            foreach (var f in client.GetJsonAsync("api/v1/fields", ct).GetAwaiter().GetResult().EnumerateArray())
                if (f.GetProperty("name").GetString() == s.Field || f.GetProperty("field_id").GetInt64().ToString(System.Globalization.CultureInfo.InvariantCulture) == s.Field)
                    id = f.GetProperty("field_id").GetInt64();
            if (id is null) { Console.Error.WriteLine($"pulseladder export: no field '{s.Field}'"); return 1; }
            path = $"api/v1/fields/{id}/{query}";
        }
        var bytes = client.GetBytesAsync(path, ct).GetAwaiter().GetResult();
        if (s.Out is null) { using var o = Console.OpenStandardOutput(); o.Write(bytes); }
        else File.WriteAllBytes(s.Out, bytes);
        return 0;
    }
}
