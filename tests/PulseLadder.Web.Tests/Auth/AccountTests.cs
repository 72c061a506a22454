using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using Dapper;
using PulseLadder.Cli;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Tests.Auth;

/// <summary>Sign-in, tokens, antiforgery, limits, single-user mode and the CLI's user commands (docs/security.md).</summary>
public sealed class AccountTests
{
    private const string Password = "correct horse battery";

    private static async Task<JsonElement> Json(HttpResponseMessage r) => await r.Content.ReadFromJsonAsync<JsonElement>();

    private static void AddUser(TestApp t, string name, string role, string? password = Password) =>
        Accounts.CreateUser(t.Db, "test-setup", name, role, password, TimeProvider.System);

    private static IReadOnlyList<AuditRow> Audit(TestApp t, string action)
    {
        using var c = t.Db.Open();
        return AuditStore.Page(c, null, 500, action);
    }

    private static async Task<HttpClient> SignedInAsync(TestApp t, string name, string password = Password)
    {
        var client = t.CookieClient();
        var resp = await client.PostAsJsonAsync("/api/v1/session", new { name, password });
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        return client;
    }

    private static async Task<HttpRequestMessage> WithCsrfAsync(HttpClient client, HttpRequestMessage req)
    {
        var t = await Json(await client.GetAsync("/api/v1/antiforgery"));
        req.Headers.Add(t.GetProperty("header_name").GetString()!, t.GetProperty("token").GetString());
        return req;
    }

    [Fact]
    public async Task SignIn_Answers401AndAuditsTheFailure_WhenPasswordIsWrong()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        AddUser(t, "olga", Roles.Observer);
        var wrong = await t.Anonymous.PostAsJsonAsync("/api/v1/session", new { name = "olga", password = "not her password" });
        Assert.Equal(HttpStatusCode.Unauthorized, wrong.StatusCode);
        Assert.Equal("application/problem+json", wrong.Content.Headers.ContentType!.MediaType);
        Assert.False(wrong.Headers.Contains("Set-Cookie"));
        // An unknown name answers exactly the same (no account enumeration).
        var unknown = await t.Anonymous.PostAsJsonAsync("/api/v1/session", new { name = "nobody", password = "whatever it is" });
        Assert.Equal(HttpStatusCode.Unauthorized, unknown.StatusCode);
        Assert.Equal((await Json(wrong)).GetProperty("detail").GetString(), (await Json(unknown)).GetProperty("detail").GetString());

        var failed = Audit(t, "signin:failed");
        Assert.Contains(failed, a => a.Actor == "olga" && a.Detail.StartsWith("wrong password", StringComparison.Ordinal));
        Assert.Contains(failed, a => a.Actor == "nobody" && a.Detail.StartsWith("unknown name", StringComparison.Ordinal));

        var client = await SignedInAsync(t, "olga");
        var me = await Json(await client.GetAsync("/api/v1/me"));
        Assert.Equal("olga", me.GetProperty("name").GetString());
        Assert.Equal("cookie", me.GetProperty("auth_method").GetString());
        Assert.Contains(Audit(t, "signin"), a => a.Action == "signin" && a.Actor == "olga");
    }

    [Fact]
    public async Task SignIn_RefusesFormPosts_SoNoCrossSiteFormCanSignSomebodyIn()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        AddUser(t, "fay", Roles.Observer);
        // What a hostile page's <form method=post> can send without a CORS preflight.
        var form = new FormUrlEncodedContent(new Dictionary<string, string> { ["name"] = "fay", ["password"] = Password });
        var client = t.CookieClient();
        var resp = await client.PostAsync("/api/v1/session", form);
        // Routing finds no endpoint accepting a form here (only JSON): the request falls to the signed-in fallback
        // policy (401) instead of reaching the sign-in handler.
        Assert.True(resp.StatusCode is HttpStatusCode.Unauthorized or HttpStatusCode.UnsupportedMediaType, $"{(int)resp.StatusCode}");
        Assert.False(resp.Headers.Contains("Set-Cookie"));
        Assert.Equal(HttpStatusCode.Unauthorized, (await client.GetAsync("/api/v1/me")).StatusCode);
        Assert.DoesNotContain(Audit(t, "signin"), a => a.Actor == "fay");
    }

    [Fact]
    public async Task CookieWrite_NeedsTheAntiforgeryHeader_AndSucceedsWithIt()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        AddUser(t, "rita", Roles.Reviewer);
        var client = await SignedInAsync(t, "rita");

        var without = await client.PostAsJsonAsync("/api/v1/tokens", new { name = "no header" });
        Assert.Equal(HttpStatusCode.BadRequest, without.StatusCode);
        Assert.Contains("X-CSRF-TOKEN", (await Json(without)).GetProperty("detail").GetString());

        using var forged = new HttpRequestMessage(HttpMethod.Post, "/api/v1/tokens") { Content = JsonContent.Create(new { name = "forged" }) };
        forged.Headers.Add(AuthSetup.CsrfHeader, "not-a-token");
        Assert.Equal(HttpStatusCode.BadRequest, (await client.SendAsync(forged)).StatusCode);

        var req = await WithCsrfAsync(client, new HttpRequestMessage(HttpMethod.Post, "/api/v1/tokens") { Content = JsonContent.Create(new { name = "with header" }) });
        var with = await client.SendAsync(req);
        Assert.Equal(HttpStatusCode.Created, with.StatusCode);
        using var c = t.Db.Open();
        Assert.Equal(new[] { "with header" }, c.Query<string>("SELECT t.name FROM api_tokens t JOIN users u ON u.id = t.user_id WHERE u.name = 'rita'"));

        // A bearer token is no ambient credential: its writes need no antiforgery header.
        Assert.Equal(HttpStatusCode.Created, (await t.ClientFor(Roles.Observer).PostAsJsonAsync("/api/v1/tokens", new { name = "script" })).StatusCode);
    }

    [Fact]
    public async Task Token_StopsWorkingAndIsAudited_WhenRevoked()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var created = await Json(await t.ClientFor(Roles.Observer, "otto").PostAsJsonAsync("/api/v1/tokens", new { name = "pipeline" }));
        string token = created.GetProperty("token").GetString()!;
        long id = created.GetProperty("id").GetInt64();
        Assert.StartsWith(created.GetProperty("prefix").GetString()!, token, StringComparison.Ordinal);
        var pipeline = t.WithToken(token);
        Assert.Equal(HttpStatusCode.OK, (await pipeline.GetAsync("/api/v1/fields")).StatusCode);

        // Stored hashed: the database never holds the token itself.
        using (var c = t.Db.Open())
        {
            Assert.Equal(0L, c.ExecuteScalar<long>("SELECT COUNT(*) FROM api_tokens WHERE token_hash = @token OR prefix = @token", new { token }));
            Assert.Equal(1L, c.ExecuteScalar<long>("SELECT COUNT(*) FROM api_tokens WHERE token_hash = @h", new { h = Accounts.HashToken(token) }));
        }
        // Nobody else can revoke it through their own token list.
        Assert.Equal(HttpStatusCode.NotFound, (await t.ClientFor(Roles.Observer, "someone").DeleteAsync($"/api/v1/tokens/{id}")).StatusCode);
        Assert.Equal(HttpStatusCode.NoContent, (await pipeline.DeleteAsync($"/api/v1/tokens/{id}")).StatusCode);
        var after = await pipeline.GetAsync("/api/v1/fields");
        Assert.Equal(HttpStatusCode.Unauthorized, after.StatusCode);
        Assert.Contains("Bearer", after.Headers.WwwAuthenticate.ToString());
        Assert.Contains(Audit(t, "token:revoke"), a => a.Actor == "otto" && a.Detail == $"token {id}");
        var listed = (await Json(await t.ClientFor(Roles.Observer, "otto").GetAsync("/api/v1/tokens"))).EnumerateArray()
            .Single(x => x.GetProperty("id").GetInt64() == id);
        Assert.Equal(JsonValueKind.String, listed.GetProperty("revoked_at").ValueKind);
    }

    [Fact]
    public async Task Token_LastUsedIsRecorded_AtMostOncePerMinute()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        string token = t.TokenFor(Roles.Observer, "lu");
        string? LastUsed()
        {
            using var c = t.Db.Open();
            return c.ExecuteScalar<string?>("SELECT last_used_at FROM api_tokens WHERE token_hash = @h", new { h = Accounts.HashToken(token) });
        }
        Assert.Null(LastUsed());
        var client = t.WithToken(token);
        await client.GetAsync("/api/v1/me");
        string first = LastUsed()!;
        Assert.NotNull(first);
        await client.GetAsync("/api/v1/me");
        Assert.Equal(first, LastUsed());

        const string old = "2020-01-01T00:00:00.0000000+00:00";
        using (var c = t.Db.Open()) c.Execute("UPDATE api_tokens SET last_used_at = @old WHERE token_hash = @h", new { old, h = Accounts.HashToken(token) });
        await client.GetAsync("/api/v1/me");
        Assert.True(string.CompareOrdinal(LastUsed(), first) >= 0, "a use more than a minute after the last one is recorded");
    }

    [Fact]
    public async Task RateLimit_Answers429WithRetryAfter_PerAccount()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:Limits:RequestsPerMinute", "5"]);
        var busy = t.ClientFor(Roles.Observer, "busy");
        var codes = new List<HttpStatusCode>();
        HttpResponseMessage last = null!;
        for (int i = 0; i < 6; i++) { last = await busy.GetAsync("/api/v1/me"); codes.Add(last.StatusCode); }
        Assert.Equal(Enumerable.Repeat(HttpStatusCode.OK, 5).Append(HttpStatusCode.TooManyRequests), codes);
        Assert.Equal("application/problem+json", last.Content.Headers.ContentType!.MediaType);
        Assert.InRange(last.Headers.RetryAfter!.Delta!.Value.TotalSeconds, 1, 60);
        // Another account has its own allowance.
        Assert.Equal(HttpStatusCode.OK, (await t.ClientFor(Roles.Observer, "calm").GetAsync("/api/v1/me")).StatusCode);
    }

    [Fact]
    public async Task SignIn_IsRateLimitedPerAddress_AfterTheConfiguredAttempts()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:Limits:SignInAttemptsPerMinute", "3"]);
        var codes = new List<HttpStatusCode>();
        for (int i = 0; i < 4; i++)
            codes.Add((await t.Anonymous.PostAsJsonAsync("/api/v1/session", new { name = "guess", password = $"guess number {i}" })).StatusCode);
        Assert.Equal([HttpStatusCode.Unauthorized, HttpStatusCode.Unauthorized, HttpStatusCode.Unauthorized, HttpStatusCode.TooManyRequests], codes);
    }

    [Fact]
    public async Task Upload_Answers413WithProblemDetails_WhenBodyIsOverTheLimit()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:MaxUploadBytes", "2048"]);
        var form = Fixtures.Form(Fixtures.StarList, [("big.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 60))]);
        var resp = await t.Client.PostAsync("/api/v1/uploads", form);
        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, resp.StatusCode);
        Assert.Equal("application/problem+json", resp.Content.Headers.ContentType!.MediaType);

        // Without Content-Length (chunked) the size is known only while reading: the form reader's limit answers 413 too.
        var chunkedForm = Fixtures.Form(Fixtures.StarList, [("big.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 60))]);
        var bytes = await chunkedForm.ReadAsByteArrayAsync();
        var chunked = new StreamContent(new NoLengthStream(bytes));
        chunked.Headers.ContentType = chunkedForm.Headers.ContentType;
        var resp2 = await t.Client.PostAsync("/api/v1/uploads", chunked);
        Assert.Equal(HttpStatusCode.RequestEntityTooLarge, resp2.StatusCode);
        Assert.Contains("PulseLadder:MaxUploadBytes", (await Json(resp2)).GetProperty("detail").GetString());
        using var c = t.Db.Open();
        Assert.Equal(0, ObservationStore.Count(c));
    }

    /// <summary>A read-only stream that does not know its length, so the client sends the body chunked.</summary>
    private sealed class NoLengthStream(byte[] data) : MemoryStream(data)
    {
        public override bool CanSeek => false;
        public override long Length => throw new NotSupportedException();
        public override long Position { get => base.Position; set => throw new NotSupportedException(); }
    }

    [Fact]
    public async Task UploadAndDecision_RecordTheSignedInAccount_NotAFormField()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var form = Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 20))]);
        form.Add(new StringContent("somebody-else"), "by");
        Assert.Equal(HttpStatusCode.Created, (await t.ClientFor(Roles.Observer, "obs-anna").PostAsync("/api/v1/uploads", form)).StatusCode);
        var reviewer = t.ClientFor(Roles.Reviewer, "rev-ben");
        Assert.Equal(HttpStatusCode.Created, (await reviewer.PostAsJsonAsync("/api/v1/stars/1/decisions", new { action = "note", note = "check", by = "somebody-else" })).StatusCode);
        using var c = t.Db.Open();
        Assert.Equal(["obs-anna"], c.Query<string>("SELECT DISTINCT uploaded_by FROM uploads").ToList());
        Assert.Equal(["rev-ben"], c.Query<string>("SELECT DISTINCT decided_by FROM review_decisions").ToList());
    }

    [Fact]
    public async Task AccountChange_EndsCookieSessions_AndTheLastAdminCannotBeDemoted()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        AddUser(t, "rosa", Roles.Reviewer);
        var rosa = await SignedInAsync(t, "rosa");
        Assert.Equal(HttpStatusCode.OK, (await rosa.GetAsync("/api/v1/me")).StatusCode);

        var demote = await t.Client.PutAsJsonAsync("/api/v1/users/rosa", new { role = "observer" });
        Assert.Equal(HttpStatusCode.OK, demote.StatusCode);
        Assert.Equal("observer", (await Json(demote)).GetProperty("role").GetString());
        Assert.Equal(HttpStatusCode.Unauthorized, (await rosa.GetAsync("/api/v1/me")).StatusCode);
        Assert.Contains(Audit(t, "user:update"), a => a.Actor == TestApp.AdminName && a.Detail == "role reviewer -> observer");

        // Disabled: neither the password nor the account's tokens work any more.
        var rosaToken = t.WithToken(t.TokenFor(Roles.Observer, "rosa"));
        Assert.Equal(HttpStatusCode.OK, (await t.Client.PutAsJsonAsync("/api/v1/users/rosa", new { disabled = true })).StatusCode);
        Assert.Equal(HttpStatusCode.Unauthorized, (await rosaToken.GetAsync("/api/v1/me")).StatusCode);
        Assert.Equal(HttpStatusCode.Unauthorized, (await t.Anonymous.PostAsJsonAsync("/api/v1/session", new { name = "rosa", password = Password })).StatusCode);

        var last = await t.Client.PutAsJsonAsync($"/api/v1/users/{TestApp.AdminName}", new { role = "observer" });
        Assert.Equal(HttpStatusCode.Conflict, last.StatusCode);
        var weak = await t.Client.PostAsJsonAsync("/api/v1/users", new { name = "weak", role = "observer", password = "short" });
        Assert.Equal(HttpStatusCode.BadRequest, weak.StatusCode);
    }

    [Fact]
    public async Task Audit_IsPagedNewestFirst_ForAdmins()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        for (int i = 0; i < 5; i++) AddUser(t, $"u{i}", Roles.Observer, null);
        var first = await Json(await t.Client.GetAsync("/api/v1/audit?limit=3&action=user:create"));
        var items = first.GetProperty("items").EnumerateArray().ToList();
        Assert.Equal(["user u4", "user u3", "user u2"], items.Select(i => i.GetProperty("subject").GetString()));
        long before = first.GetProperty("next_before").GetInt64();
        var second = await Json(await t.Client.GetAsync($"/api/v1/audit?limit=3&action=user:create&before={before}"));
        Assert.Contains("user u1", second.GetProperty("items").EnumerateArray().Select(i => i.GetProperty("subject").GetString()));
        Assert.Equal(HttpStatusCode.Forbidden, (await t.ClientFor(Roles.Reviewer).GetAsync("/api/v1/audit")).StatusCode);
    }

    [Theory]
    [InlineData("http://127.0.0.1:5000", true)]
    [InlineData("http://localhost:5000", true)]
    [InlineData("http://[::1]:5000", true)]
    [InlineData("http://127.0.0.2:80", true)]
    [InlineData("http://0.0.0.0:5000", false)]
    [InlineData("http://*:5000", false)]
    [InlineData("http://+:5000", false)]
    [InlineData("http://[::]:5000", false)]
    [InlineData("http://192.168.1.10:5000", false)]
    [InlineData("http://example.org:5000", false)]
    public void IsLoopbackUrl_AcceptsOnlyLoopbackHosts(string url, bool loopback) =>
        Assert.Equal(loopback, AuthSetup.IsLoopbackUrl(url));

    [Fact]
    public void SingleUserMode_IsRefusedAtStart_WhenAnAddressIsNotLoopback()
    {
        string dir = Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"));
        var e = Assert.Throws<InvalidOperationException>(() => PulseLadderWeb.Build(
            ["--urls", "http://127.0.0.1:5000;http://0.0.0.0:5001", "--PulseLadder:Auth:SingleUser", "true", "--PulseLadder:DataDir", dir]));
        Assert.Contains("loopback", e.Message, StringComparison.Ordinal);
        Assert.Contains("http://0.0.0.0:5001", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task SingleUserMode_ActsAsLocalAdmin_AndBrowserWritesStillNeedTheToken()
    {
        await using var t = await TestApp.StartAsync(runJobs: false, settings: ["--PulseLadder:Auth:SingleUser", "true"]);
        var me = await Json(await t.Anonymous.GetAsync("/api/v1/me"));
        Assert.Equal("local", me.GetProperty("name").GetString());
        Assert.Equal("admin", me.GetProperty("role").GetString());
        Assert.True(me.GetProperty("single_user").GetBoolean());
        Assert.Equal(HttpStatusCode.OK, (await t.Anonymous.GetAsync("/api/v1/audit")).StatusCode);

        // Another web site open in the same browser could post to the loopback server: browser requests need the token.
        using var crossSite = new HttpRequestMessage(HttpMethod.Put, "/api/v1/fields/1/settings") { Content = JsonContent.Create(new { default_ebv = 0.1 }) };
        crossSite.Headers.Add("Origin", "https://elsewhere.example");
        crossSite.Headers.Add("Sec-Fetch-Site", "cross-site");
        Assert.Equal(HttpStatusCode.BadRequest, (await t.Anonymous.SendAsync(crossSite)).StatusCode);
        // A script (no Origin, no Sec-Fetch-Site) is not a browser and writes without it.
        Assert.Equal(HttpStatusCode.NotFound, (await t.Anonymous.PutAsJsonAsync("/api/v1/fields/1/settings", new { default_ebv = 0.1 })).StatusCode);
    }

    [Fact]
    public async Task ServerClient_SendsTheInjectedClientsToken_AndExplains401()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        using var ok = new ServerClient(t.Client);
        Assert.Equal(0, (await ok.GetJsonAsync("api/v1/progress", CancellationToken.None)).GetProperty("stars_total").GetInt64());
        using var anon = new ServerClient(t.Anonymous);
        var e = await Assert.ThrowsAsync<HttpRequestException>(() => anon.GetJsonAsync("api/v1/progress", CancellationToken.None));
        Assert.Equal(HttpStatusCode.Unauthorized, e.StatusCode);
        Assert.Contains("--token", e.Message, StringComparison.Ordinal);
        Assert.Contains(ServerClient.TokenVariable, e.Message, StringComparison.Ordinal);
        using var observer = new ServerClient(t.ClientFor(Roles.Observer));
        var f = await Assert.ThrowsAsync<HttpRequestException>(() => observer.GetBytesAsync("api/v1/export", CancellationToken.None));
        Assert.Equal(HttpStatusCode.Forbidden, f.StatusCode);
    }

    [Fact]
    public async Task CliUserAdd_CreatesAnAccountThatSignsIn_AndUserTokenPrintsAWorkingToken()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var (code, _, err) = await Cli(["user", "add", "ada", "--role", "admin", "--password-stdin", "--data-dir", t.DataDir], Password + "\n");
        Assert.True(code == 0, err);
        var ada = await SignedInAsync(t, "ada");
        Assert.Equal("admin", (await Json(await ada.GetAsync("/api/v1/me"))).GetProperty("role").GetString());
        Assert.Contains(Audit(t, "user:create"), a => a.Subject == "user ada" && a.Actor.StartsWith("cli:", StringComparison.Ordinal));

        var (tcode, tout, terr) = await Cli(["user", "token", "ada", "--label", "nightly", "--data-dir", t.DataDir], null);
        Assert.True(tcode == 0, terr);
        string token = tout.Trim();
        Assert.StartsWith(Accounts.TokenPrefix, token, StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.OK, (await t.WithToken(token).GetAsync("/api/v1/audit")).StatusCode);

        // No default password: a short one is refused and nothing is created.
        var (bad, _, badErr) = await Cli(["user", "add", "bob", "--role", "observer", "--password-stdin", "--data-dir", t.DataDir], "short\n");
        Assert.Equal(1, bad);
        Assert.Contains("at least 12", badErr, StringComparison.Ordinal);
        using var c = t.Db.Open();
        Assert.Null(AccountStore.GetUser(c, "bob"));
    }

    private static async Task<(int Code, string Out, string Err)> Cli(string[] args, string? stdin)
    {
        var psi = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = AppContext.BaseDirectory, RedirectStandardInput = true, RedirectStandardOutput = true,
            RedirectStandardError = true, UseShellExecute = false,
        };
        psi.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "pulseladder.dll"));
        foreach (var a in args) psi.ArgumentList.Add(a);
        foreach (var key in psi.Environment.Keys.Where(k => k.StartsWith("PulseLadder__", StringComparison.OrdinalIgnoreCase)).ToList())
            psi.Environment.Remove(key);
        using var p = Process.Start(psi)!;
        if (stdin is not null) await p.StandardInput.WriteAsync(stdin);
        p.StandardInput.Close();
        var o = p.StandardOutput.ReadToEndAsync();
        var e = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        return (p.ExitCode, await o, await e);
    }
}
