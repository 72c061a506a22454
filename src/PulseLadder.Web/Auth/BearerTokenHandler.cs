using System.Security.Claims;
using System.Text.Encodings.Web;
using Microsoft.AspNetCore.Authentication;
using Microsoft.Extensions.Options;
using PulseLadder.Storage;

namespace PulseLadder.Web.Auth;

/// <summary>
/// <c>Authorization: Bearer plx_...</c>: a personal API token, looked up by its SHA-256. Revoked tokens and tokens
/// of disabled accounts fail. The token's last use is recorded at most once a minute.
/// </summary>
internal sealed class BearerTokenHandler(
    IOptionsMonitor<AuthenticationSchemeOptions> options, ILoggerFactory logger, UrlEncoder encoder, Database db, TimeProvider clock)
    : AuthenticationHandler<AuthenticationSchemeOptions>(options, logger, encoder)
{
    public const string SchemeName = "Bearer";

    private static readonly TimeSpan TouchInterval = TimeSpan.FromMinutes(1);

    protected override async Task<AuthenticateResult> HandleAuthenticateAsync()
    {
        string? header = Request.Headers.Authorization;
        if (header is null || !header.StartsWith("Bearer ", StringComparison.OrdinalIgnoreCase)) return AuthenticateResult.NoResult();
        string token = header["Bearer ".Length..].Trim();
        if (!token.StartsWith(Accounts.TokenPrefix, StringComparison.Ordinal) || token.Length > 200)
            return AuthenticateResult.Fail("malformed token");
        string hash = Accounts.HashToken(token);
        await using var c = await db.OpenAsync(Context.RequestAborted);
        var row = AccountStore.FindToken(c, hash);
        if (row is null) return AuthenticateResult.Fail("unknown token");
        if (row.RevokedAt is not null) return AuthenticateResult.Fail("revoked token");
        if (row.DisabledAt is not null) return AuthenticateResult.Fail("account disabled");
        var now = clock.GetUtcNow();
        string cutoff = (now - TouchInterval).ToString("O");
        // Compared here first so a busy pipeline's requests cost no write at all between touches.
        if (row.LastUsedAt is null || string.CompareOrdinal(row.LastUsedAt, cutoff) < 0)
            AccountStore.TouchToken(c, row.TokenId, now.ToString("O"), cutoff);
        var identity = new ClaimsIdentity(
        [
            new Claim(ClaimTypes.Name, row.UserName),
            new Claim(ClaimTypes.Role, row.Role),
            new Claim(PlxClaims.UserId, row.UserId.ToString(System.Globalization.CultureInfo.InvariantCulture)),
            new Claim(PlxClaims.TokenId, row.TokenId.ToString(System.Globalization.CultureInfo.InvariantCulture)),
            new Claim(PlxClaims.AuthMethod, PlxClaims.ViaToken),
        ], SchemeName, ClaimTypes.Name, ClaimTypes.Role);
        return AuthenticateResult.Success(new AuthenticationTicket(new ClaimsPrincipal(identity), SchemeName));
    }

    protected override Task HandleChallengeAsync(AuthenticationProperties properties)
    {
        Response.Headers.WWWAuthenticate = "Bearer error=\"invalid_token\"";
        return Problems.WriteAsync(Context, 401, "Not signed in",
            "The bearer token is unknown, revoked or belongs to a disabled account.");
    }

    protected override Task HandleForbiddenAsync(AuthenticationProperties properties) =>
        Problems.WriteAsync(Context, 403, "Forbidden", $"Account '{Context.User.Identity?.Name}' may not do this: its role is too low.");
}

/// <summary>Single-user mode: every request is the local admin "local" (the start-up check allows loopback addresses only).</summary>
internal sealed class SingleUserHandler(IOptionsMonitor<AuthenticationSchemeOptions> options, ILoggerFactory logger, UrlEncoder encoder)
    : AuthenticationHandler<AuthenticationSchemeOptions>(options, logger, encoder)
{
    public const string SchemeName = "SingleUser";
    public const string LocalName = "local";

    protected override Task<AuthenticateResult> HandleAuthenticateAsync()
    {
        var identity = new ClaimsIdentity(
        [
            new Claim(ClaimTypes.Name, LocalName),
            new Claim(ClaimTypes.Role, Roles.Admin),
            new Claim(PlxClaims.AuthMethod, PlxClaims.ViaSingleUser),
        ], SchemeName, ClaimTypes.Name, ClaimTypes.Role);
        return Task.FromResult(AuthenticateResult.Success(new AuthenticationTicket(new ClaimsPrincipal(identity), SchemeName)));
    }
}
