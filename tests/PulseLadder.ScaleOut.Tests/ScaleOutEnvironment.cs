using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Text;
using Npgsql;
using PulseLadder.Storage;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>
/// The PostgreSQL server the test script starts (PULSELADDER_TEST_POSTGRES, PULSELADDER_PGBIN, PULSELADDER_PGDATA).
/// These tests exist to exercise that server, so a missing variable is a failure, never a silent pass.
/// </summary>
internal static class ScaleOutEnvironment
{
    public static string Admin => Require("PULSELADDER_TEST_POSTGRES");
    public static string PgBin => Require("PULSELADDER_PGBIN");
    public static string PgData => Require("PULSELADDER_PGDATA");

    private static string Require(string name) =>
        Environment.GetEnvironmentVariable(name) is { Length: > 0 } v
            ? v
            : throw new InvalidOperationException(
                $"{name} is not set: run the tests through tests/run-all.sh, which starts PostgreSQL and sets it" +
                (Environment.GetEnvironmentVariable("CI") == "true" ? " (CI=true: required)." : "."));

    /// <summary>Creates a new empty database on the test server and returns its connection string.</summary>
    public static string CreateDatabase()
    {
        string name = "plx_so_" + Guid.NewGuid().ToString("N")[..12];
        using (var c = new NpgsqlConnection(Admin))
        {
            c.Open();
            using var cmd = c.CreateCommand();
            cmd.CommandText = $"CREATE DATABASE {name}";
            cmd.ExecuteNonQuery();
        }
        return new NpgsqlConnectionStringBuilder(Admin) { Database = name, MaxPoolSize = 20 }.ToString();
    }

    /// <summary>pg_ctl restart -m fast, run as the server's OS user (postgres) when the tests run as root.</summary>
    public static void RestartPostgres()
    {
        string pgctl = Path.Combine(PgBin, "pg_ctl");
        string log = Path.Combine(PgData, "restart.log");
        string cmd = $"'{pgctl}' -D '{PgData}' -m fast -w -t 60 -l '{log}' restart";
        var psi = Environment.UserName == "root"
            ? new ProcessStartInfo("su", ["postgres", "-s", "/bin/sh", "-c", cmd])
            : new ProcessStartInfo("/bin/sh", ["-c", cmd]);
        // Not redirected: the restarted server inherits pg_ctl's descriptors, and a pipe would never reach EOF.
        psi.UseShellExecute = false;
        using var p = Process.Start(psi)!;
        if (!p.WaitForExit(TimeSpan.FromSeconds(90))) throw new TimeoutException("pg_ctl restart did not finish in 90 s.");
        if (p.ExitCode != 0) throw new InvalidOperationException($"pg_ctl restart failed with exit code {p.ExitCode}.");
    }

    public static int FreePort()
    {
        var l = new TcpListener(IPAddress.Loopback, 0);
        l.Start();
        int port = ((IPEndPoint)l.LocalEndpoint).Port;
        l.Stop();
        return port;
    }
}

/// <summary>A `dotnet pulseladder.dll ...` child process with its output kept for failure messages.</summary>
internal sealed class PulseLadderProcess : IDisposable
{
    private readonly Process _p;
    private readonly StringBuilder _out = new();

    public string Name { get; }

    private PulseLadderProcess(string name, Process p)
    {
        Name = name;
        _p = p;
    }

    public static string Dll => Path.Combine(AppContext.BaseDirectory, "pulseladder.dll");

    public static PulseLadderProcess Start(string name, IEnumerable<string> args, IReadOnlyDictionary<string, string>? env = null,
        string? workingDirectory = null)
    {
        var psi = new ProcessStartInfo("dotnet")
        {
            UseShellExecute = false,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            WorkingDirectory = workingDirectory ?? AppContext.BaseDirectory,
        };
        psi.ArgumentList.Add(Dll);
        foreach (var a in args) psi.ArgumentList.Add(a);
        // The child must see only the settings the test gives it.
        foreach (var key in psi.Environment.Keys.Where(k => k.StartsWith("PulseLadder__", StringComparison.OrdinalIgnoreCase)).ToList())
            psi.Environment.Remove(key);
        psi.Environment["DOTNET_ENVIRONMENT"] = "Production";
        psi.Environment["Logging__LogLevel__Default"] = "Warning";
        if (env is not null) foreach (var (k, v) in env) psi.Environment[k] = v;
        var p = new Process { StartInfo = psi, EnableRaisingEvents = true };
        var proc = new PulseLadderProcess(name, p);
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) lock (proc._out) proc._out.AppendLine(e.Data); };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (proc._out) proc._out.AppendLine(e.Data); };
        p.Start();
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        return proc;
    }

    public bool HasExited => _p.HasExited;

    public int Pid => _p.Id;

    public int ExitCode => _p.ExitCode;

    public string Output
    {
        get { lock (_out) return _out.ToString(); }
    }

    /// <summary>Waits for the process to end by itself and returns its exit code.</summary>
    public int WaitForExit(TimeSpan timeout)
    {
        if (!_p.WaitForExit(timeout)) throw new TimeoutException($"{Name} did not exit within {timeout}. Output:\n{Output}");
        _p.WaitForExit();
        return _p.ExitCode;
    }

    /// <summary>SIGKILL: no shutdown hooks run, in-flight jobs are abandoned exactly as in a crash.</summary>
    public void Kill()
    {
        if (!_p.HasExited) _p.Kill(entireProcessTree: true);
        _p.WaitForExit(TimeSpan.FromSeconds(30));
    }

    public void Dispose()
    {
        try { Kill(); } catch (InvalidOperationException) { }
        _p.Dispose();
    }
}
