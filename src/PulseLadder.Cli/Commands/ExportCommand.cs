using System.ComponentModel;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class ExportCommand(IServerClientFactory clients) : Command<ExportCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--server <URL>")]
        public string Server { get; init; } = "http://127.0.0.1:5000";

        [CommandOption("--token <TOKEN>"), Description("Personal API token (default: the PULSELADDER_TOKEN environment variable).")]
        public string? Token { get; init; }

        [CommandOption("--field <NAME>"), Description("Field name (or numeric id); omit for the whole campaign in one table.")]
        public string? Field { get; init; }

        [CommandOption("--format <FORMAT>"), Description("csv, json or votable (IVOA VOTable 1.4); with --figure: svg or png.")]
        public string Format { get; init; } = "csv";

        [CommandOption("--columns <LIST>"), Description("Comma-separated subset of the export columns, in the order wanted (default: all).")]
        public string? Columns { get; init; }

        [CommandOption("--accepted-only")]
        public bool AcceptedOnly { get; init; }

        [CommandOption("--out <FILE>"), Description("Output file (default: standard output).")]
        public string? Out { get; init; }

        [CommandOption("--figure <KIND>"), Description("Download a figure instead of the table: 'pl' (the field's period-luminosity diagram, needs --field) or 'lightcurve' (needs --star).")]
        public string? Figure { get; init; }

        [CommandOption("--star <NAME>"), Description("Star name for --figure lightcurve.")]
        public string? Star { get; init; }

        [CommandOption("--width <PIXELS>"), Description("PNG width (default 640).")]
        public int? Width { get; init; }

        [CommandOption("--height <PIXELS>"), Description("PNG height (default 480 for pl, 260 per band for lightcurve).")]
        public int? Height { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        using var client = clients.Create(s.Server, s.Token);
        if (s.Figure is not null) return Figure(client, s, ct);
        string query = $"export?format={Uri.EscapeDataString(s.Format)}&accepted_only={(s.AcceptedOnly ? "true" : "false")}"
            + (string.IsNullOrWhiteSpace(s.Columns) ? "" : "&columns=" + Uri.EscapeDataString(s.Columns));
        string path = "api/v1/" + query;
        if (!string.IsNullOrEmpty(s.Field))
        {
            long? id = FieldId(client, s.Field, ct);
            if (id is null) { Console.Error.WriteLine($"pulseladder export: no field '{s.Field}'"); return 1; }
            path = $"api/v1/fields/{id}/{query}";
        }
        Write(client.GetBytesAsync(path, ct).GetAwaiter().GetResult(), s.Out);
        return 0;
    }

    private static int Figure(ServerClient client, Settings s, CancellationToken ct)
    {
        string format = s.Format.Equals("csv", StringComparison.OrdinalIgnoreCase) ? "svg" : s.Format.ToLowerInvariant();
        if (format is not ("svg" or "png")) { Console.Error.WriteLine($"pulseladder export: --figure needs --format svg or png, got '{s.Format}'"); return 1; }
        var inv = System.Globalization.CultureInfo.InvariantCulture;
        string size = format == "png"
            ? string.Join("&", new[] { s.Width is { } w ? "width=" + w.ToString(inv) : null, s.Height is { } h ? "height=" + h.ToString(inv) : null }.OfType<string>())
            : "";
        string path;
        switch (s.Figure!.ToLowerInvariant())
        {
            case "pl":
                if (string.IsNullOrEmpty(s.Field)) { Console.Error.WriteLine("pulseladder export: --figure pl needs --field"); return 1; }
                if (FieldId(client, s.Field, ct) is not { } id) { Console.Error.WriteLine($"pulseladder export: no field '{s.Field}'"); return 1; }
                path = $"api/v1/fields/{id}/figures/pl.{format}?accepted_only={(s.AcceptedOnly ? "true" : "false")}" + (size.Length > 0 ? "&" + size : "");
                break;
            case "lightcurve":
                if (string.IsNullOrEmpty(s.Star)) { Console.Error.WriteLine("pulseladder export: --figure lightcurve needs --star"); return 1; }
                var star = client.GetJsonAsync("api/v1/stars/by-name/" + Uri.EscapeDataString(s.Star), ct).GetAwaiter().GetResult();
                long starId = star.GetProperty("star").GetProperty("star_id").GetInt64();
                path = $"api/v1/stars/{starId}/figures/lightcurve.{format}" + (size.Length > 0 ? "?" + size : "");
                break;
            default:
                Console.Error.WriteLine($"pulseladder export: unknown figure '{s.Figure}' (pl or lightcurve)");
                return 1;
        }
        Write(client.GetBytesAsync(path, ct).GetAwaiter().GetResult(), s.Out);
        return 0;
    }

    private static long? FieldId(ServerClient client, string field, CancellationToken ct)
    {
        foreach (var f in client.GetJsonAsync("api/v1/fields", ct).GetAwaiter().GetResult().EnumerateArray())
            if (f.GetProperty("name").GetString() == field || f.GetProperty("field_id").GetInt64().ToString(System.Globalization.CultureInfo.InvariantCulture) == field)
                return f.GetProperty("field_id").GetInt64();
        return null;
    }

    private static void Write(byte[] bytes, string? output)
    {
        if (output is null) { using var o = Console.OpenStandardOutput(); o.Write(bytes); }
        else File.WriteAllBytes(output, bytes);
    }
}
