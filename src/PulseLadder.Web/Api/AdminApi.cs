using System.Security.Claims;
using Microsoft.AspNetCore.Http.HttpResults;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

public sealed record UserDto(string Name, string Role, string CreatedAt, bool Disabled, string? DisabledAt, bool HasPassword);

public sealed record NewUserRequest(string? Name, string? Role, string? Password);

/// <summary>Any subset of role, disabled and password; omitted properties stay as they are.</summary>
public sealed record UpdateUserRequest(string? Role, bool? Disabled, string? Password);

public sealed record AuditEntryDto(long Id, string At, string Actor, string Action, string Subject, string Detail);

public sealed record AuditPage(IReadOnlyList<AuditEntryDto> Items, long? NextBefore);

/// <summary>Accounts, other people's tokens and the audit log: admins only.</summary>
public static class AdminApi
{
    public static void Map(RouteGroupBuilder api)
    {
        var admin = api.MapGroup("").RequireAuthorization(Policies.Admin);
        admin.MapGet("/users", List).WithName("ListUsers");
        admin.MapPost("/users", Create).WithName("CreateUser");
        admin.MapPut("/users/{name}", Update).WithName("UpdateUser");
        admin.MapGet("/users/{name}/tokens", Tokens).WithName("ListUserTokens");
        admin.MapDelete("/users/{name}/tokens/{tokenId:long}", RevokeToken).WithName("RevokeUserToken");
        admin.MapGet("/audit", Audit).WithName("ListAudit");
    }

    public static Ok<List<UserDto>> List(Database db)
    {
        using var c = db.Open();
        return TypedResults.Ok(AccountStore.ListUsers(c).Select(ToDto).ToList());
    }

    public static Results<Created<UserDto>, ProblemHttpResult, ValidationProblem> Create(
        ClaimsPrincipal admin, Database db, TimeProvider clock, NewUserRequest body)
    {
        var errors = new Dictionary<string, string[]>();
        if (Accounts.CheckName(body.Name) is { } ne) errors["name"] = [ne];
        if (!Roles.IsKnown(body.Role)) errors["role"] = [$"must be one of {string.Join(", ", Roles.All)}"];
        // No password: a token-only account (pipelines); it can never sign in on the pages.
        if (body.Password is not null && Accounts.CheckPassword(body.Password) is { } pe) errors["password"] = [pe];
        if (errors.Count > 0) return TypedResults.ValidationProblem(errors);
        using (var c = db.Open())
            if (AccountStore.GetUser(c, body.Name!) is not null)
                return TypedResults.Problem(title: "Name taken", detail: $"An account named '{body.Name}' exists already.", statusCode: 409);
        Accounts.CreateUser(db, admin.Identity!.Name!, body.Name!, body.Role!, body.Password, clock);
        using var c2 = db.Open();
        return TypedResults.Created($"/api/v1/users/{body.Name}", ToDto(AccountStore.GetUser(c2, body.Name!)!));
    }

    public static Results<Ok<UserDto>, ProblemHttpResult, ValidationProblem> Update(
        ClaimsPrincipal admin, Database db, TimeProvider clock, string name, UpdateUserRequest body)
    {
        var errors = new Dictionary<string, string[]>();
        if (body.Role is not null && !Roles.IsKnown(body.Role)) errors["role"] = [$"must be one of {string.Join(", ", Roles.All)}"];
        if (body.Password is not null && Accounts.CheckPassword(body.Password) is { } pe) errors["password"] = [pe];
        if (errors.Count > 0) return TypedResults.ValidationProblem(errors);
        string now = clock.GetUtcNow().ToString("O");
        string actor = admin.Identity!.Name!;
        using var c = db.Open();
        using var tx = c.BeginTransaction();
        var user = AccountStore.GetUser(c, name, tx);
        if (user is null) return FieldsApi.NotFound($"No account named '{name}'.");
        bool losesAdmin = user.Role == Roles.Admin && !user.Disabled && ((body.Role is { } r && r != Roles.Admin) || body.Disabled == true);
        if (losesAdmin && AccountStore.CountActiveAdmins(c, tx) <= 1)
            return TypedResults.Problem(title: "Last admin", statusCode: 409,
                detail: $"'{name}' is the only active admin; make another account admin first.");
        var changes = new List<string>();
        if (body.Role is { } role && role != user.Role)
        {
            AccountStore.SetRole(c, tx, user.Id, role, Accounts.NewStamp());
            changes.Add($"role {user.Role} -> {role}");
        }
        if (body.Disabled is { } disabled && disabled != user.Disabled)
        {
            AccountStore.SetDisabled(c, tx, user.Id, disabled ? now : null, Accounts.NewStamp());
            changes.Add(disabled ? "disabled" : "enabled");
        }
        if (body.Password is { } password)
        {
            AccountStore.SetPassword(c, tx, user.Id, Accounts.HashPassword(password), Accounts.NewStamp());
            changes.Add("password reset");
        }
        if (changes.Count > 0) AuditStore.Append(c, tx, now, actor, "user:update", $"user {name}", string.Join("; ", changes));
        tx.Commit();
        return TypedResults.Ok(ToDto(AccountStore.GetUser(c, name)!));
    }

    public static Results<Ok<List<TokenDto>>, ProblemHttpResult> Tokens(Database db, string name)
    {
        using var c = db.Open();
        var user = AccountStore.GetUser(c, name);
        if (user is null) return FieldsApi.NotFound($"No account named '{name}'.");
        return TypedResults.Ok(AccountStore.TokensOf(c, user.Id).Select(AccountApi.ToDto).ToList());
    }

    public static Results<NoContent, ProblemHttpResult> RevokeToken(ClaimsPrincipal admin, Database db, TimeProvider clock, string name, long tokenId)
    {
        using var c = db.Open();
        var user = AccountStore.GetUser(c, name);
        if (user is null) return FieldsApi.NotFound($"No account named '{name}'.");
        return AccountApi.Revoke(c, admin.Identity!.Name!, user, tokenId, clock);
    }

    /// <summary>Newest first, <c>limit</c> (1..500, default 100) entries older than id <c>before</c>; <c>action</c> filters by prefix.</summary>
    public static Ok<AuditPage> Audit(Database db, long? before, int? limit, string? action)
    {
        int n = Math.Clamp(limit ?? 100, 1, 500);
        using var c = db.Open();
        var rows = AuditStore.Page(c, before, n, string.IsNullOrEmpty(action) ? null : action);
        var items = rows.Select(r => new AuditEntryDto(r.Id, r.At, r.Actor, r.Action, r.Subject, r.Detail)).ToList();
        return TypedResults.Ok(new AuditPage(items, items.Count == n ? items[^1].Id : null));
    }

    private static UserDto ToDto(UserRow u) => new(u.Name, u.Role, u.CreatedAt, u.Disabled, u.DisabledAt, u.PasswordHash is not null);
}
