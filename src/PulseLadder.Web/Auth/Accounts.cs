using System.Security.Cryptography;
using System.Text;
using Microsoft.AspNetCore.Identity;
using PulseLadder.Storage;

namespace PulseLadder.Web.Auth;

/// <summary>
/// Password hashing, API token minting and account name rules, shared by the web host and the CLI's
/// <c>user</c> commands so both write the same formats.
/// </summary>
public static class Accounts
{
    /// <summary>Shortest accepted password (common practice for a passphrase-friendly minimum).</summary>
    public const int MinPasswordLength = 12;

    /// <summary>Longest accepted password: PBKDF2 over a huge input is a cheap denial of service.</summary>
    public const int MaxPasswordLength = 512;

    public const string TokenPrefix = "plx_";

    // ASP.NET Core Identity's hasher (PBKDF2-HMAC-SHA512, 100,000 iterations, per-hash salt, versioned format).
    // The user argument is unused by this implementation.
    private static readonly PasswordHasher<object> Hasher = new();
    private static readonly object NoUser = new();

    // A hash of a random password, verified against when the account name is unknown, so a failed sign-in takes
    // the same time whether or not the name exists.
    private static readonly Lazy<string> DummyHash = new(() => Hasher.HashPassword(NoUser, Convert.ToBase64String(RandomNumberGenerator.GetBytes(16))));

    /// <summary>Null when <paramref name="name"/> is acceptable: 1 to 64 of letters, digits, '.', '-', '_'.</summary>
    public static string? CheckName(string? name)
    {
        if (string.IsNullOrEmpty(name) || name.Length > 64) return "name must be 1 to 64 characters";
        foreach (char ch in name)
            if (!(char.IsAsciiLetterOrDigit(ch) || ch is '.' or '-' or '_')) return "name may hold only letters, digits, '.', '-' and '_'";
        return null;
    }

    /// <summary>Null when <paramref name="label"/> (a token's name) is acceptable: 1 to 100 printable characters.</summary>
    public static string? CheckLabel(string? label) =>
        string.IsNullOrWhiteSpace(label) || label.Trim().Length > 100 || label.Any(char.IsControl)
            ? "a label of 1 to 100 printable characters is required" : null;

    /// <summary>Null when <paramref name="password"/> is acceptable.</summary>
    public static string? CheckPassword(string? password)
    {
        if (password is null || password.Length < MinPasswordLength) return $"password must have at least {MinPasswordLength} characters";
        if (password.Length > MaxPasswordLength) return $"password must have at most {MaxPasswordLength} characters";
        return null;
    }

    public static string HashPassword(string password) => Hasher.HashPassword(NoUser, password);

    /// <summary>Verifies a password; <paramref name="rehash"/> is a new hash when the stored one uses older parameters.</summary>
    public static bool VerifyPassword(string? storedHash, string password, out string? rehash)
    {
        rehash = null;
        if (storedHash is null)
        {
            Hasher.VerifyHashedPassword(NoUser, DummyHash.Value, password);
            return false;
        }
        var r = Hasher.VerifyHashedPassword(NoUser, storedHash, password);
        if (r == PasswordVerificationResult.SuccessRehashNeeded) rehash = HashPassword(password);
        return r is PasswordVerificationResult.Success or PasswordVerificationResult.SuccessRehashNeeded;
    }

    /// <summary>Burns the time of one verification (unknown account name).</summary>
    public static void VerifyNothing(string password) => Hasher.VerifyHashedPassword(NoUser, DummyHash.Value, password);

    /// <summary>A fresh security stamp (invalidates every cookie issued with the old one).</summary>
    public static string NewStamp() => Convert.ToHexString(RandomNumberGenerator.GetBytes(16));

    /// <summary>
    /// A new token: "plx_" and 43 base64url characters of a 256-bit random secret. Only its SHA-256 is stored: with
    /// 256 bits of entropy nothing can be guessed from a fast hash, and a fast hash lets every request find its
    /// token by an indexed lookup (a slow password hash would cost ~100 ms per request and cannot be indexed).
    /// </summary>
    public static (string Token, string Hash, string Prefix) NewToken()
    {
        string token = TokenPrefix + Base64Url(RandomNumberGenerator.GetBytes(32));
        return (token, HashToken(token), token[..(TokenPrefix.Length + 6)]);
    }

    public static string HashToken(string token) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(token)));

    private static string Base64Url(byte[] bytes) => Convert.ToBase64String(bytes).TrimEnd('=').Replace('+', '-').Replace('/', '_');

    /// <summary>Creates an account (and its audit entry) in one transaction; the caller has checked name, role and password.</summary>
    public static long CreateUser(Database db, string actor, string name, string role, string? password, TimeProvider clock)
    {
        string now = clock.GetUtcNow().ToString("O");
        using var c = db.Open();
        using var tx = c.BeginTransaction();
        if (AccountStore.GetUser(c, name, tx) is not null) throw new InvalidOperationException($"An account named '{name}' exists already.");
        long id = AccountStore.AddUser(c, tx, name, role, password is null ? null : HashPassword(password), NewStamp(), now);
        AuditStore.Append(c, tx, now, actor, "user:create", $"user {name}", $"role {role}; password {(password is null ? "none (token-only)" : "set")}");
        tx.Commit();
        return id;
    }

    /// <summary>Mints a token for an account (and its audit entry); returns the token, which is never shown again.</summary>
    public static (long Id, string Token, string Prefix, string CreatedAt) CreateToken(Database db, string actor, UserRow owner, string label, TimeProvider clock)
    {
        string now = clock.GetUtcNow().ToString("O");
        var (token, hash, prefix) = NewToken();
        using var c = db.Open();
        using var tx = c.BeginTransaction();
        long id = AccountStore.AddToken(c, tx, owner.Id, label, hash, prefix, now);
        AuditStore.Append(c, tx, now, actor, "token:create", $"user {owner.Name}", $"token {id} '{label}' ({prefix}…)");
        tx.Commit();
        return (id, token, prefix, now);
    }
}
