using Npgsql;
using PulseLadder.Storage;

namespace PulseLadder.Storage.Tests;

/// <summary>
/// One storage suite, two databases: SQLite always; PostgreSQL when PULSELADDER_TEST_POSTGRES names a server (the
/// test script starts one). Under CI the PostgreSQL server is required, so a missing one fails instead of hiding.
/// </summary>
public static class TestDatabases
{
    public static string? PostgresAdmin => Environment.GetEnvironmentVariable("PULSELADDER_TEST_POSTGRES");

    public static IEnumerable<object[]> Dialects()
    {
        yield return ["sqlite"];
        if (PostgresAdmin is not null || Environment.GetEnvironmentVariable("CI") == "true") yield return ["postgres"];
    }

    /// <summary>A new, empty database of the dialect.</summary>
    public static Database Create(string dialect)
    {
        if (dialect == "sqlite")
        {
            string dir = Path.Combine(Path.GetTempPath(), "plx-tests");
            Directory.CreateDirectory(dir);
            return Database.Sqlite(Path.Combine(dir, Guid.NewGuid().ToString("N") + ".db"));
        }
        string admin = PostgresAdmin ?? throw new InvalidOperationException(
            "CI=true but PULSELADDER_TEST_POSTGRES is not set: run the tests through tests/run-all.sh, which starts PostgreSQL.");
        string name = "plx_" + Guid.NewGuid().ToString("N")[..16];
        using (var c = new NpgsqlConnection(admin))
        {
            c.Open();
            using var cmd = c.CreateCommand();
            cmd.CommandText = $"CREATE DATABASE {name}";
            cmd.ExecuteNonQuery();
        }
        var csb = new NpgsqlConnectionStringBuilder(admin) { Database = name };
        return Database.Postgres(csb.ToString());
    }
}
