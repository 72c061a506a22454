using System.Globalization;
using System.Text.RegularExpressions;
using Dapper;
using Npgsql;
using PulseLadder.Demo;
using PulseLadder.Storage;
using PulseLadder.Web;
using Xunit.Abstractions;
using YamlDotNet.RepresentationModel;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>
/// docker-compose.yml is the documented way to run the scaled mode. No container engine runs in CI, so these tests do
/// with the file what compose does: read it (YamlDotNet, a general-purpose YAML parser from NuGet), interpolate its
/// variables by the Compose Specification's rules ("Interpolation": ${VAR}, ${VAR:?message}, ${VAR:-default}, $$),
/// and run each service's own command with its own environment and nothing else, as the image's entry point runs it
/// (src/Dockerfile: dotnet pulseladder.dll). The compose network is the one thing mapped: the host name "postgres"
/// and the role and database the postgres image creates from POSTGRES_USER/POSTGRES_DB become the test server and a
/// role and database made for the test.
/// </summary>
public sealed class ComposeFileTests(ITestOutputHelper output)
{
    private static readonly string RepoRoot = FindRepoRoot();

    [Fact]
    public void ComposeFile_DeclaresPostgresWithVolumeAndHealthCheck_WebAndAScalableWorker()
    {
        var root = LoadCompose();
        var services = Map(root, "services");

        // postgres: its data directory on a named volume, a health check the web host waits for.
        var pg = Map(services, "postgres");
        Assert.StartsWith("postgres:", ((YamlScalarNode)Required(pg, "image")).Value);
        string dataVolume = Assert.Single(Strings(Required(pg, "volumes")), v => v.EndsWith(":/var/lib/postgresql/data", StringComparison.Ordinal));
        string volumeName = dataVolume.Split(':')[0];
        Assert.True(Get(root, "volumes") is YamlMappingNode top && top.Children.ContainsKey(new YamlScalarNode(volumeName)),
            $"volume '{volumeName}' is not declared under the top-level volumes: it would be a bind mount, not a volume");
        Assert.Contains("pg_isready", string.Join(' ', Strings(Required(Map(pg, "healthcheck"), "test"))));

        var web = Map(services, "web");
        Assert.Equal("service_healthy", ((YamlScalarNode)Required(Map(Map(web, "depends_on"), "postgres"), "condition")).Value);
        var webCommand = Strings(Required(web, "command"));
        Assert.Equal("serve", webCommand[0]);
        // The published port is the port the command listens on.
        var listen = new Uri(webCommand[webCommand.IndexOf("--urls") + 1]);
        Assert.Contains(Strings(Required(web, "ports")), p => p.EndsWith(":" + listen.Port.ToString(CultureInfo.InvariantCulture), StringComparison.Ordinal));
        // Sessions survive a new container: the data folder (Data Protection keys) is a volume at WORKDIR/DataDir.
        Assert.Contains(Strings(Required(web, "volumes")), v => v.EndsWith(":/app/" + new PulseLadderOptions().DataDir, StringComparison.Ordinal));

        // `docker compose up --scale worker=N` needs a service with no fixed container name and no host port.
        var worker = Map(services, "worker");
        Assert.Null(Get(worker, "container_name"));
        Assert.Null(Get(worker, "ports"));
        Assert.Equal("work", Strings(Required(worker, "command"))[0]);
        // A worker refuses to start before the web host has migrated the schema; compose must start it again.
        Assert.Equal("on-failure", ((YamlScalarNode)Required(worker, "restart")).Value);

        foreach (var (name, svc) in new[] { ("web", web), ("worker", worker) })
        {
            var env = EnvironmentOf(svc);
            Assert.True(env.TryGetValue("PulseLadder__Jobs__Storage", out var storage) && storage == "postgres", $"{name}: PulseLadder__Jobs__Storage must be postgres");
            Assert.StartsWith("postgres:", env["PulseLadder__Database"]);
            Assert.Equal("src/Dockerfile", ((YamlScalarNode)Required(Map(svc, "build"), "dockerfile")).Value);
            // The database's password, from the same variable as the postgres service's.
            Assert.Contains("Password=${PULSELADDER_DB_PASSWORD};", env["PulseLadder__Database"]);
        }
        // No password in the file, and none assumed: compose interpolates the whole file before it starts anything, and
        // the postgres service's ${PULSELADDER_DB_PASSWORD:?...} refuses an unset or empty variable.
        var refused = Assert.Throws<InvalidOperationException>(() => Interpolated(EnvironmentOf(pg), new Dictionary<string, string>()));
        Assert.Contains("PULSELADDER_DB_PASSWORD", refused.Message);

        // The image both services run: the CLI project published to /app, entry point its assembly.
        var dockerfile = File.ReadAllLines(Path.Combine(RepoRoot, "src", "Dockerfile")).Select(l => l.Trim()).ToList();
        Assert.Contains("ENTRYPOINT [\"dotnet\", \"pulseladder.dll\"]", dockerfile);
        Assert.Contains(dockerfile, l => l.StartsWith("RUN dotnet publish src/PulseLadder.Cli ", StringComparison.Ordinal) && l.EndsWith("-o /app", StringComparison.Ordinal));
        Assert.Equal("WORKDIR /app", dockerfile.Last(l => l.StartsWith("WORKDIR ", StringComparison.Ordinal)));
        Assert.Contains("<AssemblyName>pulseladder</AssemblyName>", File.ReadAllText(Path.Combine(RepoRoot, "src", "PulseLadder.Cli", "PulseLadder.Cli.csproj")));
    }

    [Fact]
    public void Interpolate_FollowsTheComposeSpecification()
    {
        // Compose Specification, "Interpolation": each form with the variable set, empty and unset.
        var vars = new Dictionary<string, string> { ["A"] = "x", ["E"] = "" };
        Assert.Equal("x-x", Interpolate("${A}-$A", vars));
        Assert.Equal("$A", Interpolate("$$A", vars));
        Assert.Equal("d", Interpolate("${U:-d}", vars));
        Assert.Equal("d", Interpolate("${E:-d}", vars));
        Assert.Equal("", Interpolate("${E-d}", vars));
        Assert.Equal("d", Interpolate("${U-d}", vars));
        Assert.Equal("", Interpolate("${E?m}", vars));
        Assert.Contains("m", Assert.Throws<InvalidOperationException>(() => Interpolate("${E:?m}", vars)).Message);
        Assert.Contains("m", Assert.Throws<InvalidOperationException>(() => Interpolate("${U?m}", vars)).Message);
        Assert.Equal("", Interpolate("${U}", vars));
    }

    [Fact]
    public async Task ComposeServices_AnalyseACampaign_WithTheirOwnCommandsAndEnvironment()
    {
        var root = LoadCompose();
        var services = Map(root, "services");
        string password = "pw-" + Guid.NewGuid().ToString("N")[..16];
        var vars = new Dictionary<string, string> { ["PULSELADDER_DB_PASSWORD"] = password };

        // What the postgres image does with its environment: a login role with that password, and its database.
        var pgEnv = Interpolated(EnvironmentOf(Map(services, "postgres")), vars);
        string role = "plx_compose_" + Guid.NewGuid().ToString("N")[..10];
        using (var c = new NpgsqlConnection(ScaleOutEnvironment.Admin))
        {
            c.Open();
            c.Execute($"CREATE ROLE {role} LOGIN PASSWORD '{pgEnv["POSTGRES_PASSWORD"]}'");
            c.Execute($"CREATE DATABASE {role} OWNER {role}");
        }
        var server = new NpgsqlConnectionStringBuilder(ScaleOutEnvironment.Admin);
        Dictionary<string, string> ServiceEnvironment(string name)
        {
            var env = Interpolated(EnvironmentOf(Map(services, name)), vars);
            string setting = env["PulseLadder__Database"];
            var csb = new NpgsqlConnectionStringBuilder(setting["postgres:".Length..]);
            // The service names the compose network's database: host "postgres", the image's user, password and database.
            Assert.Equal(("postgres", pgEnv["POSTGRES_USER"], pgEnv["POSTGRES_PASSWORD"], pgEnv["POSTGRES_DB"]), (csb.Host, csb.Username, csb.Password, csb.Database));
            csb.Host = server.Host;
            csb.Port = server.Port;
            csb.Username = role;
            csb.Database = role;
            env["PulseLadder__Database"] = "postgres:" + csb;
            return env;
        }
        var webEnv = ServiceEnvironment("web");
        var workerEnv = ServiceEnvironment("worker");
        string dbSetting = webEnv["PulseLadder__Database"];

        // The web command as written, listening on a free port instead of the container's 8080.
        var webArgs = Strings(Required(Map(services, "web"), "command"));
        int urlsAt = webArgs.IndexOf("--urls") + 1;
        int port = ScaleOutEnvironment.FreePort();
        webArgs[urlsAt] = new UriBuilder(webArgs[urlsAt]) { Port = port }.Uri.ToString().TrimEnd('/');
        var workerArgs = Strings(Required(Map(services, "worker"), "command"));

        // Each container's working directory is /app (the image's WORKDIR): one folder per container.
        string dir = Path.Combine(Path.GetTempPath(), "plx-compose-" + Guid.NewGuid().ToString("N"));
        string Container(string name) => Directory.CreateDirectory(Path.Combine(dir, name)).FullName;
        DemoCampaign.WriteTo(Path.Combine(dir, "campaign"), new DemoOptions { StarCount = 960 });
        var all = new List<PulseLadderProcess>();
        var workers = new[] { new ComposeWorker("worker-1", workerArgs, workerEnv, Container("worker-1"), all), new ComposeWorker("worker-2", workerArgs, workerEnv, Container("worker-2"), all) };
        try
        {
            // `docker compose up --scale worker=2`: the workers start as soon as the web container has started.
            var web = PulseLadderProcess.Start("web", webArgs, webEnv, Container("web"));
            all.Add(web);
            foreach (var w in workers) w.Start();
            using var http = new HttpClient { BaseAddress = new Uri($"http://127.0.0.1:{port}/"), Timeout = TimeSpan.FromMinutes(5) };
            await ScaledModeTests.WaitForHealth(http, web);

            // docs/deployment.md: a token-only account for pipelines, made with `docker compose run --rm web user ...`
            // (the web service's environment, the image's entry point, the command replaced).
            RunOnce("user-add", ["user", "add", "nightly", "--role", "observer", "--no-password"], webEnv, Container("run-1"));
            string token = RunOnce("user-token", ["user", "token", "nightly", "--label", "nightly"], webEnv, Container("run-2"))
                .Split('\n').Select(l => l.Trim()).Single(l => l.StartsWith("plx_", StringComparison.Ordinal));
            http.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", token);

            var db = Database.Postgres(dbSetting["postgres:".Length..]);
            // Three job servers (web with its one worker thread, two worker processes) before the campaign arrives.
            await Until(() => Servers(db) >= 3, TimeSpan.FromSeconds(120), "three Hangfire servers", workers, all);

            await ScaledModeTests.UploadDemoCampaign(http, Path.Combine(dir, "campaign"));
            long stars;
            using (var c = db.Open()) stars = StarStore.CountWithObservations(c);
            Assert.True(stars >= 900, $"only {stars} stars with photometry were stored");
            await Until(() => ScaledModeTests.Done(db) >= stars, TimeSpan.FromSeconds(300), "every star analysed", workers, all);
            Assert.False(web.HasExited, "web exited:\n" + web.Output);
            foreach (var w in workers) Assert.False(w.Current.HasExited, $"{w.Name} exited:\n{w.Current.Output}");

            using var conn = db.Open();
            ScaledModeTests.AssertOneCurrentResultPerStar(conn, stars);

            // The worker service did the work it is there for: jobs ran in the worker processes (Hangfire's server ids
            // carry the process id), not only in the web host's one worker thread.
            var ranOn = conn.Query<string>("SELECT s.data::json->>'ServerId' FROM hangfire.state s WHERE s.name = 'Processing'")
                .Select(id => int.Parse(id.Split(':')[^2], CultureInfo.InvariantCulture)).ToList();
            var workerPids = workers.SelectMany(w => w.Pids).ToHashSet();
            int onWorkers = ranOn.Count(workerPids.Contains);
            output.WriteLine($"{stars} stars; jobs started {ranOn.Count}, in worker processes {onWorkers}, in web {ranOn.Count(p => p == web.Pid)}; " +
                string.Join(", ", workers.Select(w => $"{w.Name}: {w.Restarts} restart(s)")));
            Assert.True(onWorkers > 0, "no job ran in a worker process");
        }
        finally
        {
            foreach (var p in all) p.Dispose();
            foreach (var p in all) output.WriteLine($"--- {p.Name} ---\n{ScaledModeTests.Tail(p.Output)}");
            try { Directory.Delete(dir, recursive: true); } catch (IOException) { }
        }
    }

    /// <summary>One replica of the worker service with compose's `restart: on-failure`.</summary>
    private sealed class ComposeWorker(string name, List<string> args, Dictionary<string, string> env, string dir, List<PulseLadderProcess> all)
    {
        public string Name => name;
        public PulseLadderProcess Current { get; private set; } = null!;
        public int Restarts { get; private set; }
        public List<int> Pids { get; } = [];

        public void Start()
        {
            Current = PulseLadderProcess.Start(Restarts == 0 ? name : $"{name} (restart {Restarts})", args, env, dir);
            all.Add(Current);
            Pids.Add(Current.Pid);
        }

        /// <summary>Starts the container again if it failed; a worker that exits with 0 has stopped for good, which it must not.</summary>
        public void Supervise()
        {
            if (!Current.HasExited) return;
            Assert.True(Current.ExitCode != 0, $"{name} exited with 0:\n{Current.Output}");
            Assert.True(Restarts < 20, $"{name} failed {Restarts} times:\n{Current.Output}");
            Restarts++;
            Start();
        }
    }

    private static string RunOnce(string name, string[] args, Dictionary<string, string> env, string dir)
    {
        using var p = PulseLadderProcess.Start(name, args, env, dir);
        Assert.True(p.WaitForExit(TimeSpan.FromSeconds(90)) == 0, $"{name} failed:\n{p.Output}");
        return p.Output;
    }

    private static async Task Until(Func<bool> done, TimeSpan timeout, string what, ComposeWorker[] workers, List<PulseLadderProcess> all)
    {
        var deadline = DateTime.UtcNow + timeout;
        while (DateTime.UtcNow < deadline)
        {
            foreach (var w in workers) w.Supervise();
            if (done()) return;
            await Task.Delay(250);
        }
        throw new TimeoutException($"waited {timeout} for {what}:\n" + string.Join("\n", all.Select(p => $"--- {p.Name} ---\n{ScaledModeTests.Tail(p.Output)}")));
    }

    private static long Servers(Database db)
    {
        using var c = new NpgsqlConnection(db.ConnectionString);
        c.Open();
        // The schema appears when the first server starts.
        return c.ExecuteScalar<bool>("SELECT to_regclass('hangfire.server') IS NOT NULL")
            ? c.ExecuteScalar<long>("SELECT COUNT(*) FROM hangfire.server")
            : 0;
    }

    // ---- docker-compose.yml, read as compose reads it ----

    private static string FindRepoRoot()
    {
        for (var d = new DirectoryInfo(AppContext.BaseDirectory); d is not null; d = d.Parent)
            if (File.Exists(Path.Combine(d.FullName, "PulseLadder.sln"))) return d.FullName;
        throw new InvalidOperationException($"no PulseLadder.sln above {AppContext.BaseDirectory}");
    }

    private static YamlMappingNode LoadCompose()
    {
        var yaml = new YamlStream();
        using (var reader = new StreamReader(Path.Combine(RepoRoot, "docker-compose.yml"))) yaml.Load(reader);
        return (YamlMappingNode)yaml.Documents.Single().RootNode;
    }

    private static YamlNode? Get(YamlMappingNode node, string key) =>
        node.Children.TryGetValue(new YamlScalarNode(key), out var v) ? v : null;

    private static YamlNode Required(YamlMappingNode node, string key) =>
        Get(node, key) ?? throw new Xunit.Sdk.XunitException($"docker-compose.yml: '{key}' is missing at line {node.Start.Line}");

    private static YamlMappingNode Map(YamlMappingNode node, string key) =>
        Required(node, key) as YamlMappingNode ?? throw new Xunit.Sdk.XunitException($"docker-compose.yml: '{key}' is not a mapping");

    /// <summary>A list-form value (command, volumes, ports, healthcheck test); compose's string form is not used here.</summary>
    private static List<string> Strings(YamlNode node) =>
        node is YamlSequenceNode s
            ? s.Children.Select(c => ((YamlScalarNode)c).Value ?? "").ToList()
            : throw new Xunit.Sdk.XunitException($"docker-compose.yml line {node.Start.Line}: expected a list");

    /// <summary>environment: a mapping, or a list of NAME=VALUE (both forms of the Compose Specification).</summary>
    private static Dictionary<string, string> EnvironmentOf(YamlMappingNode service)
    {
        var env = new Dictionary<string, string>(StringComparer.Ordinal);
        switch (Get(service, "environment"))
        {
            case YamlMappingNode m:
                foreach (var (k, v) in m.Children) env[((YamlScalarNode)k).Value!] = ((YamlScalarNode)v).Value ?? "";
                break;
            case YamlSequenceNode s:
                foreach (var item in s.Children.Select(c => ((YamlScalarNode)c).Value!))
                {
                    int eq = item.IndexOf('=');
                    env[eq < 0 ? item : item[..eq]] = eq < 0 ? "" : item[(eq + 1)..];
                }
                break;
        }
        return env;
    }

    private static Dictionary<string, string> Interpolated(Dictionary<string, string> env, IReadOnlyDictionary<string, string> vars) =>
        env.ToDictionary(kv => kv.Key, kv => Interpolate(kv.Value, vars), StringComparer.Ordinal);

    private static readonly Regex Variable = new(
        @"\$\$|\$\{(?<name>[A-Za-z_][A-Za-z0-9_]*)(?:(?<op>:\?|\?|:-|-)(?<arg>[^}]*))?\}|\$(?<bare>[A-Za-z_][A-Za-z0-9_]*)",
        RegexOptions.CultureInvariant);

    /// <summary>Compose Specification, "Interpolation"; an unmet ${VAR:?message} / ${VAR?message} throws with the message.</summary>
    internal static string Interpolate(string value, IReadOnlyDictionary<string, string> vars) =>
        Variable.Replace(value, m =>
        {
            if (m.Value == "$$") return "$";
            string name = m.Groups["bare"].Success ? m.Groups["bare"].Value : m.Groups["name"].Value;
            bool set = vars.TryGetValue(name, out var v);
            string op = m.Groups["op"].Value, arg = m.Groups["arg"].Value;
            return op switch
            {
                ":?" when !set || v!.Length == 0 => throw new InvalidOperationException($"required variable {name} is missing a value: {arg}"),
                "?" when !set => throw new InvalidOperationException($"required variable {name} is missing a value: {arg}"),
                ":-" when !set || v!.Length == 0 => arg,
                "-" when !set => arg,
                _ => v ?? "",
            };
        });
}
