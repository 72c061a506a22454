using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;
using PulseLadder.Web;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Tests;

/// <summary>
/// The real web host (embedded default) on an in-process test server, each with its own data folder.
/// <see cref="Client"/> is signed in as the admin <see cref="AdminName"/> (bearer token); <see cref="Anonymous"/>
/// carries no credentials; <see cref="ClientFor"/> gives a token client of an account with another role.
/// </summary>
public sealed class TestApp : IAsyncDisposable
{
    public const string AdminName = "test-admin";

    public WebApplication App { get; }
    public HttpClient Client { get; }
    public HttpClient Anonymous { get; }
    public string DataDir { get; }
    public Database Db => App.Services.GetRequiredService<Database>();
    private readonly List<HttpClient> _clients = [];

    private TestApp(WebApplication app, string dataDir)
    {
        App = app;
        DataDir = dataDir;
        Anonymous = app.GetTestClient();
        Client = ClientFor(Roles.Admin, AdminName);
    }

    /// <param name="settings">Extra command-line settings, e.g. ["--PulseLadder:Limits:RequestsPerMinute", "5"].</param>
    public static async Task<TestApp> StartAsync(string? dataDir = null, bool runJobs = true, int workers = 2, IEnumerable<string>? settings = null)
    {
        dataDir ??= Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"));
        var app = PulseLadderWeb.Build(
            ["--PulseLadder:DataDir", dataDir, "--PulseLadder:Jobs:RunServer", runJobs ? "true" : "false",
             "--PulseLadder:Jobs:Workers", workers.ToString(System.Globalization.CultureInfo.InvariantCulture), "--Logging:LogLevel:Default", "Warning",
             .. settings ?? []],
            b => b.WebHost.UseTestServer());
        await app.StartAsync();
        return new TestApp(app, dataDir);
    }

    /// <summary>Creates the account when missing (no password: token-only) and returns its new token.</summary>
    public string TokenFor(string role, string? name = null)
    {
        name ??= "test-" + role;
        UserRow? user;
        using (var c = Db.Open()) user = AccountStore.GetUser(c, name);
        if (user is null)
        {
            Accounts.CreateUser(Db, "test-setup", name, role, null, TimeProvider.System);
            using var c = Db.Open();
            user = AccountStore.GetUser(c, name)!;
        }
        return Accounts.CreateToken(Db, "test-setup", user, "test", TimeProvider.System).Token;
    }

    /// <summary>A client sending a fresh bearer token of the account <paramref name="name"/> (default "test-ROLE").</summary>
    public HttpClient ClientFor(string role, string? name = null) => WithToken(TokenFor(role, name));

    public HttpClient WithToken(string token)
    {
        var client = App.GetTestClient();
        client.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", token);
        _clients.Add(client);
        return client;
    }

    /// <summary>A client that keeps cookies, as a browser does (not yet signed in).</summary>
    public HttpClient CookieClient()
    {
        var client = new HttpClient(new CookieJar(App.GetTestServer().CreateHandler())) { BaseAddress = App.GetTestServer().BaseAddress };
        _clients.Add(client);
        return client;
    }

    private sealed class CookieJar(HttpMessageHandler inner) : DelegatingHandler(inner)
    {
        private readonly System.Net.CookieContainer _cookies = new();

        protected override async Task<HttpResponseMessage> SendAsync(HttpRequestMessage request, CancellationToken ct)
        {
            string header = _cookies.GetCookieHeader(request.RequestUri!);
            if (header.Length > 0) request.Headers.Add("Cookie", header);
            var resp = await base.SendAsync(request, ct);
            if (resp.Headers.TryGetValues("Set-Cookie", out var set))
                foreach (var cookie in set) _cookies.SetCookies(request.RequestUri!, cookie);
            return resp;
        }
    }

    /// <summary>Waits until no star lacks a current analysis (or the timeout passes); returns the pending count.</summary>
    public async Task<int> WaitForAnalysesAsync(TimeSpan timeout)
    {
        var end = DateTime.UtcNow + timeout;
        while (true)
        {
            int pending;
            using (var c = Db.Open()) pending = StarStore.Pending(c, PipelineVersion.Current).Count;
            if (pending == 0 || DateTime.UtcNow > end) return pending;
            await Task.Delay(200);
        }
    }

    /// <summary>
    /// Waits until the job server has nothing enqueued, scheduled or processing (follow-up jobs such as the field pass
    /// included), seen on three polls in a row; returns false on timeout.
    /// </summary>
    public async Task<bool> WaitForJobsIdleAsync(TimeSpan timeout)
    {
        var end = DateTime.UtcNow + timeout;
        var monitor = App.Services.GetRequiredService<Hangfire.JobStorage>().GetMonitoringApi();
        int quiet = 0;
        while (DateTime.UtcNow < end)
        {
            var stats = monitor.GetStatistics();
            quiet = stats.Enqueued + stats.Processing + stats.Scheduled == 0 ? quiet + 1 : 0;
            if (quiet >= 3) return true;
            await Task.Delay(200);
        }
        return false;
    }

    public async ValueTask DisposeAsync()
    {
        foreach (var c in _clients) c.Dispose();
        Anonymous.Dispose();
        await App.StopAsync();
        await App.DisposeAsync();
    }
}
