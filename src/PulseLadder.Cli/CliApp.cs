using PulseLadder.Cli.Commands;
using Spectre.Console.Cli;

namespace PulseLadder.Cli;

/// <summary>Makes the <see cref="ServerClient"/> a server command talks to (tests hand in an in-process server).</summary>
public interface IServerClientFactory
{
    /// <param name="token">The command's <c>--token</c>; null: PULSELADDER_TOKEN (see <see cref="ServerClient"/>).</param>
    ServerClient Create(string server, string? token);
}

/// <summary>The default: an HTTP client of the URL given by <c>--server</c>.</summary>
public sealed class UrlServerClientFactory : IServerClientFactory
{
    public ServerClient Create(string server, string? token) => new(server, token);
}

/// <summary>The <c>pulseladder</c> command tree; Program.cs runs it, tests run it in-process.</summary>
public static class CliApp
{
    public static CommandApp Create(IServerClientFactory? clients = null)
    {
        var app = new CommandApp();
        app.Configure(c =>
        {
            c.Settings.Registrar.RegisterInstance<IServerClientFactory>(clients ?? new UrlServerClientFactory());
            c.SetApplicationName("pulseladder");
            c.AddCommand<ServeCommand>("serve").WithDescription("Run the web service with its job server (embedded default: SQLite + in-memory queue).");
            c.AddCommand<WorkCommand>("work").WithDescription("Run only a job server (scale-out: PostgreSQL data and queue).");
            c.AddCommand<AnalyzeCommand>("analyze").WithDescription("Analyse photometry files offline, without a server.");
            c.AddCommand<UploadCommand>("upload").WithDescription("Upload a star list and photometry to a running server.");
            c.AddCommand<StatusCommand>("status").WithDescription("Show analysis progress of a running server.");
            c.AddCommand<ExportCommand>("export").WithDescription("Download a field's distance estimates (or a figure with --figure).");
            c.AddCommand<BenchThroughputCommand>("bench-throughput").WithDescription("Measure end-to-end stars/s, queue cost per job, ingest rate and upload peak memory.");
            c.AddCommand<BenchPipelineCommand>("bench-pipeline").WithDescription("Measure the star pipeline per stage on the demo campaign.");
            c.AddCommand<ReproduceCommand>("reproduce").WithDescription("Rerun a star's stored analysis from the database and report any difference.");
            c.AddBranch("user", u =>
            {
                u.SetDescription("Accounts on the server's database (works directly on the database, like serve).");
                u.AddCommand<UserAddCommand>("add").WithDescription("Create an account; the password is read from standard input.");
                u.AddCommand<UserTokenCommand>("token").WithDescription("Create a personal API token for an account and print it once.");
            });
            c.AddCommand<BackupCommand>("backup").WithDescription("Write a consistent snapshot of the SQLite database, safe while the service runs.");
            c.AddCommand<DemoDataCommand>("demo-data").WithDescription("Write the invented demo campaign to a folder.");
            c.PropagateExceptions();
        });
        return app;
    }
}
