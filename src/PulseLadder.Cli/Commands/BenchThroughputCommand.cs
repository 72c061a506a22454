using System.ComponentModel;
using System.Diagnostics;
using System.Globalization;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using Hangfire;
using Hangfire.InMemory;
using Hangfire.PostgreSql;
using Hangfire.PostgreSql.Factories;
using Microsoft.Extensions.Logging.Abstractions;
using Npgsql;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Demo;
using PulseLadder.Jobs;
using PulseLadder.Storage;
using PulseLadder.Web;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary>
/// Issue 8's figures in one command: end-to-end stars/s (upload to last stored result) for embedded and scaled mode
/// with 1 and 2 workers (child processes of this program), the analysis job's own time, the queue's cost per job
/// (no-op jobs through Hangfire in-memory and PostgreSQL storage), ingest rate into SQLite and PostgreSQL, and the
/// web process's peak resident memory (VmHWM) for a large generated upload. A measuring command, never a test.
/// </summary>
public sealed class BenchThroughputCommand : Command<BenchThroughputCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--stars <N>"), Description("Demo stars for the end-to-end runs (default 300).")]
        public int Stars { get; init; } = 300;

        [CommandOption("--warmup-stars <N>"), Description("End-to-end runs first upload and analyse this many other stars in the same processes, so the figures are a running service's, not its start-up's (JIT); 0 = fresh processes (default 100).")]
        public int WarmupStars { get; init; } = 100;

        [CommandOption("--epochs <N>"), Description("Epochs per band, two bands per star (default 300, issue 8's reference star).")]
        public int Epochs { get; init; } = 300;

        [CommandOption("--postgres <CS>"), Description("Admin connection string of a PostgreSQL server for the scaled modes and PostgreSQL ingest; a fresh database is created per run.")]
        public string? Postgres { get; init; }

        [CommandOption("--parts <LIST>"), Description("Comma list of: e2e, job, queue, ingest, upload (default all).")]
        public string Parts { get; init; } = "e2e,job,queue,ingest,upload";

        [CommandOption("--modes <LIST>"), Description("End-to-end modes (default embedded-1,embedded-2,scaled-1,scaled-2; scaled needs --postgres).")]
        public string Modes { get; init; } = "embedded-1,embedded-2,scaled-1,scaled-2";

        [CommandOption("--queue-jobs <N>"), Description("No-op jobs per queue measurement (default 2000).")]
        public int QueueJobs { get; init; } = 2000;

        [CommandOption("--ingest-rows <N>"), Description("Observations per ingest measurement (default 1000000).")]
        public int IngestRows { get; init; } = 1_000_000;

        [CommandOption("--upload-mb <N>"), Description("Size of the generated upload for the peak-memory figure, MB (default 1024).")]
        public int UploadMb { get; init; } = 1024;
    }

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        var parts = s.Parts.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).ToHashSet(StringComparer.OrdinalIgnoreCase);
        string work = Path.Combine(Path.GetTempPath(), "pulseladder-bench-tp-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(work);
        Console.WriteLine(F($"machine: {Environment.ProcessorCount} cores, load average at start: {LoadAverage()}"));
        try
        {
            var (starsCsv, photCsv, nStars, nObs) = WriteCampaign(work, s.Stars, s.Epochs);
            Console.WriteLine(F($"campaign: {nStars} stars with photometry, {nObs} observations ({nObs / Math.Max(1, nStars)} per star: 2 bands x {s.Epochs} epochs)"));
            (string Stars, string Phot)? warm = null;
            if (parts.Contains("e2e") && s.WarmupStars > 0)
            {
                var w = WriteCampaign(work, Math.Max(30, s.WarmupStars), s.Epochs, "warmup-");
                warm = (w.Stars, w.Phot);
            }
            double? jobMs = null;
            if (parts.Contains("job")) jobMs = DirectJobs(work, starsCsv, photCsv);
            if (parts.Contains("e2e"))
                foreach (var mode in s.Modes.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
                {
                    if (mode.StartsWith("scaled", StringComparison.Ordinal) && s.Postgres is null) { Console.WriteLine($"{mode}: skipped (no --postgres)"); continue; }
                    EndToEnd(work, mode, starsCsv, photCsv, warm, s.Postgres, ct);
                }
            if (parts.Contains("queue"))
            {
                double mem = QueueCost("inmemory", new InMemoryStorage(), s.QueueJobs);
                if (jobMs is { } j) Console.WriteLine(F($"  in-memory queue: {100 * mem / j:F2}% of one star's {j:F2} ms analysis; {100 * mem / (j * new JobsOptions().EffectiveBatchSize):F2}% of a default batch of {new JobsOptions().EffectiveBatchSize} stars"));
                if (s.Postgres is not null)
                {
                    string cs = CreateDatabase(s.Postgres, "plx_bench_queue");
                    var opts = new PostgreSqlStorageOptions
                    {
                        SchemaName = "hangfire", PrepareSchemaIfNecessary = true, InvisibilityTimeout = TimeSpan.FromSeconds(30),
                        UseSlidingInvisibilityTimeout = true, QueuePollInterval = TimeSpan.FromMilliseconds(200),
                    };
                    double pg = QueueCost("postgres", new PostgreSqlStorage(new NpgsqlConnectionFactory(cs, opts), opts), s.QueueJobs);
                    int batch = new JobsOptions { Storage = "postgres" }.EffectiveBatchSize;
                    if (jobMs is { } j2) Console.WriteLine(F($"  PostgreSQL queue: {100 * pg / j2:F2}% of one star's {j2:F2} ms analysis; {100 * pg / (j2 * batch):F2}% of a default batch of {batch} stars"));
                    DropDatabase(s.Postgres, cs);
                }
            }
            if (parts.Contains("ingest"))
            {
                Ingest(work, "sqlite", null, s.IngestRows);
                if (s.Postgres is not null) Ingest(work, "postgres", s.Postgres, s.IngestRows);
            }
            if (parts.Contains("upload")) PeakUploadMemory(work, s.UploadMb, ct);
        }
        finally
        {
            try { Directory.Delete(work, true); } catch (IOException) { }
        }
        Console.WriteLine(F($"load average at end: {LoadAverage()}"));
        return 0;
    }

    internal static string LoadAverage() => File.Exists("/proc/loadavg") ? string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "n/a";

    /// <summary>Demo campaign reshaped to two bands x <paramref name="epochs"/> per star, as one photometry CSV; star and
    /// field names get <paramref name="prefix"/> (a second campaign that does not touch the first's stars).</summary>
    private static (string Stars, string Phot, int NStars, long NObs) WriteCampaign(string work, int stars, int epochs, string prefix = "")
    {
        string dir = Path.Combine(work, prefix + "demo");
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = stars });
        var obs = new Dictionary<string, List<Observation>>(StringComparer.Ordinal);
        var (_, list) = UploadParsing.ReadStars(new IncomingFile("stars.csv", File.ReadAllBytes(Path.Combine(dir, "stars.csv"))));
        var known = list.Rows.Select(x => x.Name).ToHashSet(StringComparer.Ordinal);
        foreach (var f in Directory.GetFiles(dir, "photometry-*.csv"))
        {
            var p = UploadParsing.ReadPhotometry(new IncomingFile(f, File.ReadAllBytes(f)), TimeScale.JdUtc, DemoCampaign.TimeOffset, known, null, null, null, int.MaxValue);
            foreach (var r in p.Result.Rows)
            {
                if (!obs.TryGetValue(r.Star, out var l)) obs[r.Star] = l = [];
                l.Add(r.Observation);
            }
        }
        string phot = Path.Combine(work, prefix + "photometry.csv");
        long n = 0;
        using (var w = new StreamWriter(phot, false, new UTF8Encoding(false)))
        {
            w.Write("star,time,band,mag,mag_err,observer\n");
            foreach (var (star, o) in obs.OrderBy(x => x.Key, StringComparer.Ordinal))
                foreach (var x in BenchPipelineCommand.Reshape(o, epochs))
                {
                    w.Write(F($"{prefix}{star},{x.Time - DemoCampaign.TimeOffset:F6},{x.Band},{x.Mag:F4},{x.MagErr:F4},{x.Observer}\n"));
                    n++;
                }
        }
        string starsCsv = Path.Combine(work, prefix + "stars.csv");
        var lines = File.ReadAllLines(Path.Combine(dir, "stars.csv"));
        // star and field are the first two columns of the demo star list.
        File.WriteAllLines(starsCsv, lines.Select((l, i) =>
        {
            if (i == 0 || prefix.Length == 0) return l;
            int c = l.IndexOf(',');
            return prefix + l[..(c + 1)] + prefix + l[(c + 1)..];
        }));
        Directory.Delete(dir, true);
        return (starsCsv, phot, obs.Count, n);
    }

    private static IncomingFile Incoming(string path) => new(Path.GetFileName(path), File.ReadAllBytes(path));

    /// <summary>Stores the campaign straight into a fresh SQLite database (no HTTP, no queue).</summary>
    private static (Database Db, UploadOutcome Outcome) Load(string dbPath, string starsCsv, string photCsv)
    {
        var db = Database.FromSetting("sqlite:" + dbPath);
        db.Migrate(TimeProvider.System);
        var (sha, stars) = UploadParsing.ReadStars(Incoming(starsCsv));
        var known = stars.Rows.Select(x => x.Name).ToHashSet(StringComparer.Ordinal);
        var p = UploadParsing.ReadPhotometry(Incoming(photCsv), TimeScale.JdUtc, DemoCampaign.TimeOffset, known, null, null, null, int.MaxValue);
        var outcome = UploadWriter.Store(db, new StarListFile("stars.csv", sha, stars.Rows),
            [new PhotometryFile("photometry.csv", p.Sha256, TimeScale.JdUtc, DemoCampaign.TimeOffset, p.Result.Rows)], "bench", TimeProvider.System);
        return (db, outcome);
    }

    private sealed class NoQueue : IAnalysisQueue
    {
        public void EnqueueStar(long starId, long revision) { }
        public void EnqueueFieldSummary(long fieldId) { }
    }

    /// <summary>The analysis job run directly, one thread, every star once: its own cost without any queue.</summary>
    private static double DirectJobs(string work, string starsCsv, string photCsv)
    {
        var (db, outcome) = Load(Path.Combine(work, "direct.db"), starsCsv, photCsv);
        var job = new AnalyzeStarJob(db, new NoQueue(), TimeProvider.System, NullLogger<AnalyzeStarJob>.Instance);
        // One warm-up pass over every star (the code tiered up, as in a long-running worker), then the results are removed
        // so every star is analysed again in the timed pass.
        foreach (var (id, rev) in outcome.StarsToAnalyse) job.Run(id, rev);
        using (var c = db.Open())
        using (var cmd = c.CreateCommand()) { cmd.CommandText = "DELETE FROM analyses"; cmd.ExecuteNonQuery(); }
        var cpu = new BenchPipelineCommand.CpuClock();
        int gen0 = GC.CollectionCount(0), gen1 = GC.CollectionCount(1), gen2 = GC.CollectionCount(2);
        long allocated = GC.GetAllocatedBytesForCurrentThread();
        cpu.Restart();
        var sw = Stopwatch.StartNew();
        foreach (var (id, rev) in outcome.StarsToAnalyse) job.Run(id, rev);
        int n = outcome.StarsToAnalyse.Count;
        double ms = sw.Elapsed.TotalMilliseconds / n;
        double cpuMs = cpu.ElapsedMs / n;
        Console.WriteLine(F($"analysis job without queue (AnalyzeStarJob.Run, SQLite, 1 thread): {ms:F2} ms/star wall, {cpuMs:F2} CPU ms/star -> at most {1000 / cpuMs:F0} stars/s per core; load {LoadAverage()}"));
        Console.WriteLine(F($"  allocated {(GC.GetAllocatedBytesForCurrentThread() - allocated) / 1024.0 / n:F0} KiB/star; collections per 100 stars: gen0 {100.0 * (GC.CollectionCount(0) - gen0) / n:F1}, gen1 {100.0 * (GC.CollectionCount(1) - gen1) / n:F1}, gen2 {100.0 * (GC.CollectionCount(2) - gen2) / n:F1}"));
        return cpuMs;
    }

    public static class QueueProbe
    {
        private static int _done;
        public static int Done => Volatile.Read(ref _done);
        public static void Tick() => Interlocked.Increment(ref _done);
        public static void Reset() => Volatile.Write(ref _done, 0);
    }

    /// <summary>Per-job cost of the queue alone: no-op jobs enqueued, one worker thread, time until all have run.</summary>
    private static double QueueCost(string name, JobStorage storage, int jobs)
    {
        QueueProbe.Reset();
        var client = new BackgroundJobClient(storage);
        var options = new BackgroundJobServerOptions
        {
            WorkerCount = 1, Queues = ["summary", "analysis", "default"], SchedulePollingInterval = TimeSpan.FromSeconds(1),
        };
        var cpu0 = Process.GetCurrentProcess().TotalProcessorTime;
        int gen2 = GC.CollectionCount(2), gen0 = GC.CollectionCount(0);
        var sw = Stopwatch.StartNew();
        for (int i = 0; i < jobs; i++) client.Enqueue(() => QueueProbe.Tick());
        double enqueueMs = sw.Elapsed.TotalMilliseconds;
        sw.Restart();
        using (var server = new BackgroundJobServer(options, storage))
        {
            while (QueueProbe.Done < jobs) Thread.Sleep(5);
            double runMs = sw.Elapsed.TotalMilliseconds;
            double cpuMs = (Process.GetCurrentProcess().TotalProcessorTime - cpu0).TotalMilliseconds;
            double perJob = (enqueueMs + runMs) / jobs;
            Console.WriteLine(F($"queue {name}: {jobs} no-op jobs, enqueue {enqueueMs / jobs:F3} ms/job, fetch+run+state changes {runMs / jobs:F3} ms/job (1 worker), total {perJob:F3} ms/job wall, {cpuMs / jobs:F3} CPU ms/job (this process); collections per 1000 jobs: gen0 {1000.0 * (GC.CollectionCount(0) - gen0) / jobs:F0}, gen2 {1000.0 * (GC.CollectionCount(2) - gen2) / jobs:F0}; load {LoadAverage()}"));
            return perJob;
        }
    }

    private static void Ingest(string work, string kind, string? admin, int rows)
    {
        // Rows as the parser returns them: 1000 stars, 2 bands, 3 observers.
        var stars = Enumerable.Range(0, 1000).Select(i => new StarInfo(F($"B{i:D4}"), "bench", Core.Quantities.SkyPosition.FromDegrees(10 + i * 0.001, -30))).ToList();
        var list = new List<PhotometryRow>(rows);
        string[] bands = ["V", "I"], observers = ["o1", "o2", "o3"];
        for (int i = 0; i < rows; i++)
        {
            var o = new Observation(0, 2460000 + i * 1e-3, TimeScale.JdUtc, bands[i & 1], 15 + (i % 97) * 1e-3, 0.01, observers[i % 3], null);
            list.Add(new PhotometryRow(stars[i % stars.Count].Name, o, i + 2));
        }
        string cs = kind == "sqlite" ? "sqlite:" + Path.Combine(work, "ingest.db") : "postgres:" + CreateDatabase(admin!, "plx_bench_ingest");
        var db = Database.FromSetting(cs);
        db.Migrate(TimeProvider.System);
        var cpu = new BenchPipelineCommand.CpuClock();
        cpu.Restart();
        var gc = GcCounts.Now();
        var sw = Stopwatch.StartNew();
        var outcome = UploadWriter.Store(db, new StarListFile("stars.csv", new string('0', 64), stars),
            [new PhotometryFile("phot.csv", new string('1', 64), TimeScale.JdUtc, 0, list)], "bench", TimeProvider.System);
        double sec = sw.Elapsed.TotalSeconds, cpuSec = cpu.ElapsedMs / 1000;
        Console.WriteLine(F($"ingest {kind}: {outcome.ObservationsAdded} observations stored (UploadWriter.Store, one transaction) in {sec:F2} s = {outcome.ObservationsAdded / sec:F0} obs/s wall, {outcome.ObservationsAdded / cpuSec:F0} obs/s per CPU second of this thread; {GcCounts.Now().Since(gc)}; load {LoadAverage()}"));
        // On SQLite the WAL checkpoint of a large load runs after the commit on a background connection: timed here
        // too, so the figure above is not read as the whole cost.
        var checkpoint = Stopwatch.StartNew();
        UploadWriter.LastBackgroundCheckpoint.Wait();
        if (kind == "sqlite")
            Console.WriteLine(F($"  background WAL checkpoint after the commit: finished {checkpoint.Elapsed.TotalSeconds:F2} s after Store returned; store + checkpoint = {outcome.ObservationsAdded / (sec + checkpoint.Elapsed.TotalSeconds):F0} obs/s wall"));
        // A later upload a tenth that size into the filled table: under ObservationStore.DeferIndexes's quarter, so on
        // SQLite the indexes are kept and updated row by row (the first load, into an empty table, rebuilds them once).
        var more = list.Take(rows / 10).Select(r => r with { Observation = r.Observation with { Time = r.Observation.Time + 1000 } }).ToList();
        cpu.Restart();
        gc = GcCounts.Now();
        sw.Restart();
        var second = UploadWriter.Store(db, null, [new PhotometryFile("phot2.csv", new string('2', 64), TimeScale.JdUtc, 0, more)], "bench", TimeProvider.System);
        sec = sw.Elapsed.TotalSeconds;
        cpuSec = cpu.ElapsedMs / 1000;
        Console.WriteLine(F($"ingest {kind}, second upload into the filled table: {second.ObservationsAdded} observations in {sec:F2} s = {second.ObservationsAdded / sec:F0} obs/s wall, {second.ObservationsAdded / cpuSec:F0} obs/s per CPU second of this thread; {GcCounts.Now().Since(gc)}; load {LoadAverage()}"));
        if (kind == "postgres") DropDatabase(admin!, cs["postgres:".Length..]);
    }

    /// <summary>Collections and GC pause time so far, to show what the GC cost during one measured store.</summary>
    private readonly record struct GcCounts(int Gen0, int Gen2, TimeSpan Pause)
    {
        public static GcCounts Now() => new(GC.CollectionCount(0), GC.CollectionCount(2), GC.GetTotalPauseDuration());

        public string Since(GcCounts before) =>
            F($"GC during the store: gen0 {Gen0 - before.Gen0}, gen2 {Gen2 - before.Gen2}, pause {(Pause - before.Pause).TotalSeconds:F3} s");
    }

    private static string CreateDatabase(string admin, string prefix)
    {
        string name = prefix + "_" + Guid.NewGuid().ToString("N")[..8];
        using (var c = new NpgsqlConnection(admin))
        {
            c.Open();
            using var cmd = new NpgsqlCommand($"CREATE DATABASE {name}", c);
            cmd.ExecuteNonQuery();
        }
        return new NpgsqlConnectionStringBuilder(admin) { Database = name }.ConnectionString;
    }

    private static void DropDatabase(string admin, string cs)
    {
        string name = new NpgsqlConnectionStringBuilder(cs).Database!;
        NpgsqlConnection.ClearAllPools();
        using var c = new NpgsqlConnection(admin);
        c.Open();
        using var cmd = new NpgsqlCommand($"DROP DATABASE IF EXISTS {name} WITH (FORCE)", c);
        cmd.ExecuteNonQuery();
    }

    // ---- child processes -------------------------------------------------------------------------------------------

    private static Process Start(string work, string logName, params string[] args) => Start(work, logName, null, args);

    private static Process Start(string work, string logName, IReadOnlyDictionary<string, string>? env, params string[] args)
    {
        var psi = new ProcessStartInfo(Environment.ProcessPath ?? "dotnet")
        {
            RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false,
        };
        if (Path.GetFileNameWithoutExtension(psi.FileName) == "dotnet") psi.ArgumentList.Add(typeof(BenchThroughputCommand).Assembly.Location);
        foreach (var a in args) psi.ArgumentList.Add(a);
        if (env is not null) foreach (var (k, v) in env) psi.Environment[k] = v;
        var p = Process.Start(psi)!;
        var log = new StreamWriter(Path.Combine(work, logName)) { AutoFlush = true };
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (log) log.WriteLine(e.Data); };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (log) log.WriteLine(e.Data); };
        p.BeginOutputReadLine(); p.BeginErrorReadLine();
        return p;
    }

    private static int FreePort()
    {
        var l = new System.Net.Sockets.TcpListener(System.Net.IPAddress.Loopback, 0);
        l.Start();
        int port = ((System.Net.IPEndPoint)l.LocalEndpoint).Port;
        l.Stop();
        return port;
    }

    private static void WaitHealthy(HttpClient http, Process p)
    {
        var sw = Stopwatch.StartNew();
        while (sw.Elapsed < TimeSpan.FromSeconds(120))
        {
            if (p.HasExited) throw new InvalidOperationException("The web process exited during start-up.");
            try { if (http.GetAsync("/health").GetAwaiter().GetResult().IsSuccessStatusCode) return; }
            catch (HttpRequestException) { }
            Thread.Sleep(200);
        }
        throw new InvalidOperationException("The web process did not become healthy.");
    }

    private static HttpResponseMessage Upload(HttpClient http, string? starsCsv, string photCsv)
    {
        using var form = new MultipartFormDataContent();
        Stream? s1 = starsCsv is null ? null : File.OpenRead(starsCsv);
        using var s2 = File.OpenRead(photCsv);
        if (s1 is not null) form.Add(new StreamContent(s1), "stars", Path.GetFileName(starsCsv)!);
        form.Add(new StreamContent(s2), "photometry", Path.GetFileName(photCsv));
        form.Add(new StringContent("jd_utc"), "time_scale");
        form.Add(new StringContent(DemoCampaign.TimeOffset.ToString(CultureInfo.InvariantCulture)), "time_offset");
        var r = http.PostAsync("/api/v1/uploads", form).GetAwaiter().GetResult();
        s1?.Dispose();
        return r;
    }

    private static (long Done, long Total) Progress(HttpClient http)
    {
        var j = http.GetFromJsonAsync<JsonElement>("/api/v1/progress").GetAwaiter().GetResult();
        return (j.GetProperty("stars_done").GetInt64(), j.GetProperty("stars_total").GetInt64());
    }

    /// <summary>User + system CPU time of the web and worker processes so far (ms): less disturbed by other load than wall time.</summary>
    private static double ProcessCpuMs(IEnumerable<Process> ps)
    {
        double ms = 0;
        foreach (var p in ps) { p.Refresh(); ms += p.TotalProcessorTime.TotalMilliseconds; }
        return ms;
    }

    private static void Kill(IEnumerable<Process> ps)
    {
        foreach (var p in ps)
        {
            try { if (!p.HasExited) p.Kill(entireProcessTree: true); p.WaitForExit(10_000); } catch (InvalidOperationException) { }
            p.Dispose();
        }
    }

    private static void EndToEnd(string work, string mode, string starsCsv, string photCsv, (string Stars, string Phot)? warmup, string? admin, CancellationToken ct)
    {
        bool scaled = mode.StartsWith("scaled", StringComparison.Ordinal);
        int workers = int.Parse(mode[(mode.LastIndexOf('-') + 1)..], CultureInfo.InvariantCulture);
        int port = FreePort();
        string url = F($"http://127.0.0.1:{port}");
        var procs = new List<Process>();
        string? cs = null;
        try
        {
            if (!scaled)
                procs.Add(Start(work, mode + "-web.log", "serve", "--single-user", "--urls", url, "--data-dir", Path.Combine(work, mode), "--workers", workers.ToString(CultureInfo.InvariantCulture)));
            else
            {
                cs = CreateDatabase(admin!, "plx_bench_e2e");
                procs.Add(Start(work, mode + "-web.log", "serve", "--single-user", "--urls", url, "--database", "postgres:" + cs, "--jobs", "postgres", "--no-jobs",
                    "--data-dir", Path.Combine(work, mode)));
            }
            using var http = new HttpClient { BaseAddress = new Uri(url), Timeout = TimeSpan.FromMinutes(30) };
            WaitHealthy(http, procs[0]);
            if (scaled)
            {
                for (int i = 0; i < workers; i++)
                    procs.Add(Start(work, F($"{mode}-w{i}.log"), "work", "--database", "postgres:" + cs, "--workers", "1"));
                // Let the workers start and begin polling before the clock starts (their start-up is not throughput).
                Thread.Sleep(8000);
            }
            if (warmup is { } w)
            {
                // A running service's figures: the processes first analyse another campaign (JIT, pools, caches), then
                // settle (the warm-up fields' passes) before the clock starts.
                using (var r = Upload(http, w.Stars, w.Phot))
                    if (!r.IsSuccessStatusCode) throw new InvalidOperationException($"{mode}: warm-up upload failed: {(int)r.StatusCode}");
                var ws = Stopwatch.StartNew();
                while (Progress(http) is var (d, t) && !(t > 0 && d >= t))
                {
                    if (ws.Elapsed > TimeSpan.FromMinutes(10)) throw new InvalidOperationException($"{mode}: warm-up not done after 10 minutes.");
                    Thread.Sleep(100);
                }
                Thread.Sleep(3000);
            }
            long before = warmup is null ? 0 : Progress(http).Total;
            double cpu0 = ProcessCpuMs(procs);
            var sw = Stopwatch.StartNew();
            using (var r = Upload(http, starsCsv, photCsv))
                if (!r.IsSuccessStatusCode) throw new InvalidOperationException($"{mode}: upload failed: {(int)r.StatusCode} {r.Content.ReadAsStringAsync(ct).GetAwaiter().GetResult()}");
            double upload = sw.Elapsed.TotalSeconds;
            long done, total;
            while (true)
            {
                (done, total) = Progress(http);
                if (total > before && done >= total) break;
                if (sw.Elapsed > TimeSpan.FromMinutes(30)) throw new InvalidOperationException($"{mode}: not done after 30 minutes ({done}/{total}).");
                Thread.Sleep(100);
            }
            double all = sw.Elapsed.TotalSeconds;
            total -= before;
            double cpuPerStar = (ProcessCpuMs(procs) - cpu0) / total;
            Console.WriteLine(F($"{mode}: {total} stars, upload {upload:F2} s, upload to last stored result {all:F2} s = {total / all:F1} stars/s end to end; analysis after the upload returned {all - upload:F2} s = {total / (all - upload):F1} stars/s, {(all - upload) * 1000 * workers / total:F2} ms per job per worker thread; server processes' CPU {cpuPerStar:F2} ms/star (upload included) -> {2000 / cpuPerStar:F0} stars/s on two free cores; {(warmup is null ? "fresh processes" : "after a warm-up campaign")}; load {LoadAverage()}"));
        }
        finally
        {
            Kill(procs);
            if (cs is not null) DropDatabase(admin!, cs);
        }
    }

    /// <summary>
    /// Generates a photometry file of about <paramref name="mb"/> MB for 1000 stars, uploads it to a fresh embedded web
    /// process and reads that process's peak resident set (VmHWM) afterwards.
    /// </summary>
    private static void PeakUploadMemory(string work, int mb, CancellationToken ct)
    {
        string starsCsv = Path.Combine(work, "big-stars.csv");
        var sb = new StringBuilder("star,field,ra_deg,dec_deg,class,ebv,ebv_err,feh\n");
        for (int i = 0; i < 1000; i++) sb.Append(F($"U{i:D4},bench,{10 + i * 0.001:F4},-30.0,,,,\n"));
        File.WriteAllText(starsCsv, sb.ToString());
        string phot = Path.Combine(work, "big-photometry.csv");
        long rows = 0;
        using (var w = new StreamWriter(phot, false, new UTF8Encoding(false), 1 << 20))
        {
            w.Write("star,time,band,mag,mag_err,observer\n");
            long target = (long)mb << 20;
            string[] bands = ["V", "I"];
            while (w.BaseStream.Position < target)
            {
                for (int k = 0; k < 10000; k++, rows++)
                    w.Write(F($"U{rows % 1000:D4},{10000 + rows * 1e-5:F6},{bands[rows & 1]},{15 + (rows % 997) * 1e-3:F4},0.0100,obs{rows % 3}\n"));
                w.Flush();
            }
        }
        long bytes = new FileInfo(phot).Length;
        int port = FreePort();
        string url = F($"http://127.0.0.1:{port}");
        var env = new Dictionary<string, string>
        {
            ["PulseLadder__MaxUploadBytes"] = (bytes + (64L << 20)).ToString(CultureInfo.InvariantCulture),
            ["PulseLadder__MaxUploadRows"] = (rows + 10).ToString(CultureInfo.InvariantCulture),
        };
        var web = Start(work, "upload-web.log", env, "serve", "--single-user", "--urls", url, "--data-dir", Path.Combine(work, "upload"), "--no-jobs");
        try
        {
            using var http = new HttpClient { BaseAddress = new Uri(url), Timeout = TimeSpan.FromMinutes(60) };
            WaitHealthy(http, web);
            long before = VmHwmKb(web.Id);
            var sw = Stopwatch.StartNew();
            using var r = Upload(http, starsCsv, phot);
            double sec = sw.Elapsed.TotalSeconds;
            long peak = VmHwmKb(web.Id);
            string status = r.IsSuccessStatusCode ? "stored" : F($"refused {(int)r.StatusCode}: {r.Content.ReadAsStringAsync(ct).GetAwaiter().GetResult()[..Math.Min(300, (int)(r.Content.Headers.ContentLength ?? 300))]}");
            Console.WriteLine(F($"upload of {bytes / 1048576.0:F0} MB ({rows} rows): {status} in {sec:F1} s = {rows / sec:F0} rows/s through HTTP; web process peak RSS (VmHWM) {peak / 1024.0:F0} MB (idle after start {before / 1024.0:F0} MB); load {LoadAverage()}"));
        }
        finally
        {
            Kill([web]);
            File.Delete(phot);
        }
    }

    private static long VmHwmKb(int pid)
    {
        foreach (var line in File.ReadLines(F($"/proc/{pid}/status")))
            if (line.StartsWith("VmHWM:", StringComparison.Ordinal))
                return long.Parse(line["VmHWM:".Length..].Trim().Split(' ')[0], CultureInfo.InvariantCulture);
        return 0;
    }
}
