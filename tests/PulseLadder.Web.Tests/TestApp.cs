using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using PulseLadder.Core.Pipeline;
using PulseLadder.Storage;
using PulseLadder.Web;

namespace PulseLadder.Web.Tests;

/// <summary>The real web host (embedded default) on an in-process test server, each with its own data folder.</summary>
public sealed class TestApp : IAsyncDisposable
{
    public WebApplication App { get; }
    public HttpClient Client { get; }
    public string DataDir { get; }
    public Database Db => App.Services.GetRequiredService<Database>();

    private TestApp(WebApplication app, string dataDir)
    {
        App = app;
        DataDir = dataDir;
        Client = app.GetTestClient();
    }

    public static async Task<TestApp> StartAsync(string? dataDir = null, bool runJobs = true, int workers = 2, IEnumerable<string>? extraArgs = null)
    {
        dataDir ??= Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"));
        var app = PulseLadderWeb.Build(
            ["--PulseLadder:DataDir", dataDir, "--PulseLadder:Jobs:RunServer", runJobs ? "true" : "false",
             "--PulseLadder:Jobs:Workers", workers.ToString(System.Globalization.CultureInfo.InvariantCulture), "--Logging:LogLevel:Default", "Warning",
             .. extraArgs ?? []],
            b => b.WebHost.UseTestServer());
        await app.StartAsync();
        return new TestApp(app, dataDir);
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

    public async ValueTask DisposeAsync()
    {
        Client.Dispose();
        await App.StopAsync();
        await App.DisposeAsync();
    }
}
