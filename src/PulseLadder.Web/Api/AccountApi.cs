using System.Globalization;
using System.Security.Claims;
using Microsoft.AspNetCore.Antiforgery;
using Microsoft.AspNetCore.Authentication;
using Microsoft.AspNetCore.Authentication.Cookies;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.Extensions.Options;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

public sealed record SignInRequest(string? Name, string? Password);

public sealed record MeDto(string Name, string Role, string AuthMethod, bool SingleUser);

public sealed record AntiforgeryDto(string Token, string HeaderName);

public sealed record TokenDto(long Id, string Name, string Prefix, string CreatedAt, string? LastUsedAt, string? RevokedAt);

public sealed record NewTokenRequest(string? Name);

/// <summary>The token itself appears in this answer only; the server keeps its SHA-256.</summary>
public sealed record NewTokenDto(long Id, string Name, string Prefix, string CreatedAt, string Token);

/// <summary>Signing in and out, who am I, the antiforgery token, and one's own API tokens.</summary>
public static class AccountApi
{
    public static void Map(RouteGroupBuilder api)
    {
        api.MapPost("/session", SignIn).AllowAnonymous().RequireRateLimiting(AuthSetup.SignInRateLimit).WithName("SignIn");
        api.MapDelete("/session", SignOut).RequireAuthorization(Policies.Observer).WithName("SignOut");
        api.MapGet("/me", Me).RequireAuthorization(Policies.Observer).WithName("GetMe");
        api.MapGet("/antiforgery", Antiforgery).RequireAuthorization(Policies.Observer).WithName("GetAntiforgeryToken");
        api.MapGet("/tokens", ListTokens).RequireAuthorization(Policies.Observer).WithName("ListOwnTokens");
        api.MapPost("/tokens", CreateToken).RequireAuthorization(Policies.Observer).WithName("CreateOwnToken");
        api.MapDelete("/tokens/{tokenId:long}", RevokeToken).RequireAuthorization(Policies.Observer).WithName("RevokeOwnToken");
    }

    /// <summary>Checks name and password and sets the session cookie; failures are audited and all look the same.</summary>
    public static async Task<Results<Ok<MeDto>, ProblemHttpResult, ValidationProblem>> SignIn(
        HttpContext ctx, Database db, TimeProvider clock, IOptions<PulseLadderOptions> options, SignInRequest body)
    {
        if (string.IsNullOrEmpty(body.Name) || string.IsNullOrEmpty(body.Password))
            return TypedResults.ValidationProblem(new Dictionary<string, string[]> { ["name"] = ["name and password are required"] });
        string now = clock.GetUtcNow().ToString("O");
        string name = body.Name.Length > 64 ? body.Name[..64] : body.Name;
        string password = body.Password.Length > Accounts.MaxPasswordLength ? body.Password[..Accounts.MaxPasswordLength] : body.Password;
        await using var c = await db.OpenAsync(ctx.RequestAborted);
        var user = AccountStore.GetUser(c, name);
        bool ok;
        string? rehash = null;
        if (user is null) { Accounts.VerifyNothing(password); ok = false; }
        else ok = Accounts.VerifyPassword(user.PasswordHash, password, out rehash) && !user.Disabled;
        string from = ctx.Connection.RemoteIpAddress?.ToString() ?? "unknown address";
        if (!ok || user is null)
        {
            string why = user is null ? "unknown name" : user.Disabled ? "account disabled" : user.PasswordHash is null ? "token-only account" : "wrong password";
            AuditStore.Append(c, null, now, name, "signin:failed", $"user {name}", $"{why}; from {from}");
            return TypedResults.Problem(title: "Sign-in failed", detail: "Wrong name or password.", statusCode: 401);
        }
        if (rehash is not null) AccountStore.RehashPassword(c, user.Id, rehash);
        AuditStore.Append(c, null, now, user.Name, "signin", $"user {user.Name}", $"from {from}");
        await ctx.SignInAsync(CookieAuthenticationDefaults.AuthenticationScheme, AuthSetup.CookiePrincipal(user));
        return TypedResults.Ok(new MeDto(user.Name, user.Role, PlxClaims.ViaCookie, options.Value.Auth.SingleUser));
    }

    public static async Task<NoContent> SignOut(HttpContext ctx, Database db, TimeProvider clock)
    {
        if (ctx.User.FindFirstValue(PlxClaims.AuthMethod) == PlxClaims.ViaCookie)
        {
            string name = ctx.User.Identity!.Name!;
            await using (var c = await db.OpenAsync(ctx.RequestAborted))
                AuditStore.Append(c, null, clock.GetUtcNow().ToString("O"), name, "signout", $"user {name}", "");
        }
        await ctx.SignOutAsync(CookieAuthenticationDefaults.AuthenticationScheme);
        return TypedResults.NoContent();
    }

    public static Ok<MeDto> Me(ClaimsPrincipal user, IOptions<PulseLadderOptions> options) =>
        TypedResults.Ok(new MeDto(user.Identity!.Name!, user.FindFirstValue(ClaimTypes.Role) ?? "",
            user.FindFirstValue(PlxClaims.AuthMethod) ?? "", options.Value.Auth.SingleUser));

    /// <summary>The request token for header X-CSRF-TOKEN (the matching cookie is set on this answer).</summary>
    public static Ok<AntiforgeryDto> Antiforgery(HttpContext ctx, IAntiforgery antiforgery)
    {
        var set = antiforgery.GetAndStoreTokens(ctx);
        return TypedResults.Ok(new AntiforgeryDto(set.RequestToken!, set.HeaderName!));
    }

    public static Results<Ok<List<TokenDto>>, ProblemHttpResult> ListTokens(ClaimsPrincipal user, Database db)
    {
        using var c = db.Open();
        if (Account(c, user) is not { } me) return NoAccount();
        return TypedResults.Ok(AccountStore.TokensOf(c, me.Id).Select(ToDto).ToList());
    }

    public static Results<Created<NewTokenDto>, ProblemHttpResult, ValidationProblem> CreateToken(
        ClaimsPrincipal user, Database db, TimeProvider clock, NewTokenRequest body)
    {
        if (Accounts.CheckLabel(body.Name) is { } error)
            return TypedResults.ValidationProblem(new Dictionary<string, string[]> { ["name"] = [error] });
        UserRow? me;
        using (var c = db.Open()) me = Account(c, user);
        if (me is null) return NoAccount();
        var (id, token, prefix, at) = Accounts.CreateToken(db, me.Name, me, body.Name!.Trim(), clock);
        return TypedResults.Created($"/api/v1/tokens/{id}", new NewTokenDto(id, body.Name.Trim(), prefix, at, token));
    }

    public static Results<NoContent, ProblemHttpResult> RevokeToken(ClaimsPrincipal user, Database db, TimeProvider clock, long tokenId)
    {
        using var c = db.Open();
        if (Account(c, user) is not { } me) return NoAccount();
        return Revoke(c, me.Name, me, tokenId, clock);
    }

    internal static Results<NoContent, ProblemHttpResult> Revoke(System.Data.Common.DbConnection c, string actor, UserRow owner, long tokenId, TimeProvider clock)
    {
        string now = clock.GetUtcNow().ToString("O");
        using var tx = c.BeginTransaction();
        if (!AccountStore.RevokeToken(c, tx, owner.Id, tokenId, now))
            return FieldsApi.NotFound($"Account '{owner.Name}' has no live token {tokenId}.");
        AuditStore.Append(c, tx, now, actor, "token:revoke", $"user {owner.Name}", $"token {tokenId}");
        tx.Commit();
        return TypedResults.NoContent();
    }

    internal static TokenDto ToDto(ApiTokenRow t) => new(t.Id, t.Name, t.Prefix, t.CreatedAt, t.LastUsedAt, t.RevokedAt);

    /// <summary>The stored account of the caller (none in single-user mode).</summary>
    private static UserRow? Account(System.Data.Common.DbConnection c, ClaimsPrincipal user) =>
        user.FindFirstValue(PlxClaims.AuthMethod) == PlxClaims.ViaSingleUser || user.Identity?.Name is not { } name ? null : AccountStore.GetUser(c, name);

    private static ProblemHttpResult NoAccount() =>
        TypedResults.Problem(title: "No account", statusCode: 409,
            detail: "Single-user mode has no stored accounts, so no tokens: create accounts with `pulseladder user add` and serve without single-user mode.");

}
