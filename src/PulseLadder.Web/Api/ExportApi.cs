using System.Globalization;
using System.Text;
using Microsoft.AspNetCore.Http.HttpResults;
using PulseLadder.Storage;

namespace PulseLadder.Web.Api;

/// <summary>Distance estimates of a field as CSV or JSON files.</summary>
public static class ExportApi
{
    public static void Map(RouteGroupBuilder api) =>
        api.MapGet("/fields/{fieldId:long}/export", Export).WithName("ExportField");

    public static Results<FileContentHttpResult, ProblemHttpResult> Export(
        Database db, long fieldId, string? format, [Microsoft.AspNetCore.Mvc.FromQuery(Name = "accepted_only")] bool? acceptedOnly)
    {
        format = (format ?? "csv").ToLowerInvariant();
        if (format is not ("csv" or "json"))
            return TypedResults.Problem(title: "Unknown format", detail: "format must be csv or json", statusCode: 400);
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        var rows = StarViews.FieldRows(c, fieldId).Where(r => acceptedOnly != true || r.State == ReviewStates.Accepted).ToList();
        string safe = SafeFileName(f.Name);
        if (format == "json")
            return TypedResults.File(Encoding.UTF8.GetBytes(Json.Serialize(rows)), "application/json", safe + "-distances.json");
        return TypedResults.File(Encoding.UTF8.GetBytes(ToCsv(rows)), "text/csv", safe + "-distances.csv");
    }

    /// <summary>Stable export columns; per-band columns follow the bands present, in name order.</summary>
    public static string ToCsv(IReadOnlyList<StarRowDto> rows)
    {
        var bands = rows.SelectMany(r => r.MeanMag.Keys).Distinct().OrderBy(b => b, StringComparer.Ordinal).ToList();
        var sb = new StringBuilder();
        var head = new List<string> { "star", "field", "state", "class", "period_days", "period_err_days", "fap" };
        head.AddRange(bands.Select(b => "mean_mag_" + b));
        head.AddRange(bands.Select(b => "amplitude_" + b));
        head.AddRange(["ebv", "distance_modulus", "distance_modulus_err", "distance_pc", "distance_pc_err", "relation_id", "ra_deg", "dec_deg", "flags"]);
        sb.AppendJoin(',', head).Append('\n');
        foreach (var r in rows)
        {
            var cells = new List<string> { Csv(r.Star), Csv(r.Field), r.State, r.Class ?? "", N(r.PeriodDays), N(r.PeriodErrDays), N(r.Fap) };
            cells.AddRange(bands.Select(b => N(r.MeanMag.TryGetValue(b, out var v) ? v : null)));
            cells.AddRange(bands.Select(b => N(r.Amplitude.TryGetValue(b, out var v) ? v : null)));
            cells.AddRange([N(r.Ebv), N(r.DistanceModulus), N(r.DistanceModulusErr), N(r.DistancePc), N(r.DistancePcErr), Csv(r.RelationId ?? ""),
                N(r.RaDeg), N(r.DecDeg), Csv(string.Join(';', r.Flags))]);
            sb.AppendJoin(',', cells).Append('\n');
        }
        return sb.ToString();
    }

    private static string N(double? v) => v is { } x ? x.ToString("R", CultureInfo.InvariantCulture) : "";

    private static string Csv(string s) =>
        s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"") + "\"" : s;

    /// <summary>Letters, digits, '-', '_' and '.' only, so a field name can never steer a download path.</summary>
    public static string SafeFileName(string name)
    {
        var sb = new StringBuilder();
        foreach (char ch in name) sb.Append(char.IsAsciiLetterOrDigit(ch) || ch is '-' or '_' or '.' ? ch : '_');
        var s = sb.ToString().Trim('.');
        return s.Length == 0 ? "field" : s[..Math.Min(s.Length, 80)];
    }
}
