using PulseLadder.Core.Photometry;
using Microsoft.AspNetCore.Http.HttpResults;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.TimeScales;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

public sealed record ObservationDto(long Id, double Bjd, double TimeAsGiven, string TimeScale, string Band, double Mag, double MagErr, string Observer, bool Used);

public sealed record AnalysisInfo(long Revision, string PipelineVersion, string CreatedAt, string Outcome, string InputHash, bool Current);

public sealed record StarDetailDto(
    StarRowDto Star, string? DeclaredClass, double? Feh, IReadOnlyList<ObservationDto> Observations,
    StarAnalysis? Result, AnalysisInfo? Analysis, IReadOnlyList<DecisionRow> Decisions);

/// <summary>One star with everything a reviewer needs to check it.</summary>
public static class StarsApi
{
    public static void Map(RouteGroupBuilder api)
    {
        api.MapGet("/stars/{starId:long}", Get).RequireAuthorization(Policies.Observer).WithName("GetStar");
        api.MapGet("/stars/by-name/{name}", GetByName).RequireAuthorization(Policies.Observer).WithName("GetStarByName");
    }

    public static Results<Ok<StarDetailDto>, ProblemHttpResult> Get(Database db, long starId)
    {
        using var c = db.Open();
        var s = StarStore.Get(c, starId);
        if (s is null) return FieldsApi.NotFound($"No star with id {starId}.");
        return TypedResults.Ok(Detail(c, s));
    }

    public static Results<Ok<StarDetailDto>, ProblemHttpResult> GetByName(Database db, string name)
    {
        using var c = db.Open();
        var s = StarStore.GetByName(c, name);
        if (s is null) return FieldsApi.NotFound($"No star named '{name}'.");
        return TypedResults.Ok(Detail(c, s));
    }

    private static StarDetailDto Detail(System.Data.Common.DbConnection c, StarRow s)
    {
        var a = AnalysisStore.Latest(c, s.Id, PipelineVersion.Current);
        var result = a is null ? null : Json.Deserialize<StarAnalysis>(a.ResultJson);
        var obs = ObservationStore.ForStar(c, s.Id);
        var info = StarStore.ToStarInfo(s);
        // Times are stored as uploaded; the page folds on BJD_TDB, computed here by the same Core conversion the pipeline uses.
        var timed = BarycentricTime.ToBjdTdb(obs, info.Position);
        var bjd = timed.Points.ToDictionary(p => p.ObservationId, p => p.Bjd);
        var rejected = result?.Rejections.Select(r => r.ObservationId).ToHashSet() ?? [];
        var dtos = obs.Select(o => new ObservationDto(o.Id, bjd.GetValueOrDefault(o.Id, o.Scale.ToFullJulianDay(o.Time)), o.Time,
            o.Scale.ToCode(), o.Band, o.Mag, o.MagErr, o.Observer, bjd.ContainsKey(o.Id) && !rejected.Contains(o.Id))).ToList();
        return new StarDetailDto(
            StarViews.Row(s, a), s.DeclaredClass, s.Feh, dtos, result,
            a is null ? null : new AnalysisInfo(a.Revision, a.PipelineVersion, a.CreatedAt, a.Outcome, a.InputHash, a.Revision == s.Revision),
            ReviewStore.ForStar(c, s.Id));
    }
}
