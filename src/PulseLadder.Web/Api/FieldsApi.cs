using Microsoft.AspNetCore.Http.HttpResults;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

public sealed record FieldSummaryBrief(double? Mu, double? MuErr, double? DistancePc, double? DistancePcErr, long NUsed);

public sealed record FieldDto(long FieldId, string Name, string? CalibrationId, long Stars, long Analysed, long Accepted, long Rejected, long Awaiting, FieldSummaryBrief? Summary);

public sealed record StarPage(int Total, int Page, int PageSize, IReadOnlyList<StarRowDto> Items);

public sealed record ProgressDto(long StarsTotal, long StarsDone, long StarsPending);

/// <summary>Fields, their stars and distance summaries.</summary>
public static class FieldsApi
{
    public static void Map(RouteGroupBuilder api)
    {
        api.MapGet("/fields", List).RequireAuthorization(Policies.Observer).WithName("ListFields");
        api.MapGet("/fields/{fieldId:long}/stars", Stars).RequireAuthorization(Policies.Observer).WithName("ListFieldStars");
        api.MapGet("/fields/{fieldId:long}/summary", Summary).RequireAuthorization(Policies.Observer).WithName("GetFieldSummary");
        api.MapGet("/progress", Progress).RequireAuthorization(Policies.Observer).WithName("GetProgress");
        api.MapPut("/fields/{fieldId:long}/settings", SetSettings).RequireAuthorization(Policies.Admin).WithName("SetFieldSettings");
        api.MapGet("/calibrations", Calibrations).RequireAuthorization(Policies.Observer).WithName("ListCalibrations");
    }

    public static Ok<List<FieldDto>> List(Database db)
    {
        using var c = db.Open();
        var counts = FieldStore.Counts(c, PipelineVersion.Current).ToDictionary(x => x.FieldId);
        var list = FieldStore.List(c).Select(f =>
        {
            var n = counts.GetValueOrDefault(f.Id) ?? new FieldCounts();
            var s = FieldSummaryStore.Get(c, f.Id);
            FieldSummaryBrief? brief = s is null ? null : new FieldSummaryBrief(s.Mu, s.MuErr,
                s.Mu is { } mu ? Core.Quantities.DistanceModulus.FromMagnitudes(mu).ToParsecs() : null,
                s.Mu is { } mu2 && s.MuErr is { } e ? Core.Quantities.DistanceModulus.FromMagnitudes(mu2).ParsecErrorFor(e) : null,
                s.NUsed);
            return new FieldDto(f.Id, f.Name, f.CalibrationId, n.Stars, n.Analysed, n.Accepted, n.Rejected, n.Awaiting, brief);
        }).ToList();
        return TypedResults.Ok(list);
    }

    public static Results<Ok<StarPage>, ProblemHttpResult> Stars(
        Database db, long fieldId, string? state, string? @class, string? q, int? page, [Microsoft.AspNetCore.Mvc.FromQuery(Name = "page_size")] int? pageSize)
    {
        using var c = db.Open();
        if (FieldStore.Get(c, fieldId) is null) return NotFound($"No field with id {fieldId}.");
        IEnumerable<StarRowDto> rows = StarViews.FieldRows(c, fieldId);
        if (!string.IsNullOrEmpty(state)) rows = rows.Where(r => r.State == state);
        if (!string.IsNullOrEmpty(@class)) rows = rows.Where(r => r.Class == @class);
        if (!string.IsNullOrEmpty(q)) rows = rows.Where(r => r.Star.Contains(q, StringComparison.OrdinalIgnoreCase));
        var all = rows.ToList();
        int size = Math.Clamp(pageSize ?? 500, 1, 5000), p = Math.Max(1, page ?? 1);
        return TypedResults.Ok(new StarPage(all.Count, p, size, all.Skip((p - 1) * size).Take(size).ToList()));
    }

    public static Results<Ok<FieldSummaryView>, ProblemHttpResult> Summary(Database db, long fieldId)
    {
        using var c = db.Open();
        var f = FieldStore.Get(c, fieldId);
        if (f is null) return NotFound($"No field with id {fieldId}.");
        var s = FieldSummaryStore.Get(c, fieldId);
        if (s is null) return NotFound($"Field '{f.Name}' has no accepted star with a distance yet.");
        return TypedResults.Ok(new FieldSummaryView(f.Id, f.Name, s.NUsed, s.Mu, s.MuErr, s.ComputedAt,
            System.Text.Json.JsonDocument.Parse(s.ResultJson).RootElement));
    }

    public static Ok<ProgressDto> Progress(Database db)
    {
        using var c = db.Open();
        long total = StarStore.CountWithObservations(c);
        long pending = StarStore.Pending(c, PipelineVersion.Current).Count;
        return TypedResults.Ok(new ProgressDto(total, total - pending, pending));
    }

    public static Results<Ok<FieldDto>, ProblemHttpResult, ValidationProblem> SetSettings(
        Database db, PulseLadder.Jobs.IAnalysisQueue queue, TimeProvider clock, System.Security.Claims.ClaimsPrincipal user, Core.Calibration.CalibrationRegistry registry, long fieldId, FieldSettingsRequest body)
    {
        var errors = new Dictionary<string, string[]>();
        if (body.CalibrationId is { } id && !registry.TryGet(id, out _))
            errors["calibration_id"] = [$"unknown relation '{id}'; GET /api/v1/calibrations lists them"];
        if (body.DefaultEbv is { } e && (!double.IsFinite(e) || e < 0 || e > 10)) errors["default_ebv"] = ["must be between 0 and 10 mag"];
        if (errors.Count > 0) return TypedResults.ValidationProblem(errors);
        string now = clock.GetUtcNow().ToString("O");
        using var c = db.Open();
        HashSet<long> fieldStars;
        using (var tx = c.BeginTransaction())
        {
            var f = FieldStore.Get(c, fieldId, tx);
            if (f is null) return NotFound($"No field with id {fieldId}.");
            FieldStore.SetSettings(c, tx, fieldId, body.CalibrationId, body.DefaultEbv);
            // New settings make every result of the field stale: each star gets a new revision.
            fieldStars = StarStore.ListByField(c, fieldId, tx).Select(s => s.Id).ToHashSet();
            StarStore.BumpRevision(c, tx, fieldStars);
            AuditStore.Append(c, tx, now, user.Identity!.Name!, "field:settings", $"field {f.Name}",
                $"calibration {f.CalibrationId ?? "-"} -> {body.CalibrationId ?? "-"}; default_ebv {f.DefaultEbv?.ToString("R", System.Globalization.CultureInfo.InvariantCulture) ?? "-"} -> {body.DefaultEbv?.ToString("R", System.Globalization.CultureInfo.InvariantCulture) ?? "-"}");
            tx.Commit();
        }
        // The field's stars in batches (PulseLadder:Jobs:BatchSize), as an upload queues them: a field of thousands of
        // stars must not cost thousands of queue round trips. Other fields' pending stars are already queued.
        queue.EnqueueStars(StarStore.Pending(c, PipelineVersion.Current).Where(p => fieldStars.Contains(p.StarId)).ToList());
        queue.EnqueueFieldSummary(fieldId);
        return TypedResults.Ok(List(db).Value!.Single(x => x.FieldId == fieldId));
    }

    /// <summary>Every relation of this process's registry (embedded, then administrator files), with its source and origin.</summary>
    public static Ok<List<CalibrationDto>> Calibrations(Core.Calibration.CalibrationRegistry registry, HttpResponse response)
    {
        // The registry hash lets a client check that the web host and the workers use the same coefficients.
        response.Headers["X-Calibration-Registry"] = registry.Hash;
        return TypedResults.Ok(registry.Relations.Select(r => new CalibrationDto(
            r.Id, r.Classes.Select(PulsatorClassesCode).ToList(), r.BandLabel, r.Source, r.Table, r.Tag, r.Notes,
            Math.Pow(10, r.LogPMin), Math.Pow(10, r.LogPMax), r.UserSupplied, r.UserFile)).ToList());
    }

    private static string PulsatorClassesCode(Core.Photometry.PulsatorClass c) => Core.Photometry.PulsatorClasses.ToCode(c);

    internal static ProblemHttpResult NotFound(string detail) =>
        TypedResults.Problem(title: "Not found", detail: detail, statusCode: 404);
}

public sealed record FieldSettingsRequest(string? CalibrationId, double? DefaultEbv);

/// <param name="UserSupplied">True for a relation from an administrator file (<paramref name="File"/>), false for the embedded defaults.</param>
public sealed record CalibrationDto(string Id, IReadOnlyList<string> Classes, string Band, string Source, string Table, string Tag, string Notes, double PeriodMinDays, double PeriodMaxDays,
    bool UserSupplied, string? File);

public sealed record FieldSummaryView(long FieldId, string Field, long NUsed, double? Mu, double? MuErr, string ComputedAt, System.Text.Json.JsonElement Detail);

