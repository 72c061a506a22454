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
        api.MapGet("/fields/{fieldId:long}/audit", Audit).RequireAuthorization(Policies.Reviewer).WithName("GetFieldAudit");
        api.MapGet("/fields/{fieldId:long}/figures/pl.svg", PlFigure).RequireAuthorization(Policies.Reviewer).WithName("GetFieldPlFigure");
        api.MapGet("/stars/{starId:long}/figures/lightcurve.svg", LightCurveFigure).RequireAuthorization(Policies.Reviewer).WithName("GetStarLightCurveFigure");
        api.MapGet("/fields/{fieldId:long}/figures/pl.png", PlFigurePng).RequireAuthorization(Policies.Reviewer).WithName("GetFieldPlFigurePng");
        api.MapGet("/stars/{starId:long}/figures/lightcurve.png", LightCurveFigurePng).RequireAuthorization(Policies.Reviewer).WithName("GetStarLightCurveFigurePng");
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
    /// The audit entries exported with a field's results (uploads that touched its stars, review decisions, settings
    /// changes), oldest first: <c>format=csv</c> (default) or <c>json</c>. The JSON and VOTable exports carry the same
    /// entries inline.
    /// </summary>
    public static Results<FileContentHttpResult, ProblemHttpResult> Audit(Database db, long fieldId, string? format)
    {
        string fmt = (format ?? "csv").ToLowerInvariant();
        if (fmt is not ("csv" or "json")) return TypedResults.Problem(title: "Unknown format", detail: "format must be csv or json", statusCode: 400);
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        var audit = AuditStore.ForField(c, fieldId);
        return fmt == "json"
            ? TypedResults.File(System.Text.Json.JsonSerializer.SerializeToUtf8Bytes(audit, Json.Options), "application/json", SafeFileName(f.Name) + "-audit.json")
            : TypedResults.File(Encoding.UTF8.GetBytes(ExportWriters.AuditCsv(audit)), "text/csv", SafeFileName(f.Name) + "-audit.csv");
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
        var (model, problem) = LoadLightCurve(db, starId);
        if (model is null) return problem!;
        return TypedResults.Text(Core.Reporting.LightCurveSvg.Write(model), "image/svg+xml; charset=utf-8");
    }

    /// <summary>
    /// The period-luminosity diagram as PNG, the same content as the SVG; <c>width</c> and <c>height</c> in pixels
    /// (default 640 x 480, each 200..4000, else 400).
    /// </summary>
    public static Results<FileContentHttpResult, ProblemHttpResult> PlFigurePng(Database db, long fieldId,
        [FromQuery(Name = "accepted_only")] bool? acceptedOnly, int? width, int? height)
    {
        if (Size(width, FigurePng.DefaultWidth, "width") is { } we) return we;
        if (Size(height, FigurePng.DefaultPlHeight, "height") is { } he) return he;
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return FieldsApi.NotFound($"No field with id {fieldId}.");
        var set = ExportSet.Load(c, [fieldId], acceptedOnly ?? true);
        var png = FigurePng.PlDiagram(Core.Reporting.PlDiagram.Build(set.Analyses, f.Name), width ?? FigurePng.DefaultWidth, height ?? FigurePng.DefaultPlHeight);
        return TypedResults.File(png, "image/png", SafeFileName(f.Name) + "-pl.png");
    }

    /// <summary>
    /// The phased light curve as PNG, the same content as the SVG; <c>width</c> in pixels (default 640), <c>height</c>
    /// in pixels (default 260 per fitted band), each 200..4000, else 400.
    /// </summary>
    public static Results<FileContentHttpResult, ProblemHttpResult> LightCurveFigurePng(Database db, long starId, int? width, int? height)
    {
        if (Size(width, FigurePng.DefaultWidth, "width") is { } we) return we;
        if (Size(height, FigurePng.DefaultPanelHeight, "height") is { } he) return he;
        var (model, problem) = LoadLightCurve(db, starId);
        if (model is null) return problem!;
        int h = height ?? Math.Min(FigurePng.MaxSize, FigurePng.DefaultPanelHeight * Math.Max(1, model.Panels.Count));
        var png = FigurePng.LightCurve(model, width ?? FigurePng.DefaultWidth, h);
        return TypedResults.File(png, "image/png", SafeFileName(model.Star) + "-lightcurve.png");
    }

    private static ProblemHttpResult? Size(int? value, int fallback, string name) =>
        (value ?? fallback) is >= FigurePng.MinSize and <= FigurePng.MaxSize ? null
            : TypedResults.Problem(title: "Bad figure size", detail: $"{name} must be between {FigurePng.MinSize} and {FigurePng.MaxSize} pixels", statusCode: 400);

    private static (Core.Reporting.LightCurveModel? Model, ProblemHttpResult? Problem) LoadLightCurve(Database db, long starId)
    {
        using var c = db.Open();
        var s = StarStore.Get(c, starId);
        if (s is null) return (null, FieldsApi.NotFound($"No star with id {starId}."));
        var a = AnalysisStore.Latest(c, starId, Core.Pipeline.PipelineVersion.Current);
        if (a is null || Json.Deserialize<Core.Pipeline.StarAnalysis>(a.ResultJson) is not { } result)
            return (null, FieldsApi.NotFound($"Star '{s.Name}' has no stored analysis yet."));
        var points = Core.TimeScales.BarycentricTime.ToBjdTdb(ObservationStore.ForStar(c, starId), StarStore.ToStarInfo(s).Position).Points;
        return (Core.Reporting.LightCurveFigure.Build(result, points), null);
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
