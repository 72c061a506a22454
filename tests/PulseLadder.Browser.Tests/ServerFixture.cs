using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Net.Sockets;
using System.Text;
using System.Text.Json;
using Microsoft.Playwright;

namespace PulseLadder.Browser.Tests;

/// <summary>
/// Starts the real PulseLadder server (<c>pulseladder serve</c>, embedded SQLite + in-memory jobs) on a free
/// loopback port with a fresh data folder, and Debian's chromium through Playwright. One per test class, so the
/// classes do not see each other's decisions. Never downloads a browser: a missing /usr/bin/chromium fails the tests.
/// </summary>
public class ServerFixture : IAsyncLifetime
{
    /// <summary>Debian's chromium; PULSELADDER_CHROMIUM (set by tests/run-all.sh) may name another path.</summary>
    public static string ChromiumPath { get; } =
        Environment.GetEnvironmentVariable("PULSELADDER_CHROMIUM") is { Length: > 0 } p ? p : "/usr/bin/chromium";

    private Process? _server;
    private readonly StringBuilder _serverLog = new();
    private IPlaywright? _playwright;

    public const string AdminName = "bt-admin";

    /// <summary>A throw-away password of this run (never a default: the account is created per test run).</summary>
    public string AdminPassword { get; } = "bt-" + Guid.NewGuid().ToString("N");

    /// <summary>Extra `serve` options, e.g. --single-user.</summary>
    protected virtual string[] ServeOptions => [];

    /// <summary>Whether to create the admin account (with `pulseladder user add`) and an API token for <see cref="Http"/>.</summary>
    protected virtual bool CreateAccounts => true;

    public string BaseUrl { get; private set; } = "";
    public string DataDir { get; } = Path.Combine(Path.GetTempPath(), "plx-browser-" + Guid.NewGuid().ToString("N")[..10]);
    public HttpClient Http { get; private set; } = new();
    public IBrowser Browser { get; private set; } = null!;

    public static string ScreenshotDir
    {
        get
        {
            var dir = Path.Combine(AppContext.BaseDirectory, "TestResults", "screenshots");
            Directory.CreateDirectory(dir);
            return dir;
        }
    }

    public string ServerLog { get { lock (_serverLog) return _serverLog.ToString(); } }

    public virtual async Task InitializeAsync()
    {
        if (!File.Exists(ChromiumPath))
            throw new InvalidOperationException(
                $"Browser tests need Debian's chromium at {ChromiumPath} (apt-get install chromium); it is not there. " +
                "Playwright's own browser download is deliberately not used; set PULSELADDER_CHROMIUM to use another chromium binary.");
        Environment.SetEnvironmentVariable("PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD", "1");

        var dll = Path.Combine(AppContext.BaseDirectory, "pulseladder.dll");
        if (!File.Exists(dll)) throw new InvalidOperationException($"pulseladder.dll not found next to the tests ({dll}).");
        int port = FreePort();
        BaseUrl = $"http://127.0.0.1:{port}";
        Directory.CreateDirectory(DataDir);
        string? token = null;
        if (CreateAccounts)
        {
            // The first admin, made as a deployment makes it: the CLI on the server's database, password on stdin.
            await RunCliAsync(dll, ["user", "add", AdminName, "--role", "admin", "--password-stdin", "--data-dir", DataDir], AdminPassword + "\n");
            token = (await RunCliAsync(dll, ["user", "token", AdminName, "--label", "browser-tests", "--data-dir", DataDir], null)).Trim();
        }
        var psi = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = AppContext.BaseDirectory,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in new[] { dll, "serve", "--urls", BaseUrl, "--data-dir", DataDir }.Concat(ServeOptions)) psi.ArgumentList.Add(a);
        psi.Environment["DOTNET_NOLOGO"] = "1";
        _server = Process.Start(psi) ?? throw new InvalidOperationException("could not start the server");
        _server.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (_serverLog) _serverLog.AppendLine(e.Data); };
        _server.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (_serverLog) _serverLog.AppendLine(e.Data); };
        _server.BeginOutputReadLine();
        _server.BeginErrorReadLine();

        Http = new HttpClient { BaseAddress = new Uri(BaseUrl), Timeout = TimeSpan.FromSeconds(30) };
        if (token is not null) Http.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", token);
        await WaitUntil(async () =>
        {
            if (_server.HasExited) throw new InvalidOperationException($"server exited with {_server.ExitCode}:\n{ServerLog}");
            try { return (await Http.GetAsync("/health")).IsSuccessStatusCode; } catch (HttpRequestException) { return false; }
        }, TimeSpan.FromSeconds(40), "the server to answer /health");

        _playwright = await Playwright.CreateAsync();
        Browser = await _playwright.Chromium.LaunchAsync(new BrowserTypeLaunchOptions
        {
            ExecutablePath = ChromiumPath,
            Headless = true,
            Args = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                "--disable-component-update", "--disable-sync"],
        });
    }

    public virtual async Task DisposeAsync()
    {
        if (Browser is not null) await Browser.CloseAsync();
        _playwright?.Dispose();
        Http.Dispose();
        if (_server is { HasExited: false })
        {
            _server.Kill(entireProcessTree: true);
            await _server.WaitForExitAsync();
        }
        _server?.Dispose();
        try { Directory.Delete(DataDir, recursive: true); } catch (IOException) { } catch (UnauthorizedAccessException) { }
    }

    /// <summary>
    /// A page at 1280x800 whose console errors and failed requests are collected. <paramref name="signIn"/>: the
    /// context is signed in as the admin first (POST /api/v1/session through the context, so it holds the cookie;
    /// the sign-in page itself has its own test).
    /// </summary>
    public async Task<(IPage Page, List<string> Problems)> NewPageAsync(bool signIn = true)
    {
        var context = await Browser.NewContextAsync(new BrowserNewContextOptions
        {
            ViewportSize = new ViewportSize { Width = 1280, Height = 800 },
            BaseURL = BaseUrl,
        });
        if (signIn && CreateAccounts)
        {
            var res = await context.APIRequest.PostAsync("/api/v1/session", new APIRequestContextOptions { DataObject = new { name = AdminName, password = AdminPassword } });
            if (res.Status != 200) throw new InvalidOperationException($"sign-in failed: {res.Status} {await res.TextAsync()}");
        }
        var page = await context.NewPageAsync();
        var problems = new List<string>();
        page.Console += (_, m) => { if (m.Type == "error") lock (problems) problems.Add("console: " + m.Text); };
        page.PageError += (_, e) => { lock (problems) problems.Add("page error: " + e); };
        page.RequestFailed += (_, r) => { lock (problems) problems.Add($"request failed: {r.Url} {r.Failure}"); };
        return (page, problems);
    }

    public static Task ShotAsync(IPage page, string name) =>
        page.ScreenshotAsync(new PageScreenshotOptions { Path = Path.Combine(ScreenshotDir, name + ".png"), FullPage = true });

    /// <summary>Uploads a star list and photometry through the API (the upload page has its own test).</summary>
    public async Task<long> UploadAsync(string starList, string photometry, string name)
    {
        using var form = new MultipartFormDataContent();
        form.Add(new StringContent(starList), "stars", $"{name}-stars.csv");
        form.Add(new StringContent(photometry), "photometry", $"{name}-phot.csv");
        form.Add(new StringContent("bjd_tdb"), "time_scale");
        var res = await Http.PostAsync("/api/v1/uploads", form);
        var body = await res.Content.ReadAsStringAsync();
        if (res.StatusCode != HttpStatusCode.Created) throw new InvalidOperationException($"upload refused: {(int)res.StatusCode} {body}");
        using var doc = JsonDocument.Parse(body);
        return doc.RootElement.GetProperty("upload_id").GetInt64();
    }

    public async Task WaitForUploadAsync(long uploadId, TimeSpan timeout)
    {
        await WaitUntil(async () =>
        {
            var st = await Http.GetFromJsonAsync<JsonElement>($"/api/v1/uploads/{uploadId}");
            return st.GetProperty("state").GetString() == "done";
        }, timeout, $"upload {uploadId} to be analysed");
    }

    public async Task<long> FieldIdAsync(string name)
    {
        var fields = await Http.GetFromJsonAsync<JsonElement>("/api/v1/fields");
        foreach (var f in fields.EnumerateArray())
            if (f.GetProperty("name").GetString() == name) return f.GetProperty("field_id").GetInt64();
        throw new InvalidOperationException($"no field {name}");
    }

    public async Task<JsonElement> StarRowAsync(string fieldName, string star)
    {
        long fid = await FieldIdAsync(fieldName);
        var page = await Http.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fid}/stars?q={Uri.EscapeDataString(star)}");
        foreach (var r in page.GetProperty("items").EnumerateArray())
            if (r.GetProperty("star").GetString() == star) return r;
        throw new InvalidOperationException($"no star {star} in {fieldName}");
    }

    public async Task WaitUntil(Func<Task<bool>> condition, TimeSpan timeout, string what)
    {
        var end = DateTime.UtcNow + timeout; // test harness timing, not product code
        while (DateTime.UtcNow < end)
        {
            if (await condition()) return;
            await Task.Delay(250);
        }
        throw new TimeoutException($"timed out waiting for {what}. Server log tail:\n{Tail(ServerLog, 3000)}");
    }

    /// <summary>Runs `dotnet pulseladder.dll ARGS` to completion and returns its standard output.</summary>
    private static async Task<string> RunCliAsync(string dll, IEnumerable<string> args, string? stdin)
    {
        var psi = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = AppContext.BaseDirectory, RedirectStandardOutput = true, RedirectStandardError = true,
            RedirectStandardInput = true, UseShellExecute = false,
        };
        psi.ArgumentList.Add(dll);
        foreach (var a in args) psi.ArgumentList.Add(a);
        psi.Environment["DOTNET_NOLOGO"] = "1";
        using var p = Process.Start(psi) ?? throw new InvalidOperationException("could not start pulseladder");
        if (stdin is not null) await p.StandardInput.WriteAsync(stdin);
        p.StandardInput.Close();
        var output = p.StandardOutput.ReadToEndAsync();
        var error = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        if (p.ExitCode != 0) throw new InvalidOperationException($"pulseladder {string.Join(' ', args)} exited with {p.ExitCode}: {await error}");
        return await output;
    }

    private static string Tail(string s, int n) => s.Length <= n ? s : s[^n..];

    private static int FreePort()
    {
        var l = new TcpListener(IPAddress.Loopback, 0);
        l.Start();
        int port = ((IPEndPoint)l.LocalEndpoint).Port;
        l.Stop();
        return port;
    }
}

/// <summary>A server seeded with three synthetic Cepheids in field BT-FOLD, analysed before the tests start.</summary>
public sealed class SeededServerFixture : ServerFixture
{
    public const string Field = "BT-FOLD";

    internal static readonly SyntheticStar[] Stars =
    [
        new("BT-FOLD-001", 5.3712, 15.10, 0.70, 80.10, -69.30),
        new("BT-FOLD-002", 3.2145, 15.70, 0.55, 80.25, -69.41),
        new("BT-FOLD-003", 9.0831, 14.55, 0.85, 80.40, -69.52),
    ];

    public override async Task InitializeAsync()
    {
        await base.InitializeAsync();
        long id = await UploadAsync(SyntheticCepheids.StarList(Field, Stars), SyntheticCepheids.Photometry(Stars), "seed");
        await WaitForUploadAsync(id, TimeSpan.FromSeconds(90));
    }
}

[CollectionDefinition("browser", DisableParallelization = true)]
public sealed class BrowserCollection;
