using System.Net;
using System.Text;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Tests.Auth;

/// <summary>
/// Every endpoint the app maps, asked by every kind of caller. The expected minimum role of each endpoint is listed
/// here; an endpoint missing from the list (a new one) fails the test, so nobody adds a route without deciding who
/// may call it. Expected answers: too low a role 403, no or a revoked credential 401 (pages: a redirect to the
/// sign-in page), enough role anything but 401/403.
/// </summary>
public sealed class AuthorizationMatrixTests
{
    private const string Anyone = "anonymous";

    /// <summary>"METHOD route pattern" -> minimum role (docs/security.md has the same table).</summary>
    private static readonly Dictionary<string, string> Expected = new()
    {
        ["GET /health"] = Anyone,
        ["POST /api/v1/session"] = Anyone,
        ["DELETE /api/v1/session"] = Roles.Observer,
        ["GET /api/v1/me"] = Roles.Observer,
        ["GET /api/v1/antiforgery"] = Roles.Observer,
        ["GET /api/v1/tokens"] = Roles.Observer,
        ["POST /api/v1/tokens"] = Roles.Observer,
        ["DELETE /api/v1/tokens/{tokenId:long}"] = Roles.Observer,
        ["GET /openapi/{documentName}.json"] = Roles.Observer,
        ["POST /api/v1/uploads"] = Roles.Observer,
        ["GET /api/v1/uploads/{uploadId:long}"] = Roles.Observer,
        ["GET /api/v1/time-scales"] = Roles.Observer,
        ["GET /api/v1/fields"] = Roles.Observer,
        ["GET /api/v1/fields/{fieldId:long}/stars"] = Roles.Observer,
        ["GET /api/v1/fields/{fieldId:long}/summary"] = Roles.Observer,
        ["GET /api/v1/progress"] = Roles.Observer,
        ["GET /api/v1/calibrations"] = Roles.Observer,
        ["GET /api/v1/stars/{starId:long}"] = Roles.Observer,
        ["GET /api/v1/stars/by-name/{name}"] = Roles.Observer,
        ["GET /api/v1/review/next"] = Roles.Observer,
        ["POST /api/v1/stars/{starId:long}/decisions"] = Roles.Reviewer,
        ["GET /api/v1/fields/{fieldId:long}/export"] = Roles.Reviewer,
        ["GET /api/v1/export"] = Roles.Reviewer,
        ["GET /api/v1/fields/{fieldId:long}/methods"] = Roles.Reviewer,
        ["GET /api/v1/fields/{fieldId:long}/figures/pl.svg"] = Roles.Reviewer,
        ["GET /api/v1/stars/{starId:long}/figures/lightcurve.svg"] = Roles.Reviewer,
        ["GET /api/v1/fields/{fieldId:long}/figures/pl.png"] = Roles.Reviewer,
        ["GET /api/v1/stars/{starId:long}/figures/lightcurve.png"] = Roles.Reviewer,
        ["GET /api/v1/fields/{fieldId:long}/audit"] = Roles.Reviewer,
        ["PUT /api/v1/fields/{fieldId:long}/settings"] = Roles.Admin,
        ["GET /api/v1/users"] = Roles.Admin,
        ["POST /api/v1/users"] = Roles.Admin,
        ["PUT /api/v1/users/{name}"] = Roles.Admin,
        ["GET /api/v1/users/{name}/tokens"] = Roles.Admin,
        ["DELETE /api/v1/users/{name}/tokens/{tokenId:long}"] = Roles.Admin,
        ["GET /api/v1/audit"] = Roles.Admin,
        ["GET /jobs/{**path}"] = Roles.Admin,
    };

    private static readonly string[] Rank = [Anyone, Roles.Observer, Roles.Reviewer, Roles.Admin];

    private static List<(string Method, string Pattern)> Endpoints(TestApp t) =>
        t.App.Services.GetRequiredService<EndpointDataSource>().Endpoints.OfType<RouteEndpoint>()
            .SelectMany(e => (e.Metadata.GetMetadata<HttpMethodMetadata>()?.HttpMethods ?? ["GET"])
                .Select(m => (m, "/" + e.RoutePattern.RawText!.TrimStart('/'))))
            .Distinct().OrderBy(x => x.Item2, StringComparer.Ordinal).ThenBy(x => x.m, StringComparer.Ordinal).ToList();

    [Fact]
    public async Task EveryEndpoint_HasAnExpectedRole_AndNoListedEndpointIsGone()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var mapped = Endpoints(t).Select(e => $"{e.Method} {e.Pattern}").ToList();
        var unlisted = mapped.Where(k => !Expected.ContainsKey(k)).ToList();
        var stale = Expected.Keys.Where(k => !mapped.Contains(k)).ToList();
        Assert.True(unlisted.Count == 0, "Endpoints without an expected role in the matrix (decide who may call them):\n" + string.Join("\n", unlisted));
        Assert.True(stale.Count == 0, "Matrix entries for endpoints that no longer exist:\n" + string.Join("\n", stale));
    }

    [Fact]
    public async Task EveryEndpoint_AnswersEachCallerAsItsRoleAllows()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        // One token per role; a revoked token of an admin; and no credentials at all.
        var callers = new List<(string Who, HttpClient Client, string Rank)>
        {
            ("anonymous", t.Anonymous, Anyone),
            ("observer", t.ClientFor(Roles.Observer), Roles.Observer),
            ("reviewer", t.ClientFor(Roles.Reviewer), Roles.Reviewer),
            ("admin", t.Client, Roles.Admin),
        };
        string revoked = t.TokenFor(Roles.Admin, "revoked-admin");
        using (var c = t.Db.Open())
        {
            var user = PulseLadder.Storage.AccountStore.GetUser(c, "revoked-admin")!;
            foreach (var tok in PulseLadder.Storage.AccountStore.TokensOf(c, user.Id))
                PulseLadder.Storage.AccountStore.RevokeToken(c, null, user.Id, tok.Id, "2026-01-01T00:00:00.0000000+00:00");
        }
        callers.Add(("revoked token", t.WithToken(revoked), Anyone));

        var failures = new List<string>();
        int checkedCount = 0;
        foreach (var (method, pattern) in Endpoints(t))
        {
            string need = Expected[$"{method} {pattern}"];
            string url = Concrete(pattern);
            bool isPage = !url.StartsWith("/api/", StringComparison.Ordinal) && !url.StartsWith("/openapi/", StringComparison.Ordinal) && url != "/health";
            foreach (var (who, client, rank) in callers)
            {
                using var req = new HttpRequestMessage(new HttpMethod(method), url);
                if (method is "POST" or "PUT") req.Content = new StringContent("{}", Encoding.UTF8, "application/json");
                using var resp = await client.SendAsync(req);
                int status = (int)resp.StatusCode;
                bool allowed = Array.IndexOf(Rank, rank) >= Array.IndexOf(Rank, need);
                bool ok;
                string expected;
                if (allowed) { ok = status is not (401 or 403); expected = "not 401/403"; }
                else if (rank == Anyone && isPage && who == "anonymous")
                {
                    ok = status == 302 && resp.Headers.Location?.OriginalString.StartsWith("/signin.html?return=", StringComparison.Ordinal) == true;
                    expected = "302 to /signin.html";
                }
                else if (rank == Anyone) { ok = status == 401 && IsProblem(resp); expected = "401 ProblemDetails"; }
                else { ok = status == 403 && IsProblem(resp); expected = "403 ProblemDetails"; }
                if (!ok) failures.Add($"{method} {url} as {who}: {status}, expected {expected}");
                checkedCount++;
            }
        }
        Assert.True(failures.Count == 0, string.Join("\n", failures));
        Assert.True(checkedCount >= Expected.Count * 5, $"only {checkedCount} requests checked");
    }

    [Theory]
    [InlineData("/index.html", false)]
    [InlineData("/field.html", false)]
    [InlineData("/account.html", false)]
    [InlineData("/js/api.js", false)]
    [InlineData("/", false)]
    [InlineData("/signin.html", true)]
    [InlineData("/js/signin.js", true)]
    [InlineData("/css/app.css", true)]
    [InlineData("/favicon.svg", true)]
    public async Task StaticFiles_OnlySignInPageIsPublic_OthersRedirectToIt(string path, bool isPublic)
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var anon = await t.Anonymous.GetAsync(path);
        if (isPublic) Assert.Equal(HttpStatusCode.OK, anon.StatusCode);
        else
        {
            Assert.Equal(HttpStatusCode.Redirect, anon.StatusCode);
            Assert.StartsWith("/signin.html?return=", anon.Headers.Location!.OriginalString, StringComparison.Ordinal);
        }
        Assert.Equal(HttpStatusCode.OK, (await t.ClientFor(Roles.Observer).GetAsync(path)).StatusCode);
    }

    private static bool IsProblem(HttpResponseMessage r) => r.Content.Headers.ContentType?.MediaType == "application/problem+json";

    /// <summary>Route parameters filled with values that exist nowhere (the answer may be 404; only 401/403 count).</summary>
    private static string Concrete(string pattern) => System.Text.RegularExpressions.Regex.Replace(pattern, @"\{([^}:]+)(:[^}]*)?\}", m =>
        m.Groups[1].Value switch
        {
            "**path" => "",
            "documentName" => "v1",
            "name" => "nobody-here",
            _ => "987654",
        });
}
