using PulseLadder.Cli.Commands;
using Spectre.Console.Cli;

var app = new CommandApp();
app.Configure(c =>
{
    c.SetApplicationName("pulseladder");
    c.AddCommand<ServeCommand>("serve").WithDescription("Run the web service with its job server (embedded default: SQLite + in-memory queue).");
    c.AddCommand<WorkCommand>("work").WithDescription("Run only a job server (scale-out: PostgreSQL data and queue).");
    c.AddCommand<AnalyzeCommand>("analyze").WithDescription("Analyse photometry files offline, without a server.");
    c.AddCommand<UploadCommand>("upload").WithDescription("Upload a star list and photometry to a running server.");
    c.AddCommand<StatusCommand>("status").WithDescription("Show analysis progress of a running server.");
    c.AddCommand<ExportCommand>("export").WithDescription("Download a field's distance estimates.");
    c.AddCommand<BenchThroughputCommand>("bench-throughput").WithDescription("Measure end-to-end stars/s, queue cost per job, ingest rate and upload peak memory (issue 8).");
    c.AddCommand<BenchPipelineCommand>("bench-pipeline").WithDescription("Measure the star pipeline per stage on the demo campaign.");
    c.AddCommand<ReproduceCommand>("reproduce").WithDescription("Rerun a star's stored analysis from the database and report any difference.");
    c.AddCommand<DemoDataCommand>("demo-data").WithDescription("Write the invented demo campaign to a folder.");
    c.PropagateExceptions();
});
try
{
    return app.Run(args);
}
catch (Exception e) when (e is CommandAppException or InvalidOperationException or FileNotFoundException or HttpRequestException or PulseLadder.Storage.SchemaMismatchException)
{
    Console.Error.WriteLine("pulseladder: " + e.Message);
    return 2;
}
