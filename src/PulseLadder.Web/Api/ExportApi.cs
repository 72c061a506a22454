using System.Text;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;
using PulseLadder.Web.Export;

namespace PulseLadder.Web.Api;

/// <summary>Distance estimates of a field or of the whole campaign as CSV, JSON or VOTable, and the methods text.</summary>
public static class ExportApi
{
    public static void Map(RouteGroupBuilder api)
    {
        api.MapGet("/fields/{fieldId:long}/export", Export).RequireAuthorization(Policies.Reviewer).WithRequestTimeout(AuthSetup.LongRequest).WithName("ExportField");
        api.MapGet("/export", ExportCampaign).RequireAuthorization(Policies.Reviewer).WithRequestTimeout(AuthSetup.LongRequest).WithName("ExportCampaign");
        api.MapGet("/fields/{fieldId:long}/methods", Methods).RequireAuthorization(Policies.Reviewer).WithName("GetFieldMethods");
        api.MapGet("/fields/{fieldId:long}/figures/pl.svg", PlFigure).RequireAuthorization(Policies.Reviewer).WithName("GetFieldPlFigure");
        api.MapGet("/stars/{starId:long}/figures/lightcurve.svg", LightCurveFigure).RequireAuthorization(Policies.Reviewer).WithName("GetStarLightCurveFigure");
    }

    /// <summary>One field's rows; <c>columns</c> is a comma-separated subset of the known columns (400 naming the first unknown one).</summary>
    public static Results<FileContentHttpResult, ProblemHttpResult> Export(
        Database db, long fieldId, string? format, [FromQuery(Name = "accepted_only")] bool? acceptedOnly, string? columns)
    {
        if (ParseFormat(format) is not { } fmt) return BadFormat();
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        return Write(ExportSet.Load(c, [fieldId], acceptedOnly == true), fmt, f.Name, acceptedOnly == true, columns);
    }

    /// <summary>Every field's rows in one table (field order by id).</summary>
    public static Results<FileContentHttpResult, ProblemHttpResult> ExportCampaign(
        Database db, string? format, [FromQuery(Name = "accepted_only")] bool? acceptedOnly, string? columns)
    {
        if (ParseFormat(format) is not { } fmt) return BadFormat();
        using var c = db.Open();
        var ids = FieldStore.List(c).Select(f => f.Id).Order().ToList();
        return Write(ExportSet.Load(c, ids, acceptedOnly == true), fmt, "campaign", acceptedOnly == true, columns);
    }

    /// <summary>
    /// The methods paragraph (text/plain) for a field's stored results; accepted stars only unless
    /// <c>accepted_only=false</c> (a paper describes the accepted sample).
    /// </summary>
    public static Results<ContentHttpResult, ProblemHttpResult> Methods(Database db, long fieldId, [FromQuery(Name = "accepted_only")] bool? acceptedOnly)
    {
        using var c = db.Open();
        if (FieldStore.Get(c, fieldId) is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        var set = ExportSet.Load(c, [fieldId], acceptedOnly ?? true);
        return TypedResults.Text(set.Methods() + "\n", "text/plain; charset=utf-8");
    }

    /// <summary>The period-luminosity diagram (SVG) of a field's stored results; accepted stars only unless <c>accepted_only=false</c>.</summary>
    public static Results<ContentHttpResult, ProblemHttpResult> PlFigure(Database db, long fieldId, [FromQuery(Name = "accepted_only")] bool? acceptedOnly)
    {
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        var set = ExportSet.Load(c, [fieldId], acceptedOnly ?? true);
        return TypedResults.Text(Core.Reporting.PlDiagramSvg.Write(set.Analyses, f.Name), "image/svg+xml; charset=utf-8");
    }

    /// <summary>The phased light curve (SVG) of a star's newest stored analysis for the current pipeline version.</summary>
    public static Results<ContentHttpResult, ProblemHttpResult> LightCurveFigure(Database db, long starId)
    {
        using var c = db.Open();
        var s = StarStore.Get(c, starId);
        if (s is null) return FieldsApi.NotFound($"No star with id {starId}.");
        var a = AnalysisStore.Latest(c, starId, Core.Pipeline.PipelineVersion.Current);
        if (a is null || Json.Deserialize<Core.Pipeline.StarAnalysis>(a.ResultJson) is not { } result)
            return FieldsApi.NotFound($"Star '{s.Name}' has no stored analysis yet.");
        var points = Core.TimeScales.BarycentricTime.ToBjdTdb(ObservationStore.ForStar(c, starId), StarStore.ToStarInfo(s).Position).Points;
        return TypedResults.Text(Core.Reporting.LightCurveSvg.Write(result, points), "image/svg+xml; charset=utf-8");
    }

    private static Results<FileContentHttpResult, ProblemHttpResult> Write(ExportSet set, string fmt, string title, bool acceptedOnly, string? columns)
    {
        var (cols, error) = ExportColumns.Select(ExportColumns.Available(set.Rows), columns);
        if (cols is null) return TypedResults.Problem(title: "Unknown column", detail: error, statusCode: 400);
        string safe = SafeFileName(title);
        return fmt switch
        {
            "json" => TypedResults.File(ExportWriters.Json(set.Rows, cols, set.Metadata(title, acceptedOnly)), "application/json", safe + "-distances.json"),
            "votable" => TypedResults.File(ExportWriters.VoTable(set.Rows, cols, set.Metadata(title, acceptedOnly)), "application/x-votable+xml", safe + "-distances.vot"),
            _ => TypedResults.File(Encoding.UTF8.GetBytes(ExportWriters.Csv(set.Rows, cols)), "text/csv", safe + "-distances.csv"),
        };
    }

    private static string? ParseFormat(string? format) => (format ?? "csv").ToLowerInvariant() switch
    {
        "csv" => "csv",
        "json" => "json",
        "votable" or "vot" or "xml" => "votable",
        _ => null,
    };

    private static ProblemHttpResult BadFormat() =>
        TypedResults.Problem(title: "Unknown format", detail: "format must be csv, json or votable", statusCode: 400);

    /// <summary>Letters, digits, '-', '_' and '.' only, so a field name can never steer a download path.</summary>
    public static string SafeFileName(string name)
    {
        var sb = new StringBuilder();
        foreach (char ch in name) sb.Append(char.IsAsciiLetterOrDigit(ch) || ch is '-' or '_' or '.' ? ch : '_');
        var s = sb.ToString().Trim('.');
        return s.Length == 0 ? "field" : s[..Math.Min(s.Length, 80)];
    }
}
