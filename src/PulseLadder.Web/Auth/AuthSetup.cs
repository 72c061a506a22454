using System.Globalization;
using System.Net;
using System.Security.Claims;
using System.Threading.RateLimiting;
using Hangfire.Dashboard;
using Microsoft.AspNetCore.Antiforgery;
using Microsoft.AspNetCore.Authentication;
using Microsoft.AspNetCore.Authentication.Cookies;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.DataProtection;
using Microsoft.AspNetCore.Http.Timeouts;
using Microsoft.AspNetCore.RateLimiting;
using PulseLadder.Storage;

namespace PulseLadder.Web.Auth;

/// <summary>
/// Authentication (sign-in cookie, personal API tokens, or single-user mode), authorisation policies, antiforgery
/// for cookie-authenticated writes, rate limits, request timeouts and the request size answer.
/// </summary>
internal static class AuthSetup
{
    public const string SelectorScheme = "PulseLadder";
    public const string CsrfHeader = "X-CSRF-TOKEN";
    public const string SignInRateLimit = "signin";
    public const string LongRequest = "long";
    public const string SignInPage = "/signin.html";

    /// <summary>Files served to anybody: the sign-in page and what it loads.</summary>
    private static readonly HashSet<string> PublicFiles = new(StringComparer.OrdinalIgnoreCase)
        { "/signin.html", "/js/signin.js", "/css/app.css", "/favicon.svg" };

    public static void AddPulseLadderAuth(this WebApplicationBuilder builder, PulseLadderOptions options)
    {
        if (options.Auth.SingleUser && NonLoopbackAddress(builder.Configuration) is { } bad)
            throw new InvalidOperationException(
                $"Single-user mode ('PulseLadder:Auth:SingleUser' = true, `serve --single-user` or `--demo`) makes every request an admin, " +
                $"so it listens on loopback addresses only (127.0.0.1, [::1], localhost); '{bad}' is not one. " +
                "Listen on http://127.0.0.1:PORT, or create accounts with `pulseladder user add NAME --role admin` and drop single-user mode.");

        var services = builder.Services;
        // Session and antiforgery cookies are encrypted with these keys: kept with the data, so a restart (or a new
        // container over the same data folder) does not sign everybody out.
        services.AddDataProtection()
            .SetApplicationName("PulseLadder")
            .PersistKeysToFileSystem(new DirectoryInfo(Path.Combine(Path.GetFullPath(options.DataDir), "keys")));
        var auth = services.AddAuthentication(o =>
        {
            o.DefaultScheme = options.Auth.SingleUser ? SingleUserHandler.SchemeName : SelectorScheme;
        });
        auth.AddPolicyScheme(SelectorScheme, "cookie or bearer token", o =>
            o.ForwardDefaultSelector = ctx =>
                ctx.Request.Headers.Authorization.ToString().StartsWith("Bearer ", StringComparison.OrdinalIgnoreCase)
                    ? BearerTokenHandler.SchemeName
                    : CookieAuthenticationDefaults.AuthenticationScheme);
        auth.AddScheme<AuthenticationSchemeOptions, BearerTokenHandler>(BearerTokenHandler.SchemeName, null);
        auth.AddScheme<AuthenticationSchemeOptions, SingleUserHandler>(SingleUserHandler.SchemeName, null);
        auth.AddCookie(CookieAuthenticationDefaults.AuthenticationScheme, o =>
        {
            o.Cookie.Name = "pulseladder.session";
            o.Cookie.HttpOnly = true;
            // Strict: no cross-site request carries the session at all (antiforgery tokens are the second line).
            o.Cookie.SameSite = SameSiteMode.Strict;
            o.Cookie.SecurePolicy = CookieSecurePolicy.SameAsRequest;
            o.ExpireTimeSpan = TimeSpan.FromHours(options.Auth.SessionHours);
            o.SlidingExpiration = true;
            o.LoginPath = SignInPage;
            o.ReturnUrlParameter = "return";
            o.Events = new CookieAuthenticationEvents
            {
                OnValidatePrincipal = ValidateCookieAsync,
                OnRedirectToLogin = ctx =>
                {
                    if (Problems.IsApi(ctx.Request))
                        return Problems.WriteAsync(ctx.HttpContext, 401, "Not signed in",
                            "Sign in (POST /api/v1/session) or send 'Authorization: Bearer <token>'.");
                    ctx.Response.Redirect(SignInPage + "?return=" + Uri.EscapeDataString(ctx.Request.PathBase + ctx.Request.Path + ctx.Request.QueryString));
                    return Task.CompletedTask;
                },
                OnRedirectToAccessDenied = ctx => Problems.WriteAsync(ctx.HttpContext, 403, "Forbidden",
                    $"Account '{ctx.HttpContext.User.Identity?.Name}' may not do this: its role is too low."),
            };
        });

        services.AddAuthorizationBuilder()
            // Every endpoint and every static file needs a signed-in account unless it says otherwise.
            .SetFallbackPolicy(new AuthorizationPolicyBuilder().RequireAuthenticatedUser().Build())
            .AddPolicy(Policies.Observer, p => p.RequireAuthenticatedUser().RequireRole(Roles.Observer, Roles.Reviewer, Roles.Admin))
            .AddPolicy(Policies.Reviewer, p => p.RequireAuthenticatedUser().RequireRole(Roles.Reviewer, Roles.Admin))
            .AddPolicy(Policies.Admin, p => p.RequireAuthenticatedUser().RequireRole(Roles.Admin));

        services.AddAntiforgery(o =>
        {
            o.HeaderName = CsrfHeader;
            o.Cookie.Name = "pulseladder.csrf";
            o.Cookie.SameSite = SameSiteMode.Strict;
            o.Cookie.SecurePolicy = CookieSecurePolicy.SameAsRequest;
            // The security-header middleware sets X-Frame-Options for every response.
            o.SuppressXFrameOptionsHeader = true;
        });

        var limits = options.Limits;
        services.AddRateLimiter(o =>
        {
            o.RejectionStatusCode = 429;
            if (limits.RequestsPerMinute > 0)
                o.GlobalLimiter = PartitionedRateLimiter.Create<HttpContext, string>(ctx =>
                    RateLimitPartition.GetFixedWindowLimiter(PartitionKey(ctx), _ => new FixedWindowRateLimiterOptions
                    {
                        PermitLimit = limits.RequestsPerMinute, Window = TimeSpan.FromMinutes(1), QueueLimit = 0,
                    }));
            o.AddPolicy(SignInRateLimit, ctx => RateLimitPartition.GetFixedWindowLimiter("ip:" + ClientAddress(ctx), _ => new FixedWindowRateLimiterOptions
            {
                PermitLimit = limits.SignInAttemptsPerMinute, Window = TimeSpan.FromMinutes(1), QueueLimit = 0,
            }));
            o.OnRejected = async (ctx, ct) =>
            {
                int seconds = ctx.Lease.TryGetMetadata(MetadataName.RetryAfter, out var after) ? Math.Max(1, (int)Math.Ceiling(after.TotalSeconds)) : 60;
                ctx.HttpContext.Response.Headers.RetryAfter = seconds.ToString(CultureInfo.InvariantCulture);
                await Problems.WriteAsync(ctx.HttpContext, 429, "Too many requests",
                    $"Request limit reached for {PartitionKey(ctx.HttpContext)}; try again in {seconds} s.");
            };
        });

        services.AddRequestTimeouts(o =>
        {
            o.DefaultPolicy = TimeoutPolicy(limits.RequestTimeoutSeconds);
            o.AddPolicy(LongRequest, TimeoutPolicy(limits.LongRequestTimeoutSeconds));
        });
    }

    private static RequestTimeoutPolicy TimeoutPolicy(double seconds) => new()
    {
        Timeout = TimeSpan.FromSeconds(seconds),
        TimeoutStatusCode = 504,
        WriteTimeoutResponse = ctx => Problems.WriteAsync(ctx, 504, "Request took too long",
            $"The server stopped this request after {seconds.ToString(CultureInfo.InvariantCulture)} s (setting 'PulseLadder:Limits')."),
    };

    /// <summary>Rate-limit partition: the account name when signed in, else the client address.</summary>
    private static string PartitionKey(HttpContext ctx) =>
        ctx.User.Identity is { IsAuthenticated: true, Name: { } name } ? "user " + name : "address " + ClientAddress(ctx);

    private static string ClientAddress(HttpContext ctx) => ctx.Connection.RemoteIpAddress?.ToString() ?? "unknown";

    /// <summary>
    /// Re-reads the account on every cookie request: a disabled account, a reset password or a changed role (each
    /// changes the security stamp) ends the session at once instead of when the cookie expires.
    /// </summary>
    private static async Task ValidateCookieAsync(CookieValidatePrincipalContext ctx)
    {
        string? name = ctx.Principal?.Identity?.Name;
        string? stamp = ctx.Principal?.FindFirstValue(PlxClaims.SecurityStamp);
        var db = ctx.HttpContext.RequestServices.GetRequiredService<Database>();
        UserRow? user = null;
        if (name is not null)
        {
            await using var c = await db.OpenAsync(ctx.HttpContext.RequestAborted);
            user = AccountStore.GetUser(c, name);
        }
        if (user is null || user.Disabled || user.SecurityStamp != stamp)
        {
            ctx.RejectPrincipal();
            await ctx.HttpContext.SignOutAsync(CookieAuthenticationDefaults.AuthenticationScheme);
        }
    }

    /// <summary>The principal a cookie sign-in stores.</summary>
    public static ClaimsPrincipal CookiePrincipal(UserRow user) => new(new ClaimsIdentity(
    [
        new Claim(ClaimTypes.Name, user.Name),
        new Claim(ClaimTypes.Role, user.Role),
        new Claim(PlxClaims.UserId, user.Id.ToString(CultureInfo.InvariantCulture)),
        new Claim(PlxClaims.SecurityStamp, user.SecurityStamp),
        new Claim(PlxClaims.AuthMethod, PlxClaims.ViaCookie),
    ], CookieAuthenticationDefaults.AuthenticationScheme, ClaimTypes.Name, ClaimTypes.Role));

    /// <summary>The first address in the server settings that is not loopback, or null.</summary>
    internal static string? NonLoopbackAddress(IConfiguration config)
    {
        var urls = new List<string>();
        foreach (var key in new[] { "urls", "ASPNETCORE_URLS" })
            if (config[key] is { Length: > 0 } v) urls.AddRange(v.Split(';', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries));
        // HTTP_PORTS / HTTPS_PORTS bind every interface.
        foreach (var key in new[] { "http_ports", "https_ports", "ASPNETCORE_HTTP_PORTS", "ASPNETCORE_HTTPS_PORTS" })
            if (config[key] is { Length: > 0 } v) return $"{key}={v}";
        foreach (var ep in config.GetSection("Kestrel:Endpoints").GetChildren())
            if (ep["Url"] is { Length: > 0 } u) urls.Add(u);
        foreach (var url in urls)
            if (!IsLoopbackUrl(url)) return url;
        return null;
    }

    /// <summary>
    /// Second line behind the settings check: once the server runs, every address it actually bound must be loopback
    /// (catches endpoints configured some other way); otherwise the host stops at once.
    /// </summary>
    public static void StopUnlessBoundToLoopback(WebApplication app) =>
        app.Lifetime.ApplicationStarted.Register(() =>
        {
            var addresses = app.Services.GetRequiredService<Microsoft.AspNetCore.Hosting.Server.IServer>()
                .Features.Get<Microsoft.AspNetCore.Hosting.Server.Features.IServerAddressesFeature>()?.Addresses ?? [];
            if (addresses.FirstOrDefault(a => !IsLoopbackUrl(a)) is { } bad)
            {
                app.Logger.LogCritical("Single-user mode listens on loopback addresses only, but the server is bound to {Address}: stopping.", bad);
                app.Lifetime.StopApplication();
            }
        });

    internal static bool IsLoopbackUrl(string url)
    {
        int start = url.IndexOf("://", StringComparison.Ordinal);
        string rest = start < 0 ? url : url[(start + 3)..];
        int slash = rest.IndexOf('/');
        if (slash >= 0) rest = rest[..slash];
        string host;
        if (rest.StartsWith('['))
        {
            int close = rest.IndexOf(']');
            if (close < 0) return false;
            host = rest[1..close];
        }
        else
        {
            int colon = rest.LastIndexOf(':');
            host = colon >= 0 ? rest[..colon] : rest;
        }
        if (string.Equals(host, "localhost", StringComparison.OrdinalIgnoreCase)) return true;
        return IPAddress.TryParse(host, out var ip) && IPAddress.IsLoopback(ip);
    }

    /// <summary>The sign-in page's own files, served before authentication.</summary>
    public static bool IsPublicFile(PathString path) => path.HasValue && PublicFiles.Contains(path.Value!);

    /// <summary>
    /// Antiforgery for state-changing requests that carry ambient credentials: a sign-in cookie, or (single-user
    /// mode) a browser request to the loopback server, which any web page the person visits could send. Bearer
    /// tokens are never sent by a browser on its own, so token requests are exempt, and so are scripts in
    /// single-user mode (no Origin / Sec-Fetch-Site header: not a browser).
    /// </summary>
    public static async Task CsrfGuardAsync(HttpContext ctx, RequestDelegate next)
    {
        if (HttpMethods.IsGet(ctx.Request.Method) || HttpMethods.IsHead(ctx.Request.Method) || HttpMethods.IsOptions(ctx.Request.Method)
            || HttpMethods.IsTrace(ctx.Request.Method) || NeedsNoToken(ctx))
        {
            await next(ctx);
            return;
        }
        if (!ctx.Request.Headers.ContainsKey(CsrfHeader))
        {
            // Checked before IAntiforgery, which would otherwise read (buffer) a whole form body looking for the token.
            await Problems.WriteAsync(ctx, 400, "Antiforgery token missing",
                $"Requests signed in by cookie must send header {CsrfHeader} (GET /api/v1/antiforgery gives the token).");
            return;
        }
        try
        {
            await ctx.RequestServices.GetRequiredService<IAntiforgery>().ValidateRequestAsync(ctx);
        }
        catch (AntiforgeryValidationException)
        {
            await Problems.WriteAsync(ctx, 400, "Antiforgery token invalid",
                $"The {CsrfHeader} header does not match this session; reload the page (GET /api/v1/antiforgery).");
            return;
        }
        await next(ctx);
    }

    private static bool NeedsNoToken(HttpContext ctx)
    {
        string? via = ctx.User.FindFirstValue(PlxClaims.AuthMethod);
        // Signing in sets the cookie; the request is JSON-only (no cross-site form can send it) and carries no session.
        if (ctx.Request.Path.StartsWithSegments("/api/v1/session") && HttpMethods.IsPost(ctx.Request.Method)) return true;
        return via switch
        {
            PlxClaims.ViaCookie => false,
            PlxClaims.ViaSingleUser => !ctx.Request.Headers.ContainsKey("Origin") && !ctx.Request.Headers.ContainsKey("Sec-Fetch-Site"),
            _ => true, // bearer token or anonymous (anonymous writes are refused by authorisation anyway)
        };
    }

    /// <summary>413 with ProblemDetails before any of the body is read, when the declared length is over the limit.</summary>
    public static async Task BodySizeGuardAsync(HttpContext ctx, RequestDelegate next, long maxBytes)
    {
        if (ctx.Request.ContentLength is { } n && n > maxBytes)
        {
            await Problems.WriteAsync(ctx, 413, "Request too large",
                $"The request body has {n} bytes; the limit is {maxBytes} (setting 'PulseLadder:MaxUploadBytes').");
            return;
        }
        await next(ctx);
    }
}

/// <summary>The Hangfire dashboard for admins only (in single-user mode the local admin).</summary>
internal sealed class AdminDashboardFilter : IDashboardAuthorizationFilter
{
    public bool Authorize(DashboardContext context) => context.GetHttpContext().User.IsInRole(Roles.Admin);
}
