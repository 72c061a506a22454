using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.Mvc;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Jobs;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

/// <summary>A reviewer's decision about a star.</summary>
public sealed record DecisionRequest(string Action, double? PeriodDays, string? Class, string? Note);

public sealed record DecisionResponse(long DecisionId, string State, bool Queued);

/// <summary>Review decisions and the review queue.</summary>
public static class ReviewApi
{
    private static readonly string[] Actions = ["accept", "reject", "choose_period", "set_class", "note", "reopen"];

    public static void Map(RouteGroupBuilder api)
    {
        api.MapPost("/stars/{starId:long}/decisions", Decide).RequireAuthorization(Policies.Reviewer).WithName("PostDecision");
        api.MapGet("/review/next", Next).RequireAuthorization(Policies.Observer).WithName("NextForReview");
    }

    public static Results<Created<DecisionResponse>, ProblemHttpResult, ValidationProblem> Decide(
        Database db, IAnalysisQueue queue, TimeProvider clock, System.Security.Claims.ClaimsPrincipal user, long starId, DecisionRequest body)
    {
        var errors = new Dictionary<string, string[]>();
        if (!Actions.Contains(body.Action)) errors["action"] = [$"must be one of {string.Join(", ", Actions)}"];
        if (body.Action == "choose_period" && body.PeriodDays is not (> 0.01 and < 10000))
            errors["period_days"] = ["choose_period needs period_days between 0.01 and 10000"];
        PulsatorClass cls = PulsatorClass.Unknown;
        if (body.Action == "set_class" && !PulsatorClasses.TryParse(body.Class, out cls))
            errors["class"] = [$"set_class needs class, one of {string.Join(", ", PulsatorClasses.AllCodes)}"];
        if (body.Note is { Length: > 4000 }) errors["note"] = ["at most 4000 characters"];
        if (errors.Count > 0) return TypedResults.ValidationProblem(errors);

        string now = clock.GetUtcNow().ToString("O");
        // The signed-in account, never a body field: the audit trail must name who really decided.
        string by = user.Identity!.Name!;
        using var c = db.Open();
        using var tx = c.BeginTransaction();
        var s = StarStore.Get(c, starId, tx);
        if (s is null) return FieldsApi.NotFound($"No star with id {starId}.");
        var a = AnalysisStore.Latest(c, starId, PipelineVersion.Current, tx);

        string state = s.ReviewState;
        double? period = s.ChosenPeriodDays;
        string? chosenClass = s.ChosenClass;
        bool rerun = false;
        switch (body.Action)
        {
            case "accept": state = ReviewStates.Accepted; break;
            case "reject": state = ReviewStates.Rejected; break;
            case "reopen": state = ReviewStates.Awaiting; break;
            // A reviewer who picks a period has checked the fold by eye: the star counts as accepted at that period.
            case "choose_period": period = body.PeriodDays; state = ReviewStates.Accepted; rerun = true; break;
            case "set_class": chosenClass = cls.ToCode(); rerun = true; break;
        }
        long id = ReviewStore.Insert(c, tx, new DecisionRow
        {
            StarId = starId, AnalysisId = a?.Id, Action = body.Action, PeriodDays = body.Action == "choose_period" ? body.PeriodDays : null,
            Class = body.Action == "set_class" ? cls.ToCode() : null, Note = body.Note, DecidedBy = by, DecidedAt = now,
        });
        StarStore.SetReview(c, tx, starId, state, period, chosenClass, rerun);
        AuditStore.Append(c, tx, now, by, "review:" + body.Action, $"star {s.Name}",
            $"state {s.ReviewState} -> {state}; period {body.PeriodDays?.ToString("R", System.Globalization.CultureInfo.InvariantCulture) ?? "-"}; class {body.Class ?? "-"}; note {body.Note ?? "-"}");
        tx.Commit();

        if (rerun) queue.EnqueueStar(starId, s.Revision + 1);
        // The field summary covers accepted stars only; any change of state or result can move it.
        if (state != s.ReviewState || rerun) queue.EnqueueFieldSummary(s.FieldId);
        return TypedResults.Created($"/api/v1/stars/{starId}", new DecisionResponse(id, state, rerun));
    }

    /// <summary>The next star awaiting a person: flagged ones first, then by field and name; after <paramref name="after"/> if given.</summary>
    public static Results<Ok<StarRowDto>, NoContent> Next(Database db, long? after)
    {
        using var c = db.Open();
        var rows = FieldStore.List(c).SelectMany(f => StarViews.FieldRows(c, f.FieldIdOrId()))
            .Where(r => r.State == ReviewStates.Awaiting && !r.Pending)
            .OrderBy(r => r.Flags.Count == 0 ? 1 : 0).ThenBy(r => r.Field, StringComparer.Ordinal).ThenBy(r => r.Star, StringComparer.Ordinal)
            .ToList();
        if (after is { } a)
        {
            int i = rows.FindIndex(r => r.StarId == a);
            if (i >= 0) rows = rows.Skip(i + 1).Concat(rows.Take(i)).ToList();
        }
        var next = rows.FirstOrDefault(r => r.StarId != after);
        return next is null ? TypedResults.NoContent() : TypedResults.Ok(next);
    }

    private static long FieldIdOrId(this FieldRow f) => f.Id;
}
