using System.ComponentModel;
using Microsoft.Extensions.Configuration;
using PulseLadder.Storage;
using PulseLadder.Web;
using PulseLadder.Web.Auth;
using Spectre.Console;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary><c>pulseladder user add NAME --role R</c>: creates an account; the password comes from standard input, never a default.</summary>
public sealed class UserAddCommand : Command<UserAddCommand.Settings>
{
    public sealed class Settings : DatabaseSettings
    {
        [CommandArgument(0, "<NAME>"), Description("Account name: letters, digits, '.', '-', '_'.")]
        public string Name { get; init; } = "";

        [CommandOption("--role <ROLE>"), Description("observer, reviewer or admin.")]
        public string Role { get; init; } = "";

        [CommandOption("--password-stdin"), Description("Read the password from the first line of standard input (for scripts).")]
        public bool PasswordStdin { get; init; }

        [CommandOption("--no-password"), Description("A token-only account (pipelines): it cannot sign in on the pages.")]
        public bool NoPassword { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        if (Accounts.CheckName(s.Name) is { } nameError) return Fail(nameError);
        if (!Roles.IsKnown(s.Role)) return Fail($"--role must be one of {string.Join(", ", Roles.All)}");
        if (s.NoPassword && s.PasswordStdin) return Fail("--no-password and --password-stdin exclude each other");
        string? password = null;
        if (!s.NoPassword)
        {
            password = s.PasswordStdin || Console.IsInputRedirected ? ReadLine() : Prompt();
            if (Accounts.CheckPassword(password) is { } pwError) return Fail(pwError);
        }
        var db = s.OpenDatabase();
        Accounts.CreateUser(db, "cli:" + Environment.UserName, s.Name, s.Role, password, TimeProvider.System);
        Console.WriteLine($"Created {s.Role} '{s.Name}'" + (password is null ? " (token-only: `pulseladder user token` gives it a token)." : "."));
        return 0;
    }

    private static string? ReadLine()
    {
        string? line = Console.In.ReadLine();
        return line?.TrimEnd('\r', '\n');
    }

    private static string? Prompt()
    {
        string a = AnsiConsole.Prompt(new TextPrompt<string>("Password:").Secret());
        string b = AnsiConsole.Prompt(new TextPrompt<string>("Again:").Secret());
        return a == b ? a : throw new InvalidOperationException("The two passwords differ; nothing was created.");
    }

    internal static int Fail(string message)
    {
        Console.Error.WriteLine("pulseladder user: " + message);
        return 1;
    }
}

/// <summary><c>pulseladder user token NAME --label L</c>: mints a personal API token and prints it once.</summary>
public sealed class UserTokenCommand : Command<UserTokenCommand.Settings>
{
    public sealed class Settings : DatabaseSettings
    {
        [CommandArgument(0, "<NAME>")]
        public string Name { get; init; } = "";

        [CommandOption("--label <LABEL>"), Description("What the token is for, e.g. the pipeline's name.")]
        public string Label { get; init; } = "cli";
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        if (Accounts.CheckLabel(s.Label) is { } labelError) return UserAddCommand.Fail(labelError);
        var db = s.OpenDatabase();
        UserRow? user;
        using (var c = db.Open()) user = AccountStore.GetUser(c, s.Name);
        if (user is null) return UserAddCommand.Fail($"no account named '{s.Name}' (create it with `pulseladder user add`)");
        if (user.Disabled) return UserAddCommand.Fail($"account '{s.Name}' is disabled");
        var (_, token, _, _) = Accounts.CreateToken(db, "cli:" + Environment.UserName, user, s.Label.Trim(), TimeProvider.System);
        // The token alone on standard output so scripts can capture it; it is shown this once only.
        Console.WriteLine(token);
        Console.Error.WriteLine($"Token for '{s.Name}' ({s.Label.Trim()}): store it now, it is not shown again. Use it as PULSELADDER_TOKEN or --token.");
        return 0;
    }
}
