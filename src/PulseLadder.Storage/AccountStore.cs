using System.Data.Common;
using Dapper;

namespace PulseLadder.Storage;

public sealed class UserRow
{
    public long Id { get; init; }
    public string Name { get; init; } = "";
    public string Role { get; init; } = "";
    public string? PasswordHash { get; init; }
    public string SecurityStamp { get; init; } = "";
    public string CreatedAt { get; init; } = "";
    public string? DisabledAt { get; init; }

    public bool Disabled => DisabledAt is not null;
}

public sealed class ApiTokenRow
{
    public long Id { get; init; }
    public long UserId { get; init; }
    public string Name { get; init; } = "";
    public string TokenHash { get; init; } = "";
    public string Prefix { get; init; } = "";
    public string CreatedAt { get; init; } = "";
    public string? LastUsedAt { get; init; }
    public string? RevokedAt { get; init; }
}

/// <summary>A token row joined with its owner, as the bearer-token check needs it.</summary>
public sealed class TokenOwnerRow
{
    public long TokenId { get; init; }
    public string? LastUsedAt { get; init; }
    public string? RevokedAt { get; init; }
    public long UserId { get; init; }
    public string UserName { get; init; } = "";
    public string Role { get; init; } = "";
    public string? DisabledAt { get; init; }
}

/// <summary>Accounts (name, role, password hash) and their personal API tokens. Hashing is the caller's job.</summary>
public static class AccountStore
{
    public static long AddUser(DbConnection c, DbTransaction? tx, string name, string role, string? passwordHash, string securityStamp, string now) =>
        c.ExecuteScalar<long>("""
            INSERT INTO users (name, role, password_hash, security_stamp, created_at) VALUES (@name, @role, @passwordHash, @securityStamp, @now)
            RETURNING id
            """, new { name, role, passwordHash, securityStamp, now }, tx);

    public static UserRow? GetUser(DbConnection c, string name, DbTransaction? tx = null) =>
        c.QuerySingleOrDefault<UserRow>("SELECT * FROM users WHERE name = @name", new { name }, tx);

    public static IReadOnlyList<UserRow> ListUsers(DbConnection c) =>
        c.Query<UserRow>("SELECT * FROM users ORDER BY name").AsList();

    public static long CountUsers(DbConnection c) => c.ExecuteScalar<long>("SELECT COUNT(*) FROM users");

    /// <summary>Active (not disabled) admins; the API refuses a change that would leave none.</summary>
    public static long CountActiveAdmins(DbConnection c, DbTransaction? tx = null) =>
        c.ExecuteScalar<long>("SELECT COUNT(*) FROM users WHERE role = 'admin' AND disabled_at IS NULL", transaction: tx);

    public static void SetRole(DbConnection c, DbTransaction? tx, long userId, string role, string securityStamp) =>
        c.Execute("UPDATE users SET role = @role, security_stamp = @securityStamp WHERE id = @userId", new { userId, role, securityStamp }, tx);

    public static void SetPassword(DbConnection c, DbTransaction? tx, long userId, string? passwordHash, string securityStamp) =>
        c.Execute("UPDATE users SET password_hash = @passwordHash, security_stamp = @securityStamp WHERE id = @userId",
            new { userId, passwordHash, securityStamp }, tx);

    /// <summary>Replaces a hash in place (a stronger hash of the same password): the stamp, and so every session, stays.</summary>
    public static void RehashPassword(DbConnection c, long userId, string passwordHash) =>
        c.Execute("UPDATE users SET password_hash = @passwordHash WHERE id = @userId", new { userId, passwordHash });

    /// <summary>Disables (<paramref name="disabledAt"/> set) or enables (null) an account.</summary>
    public static void SetDisabled(DbConnection c, DbTransaction? tx, long userId, string? disabledAt, string securityStamp) =>
        c.Execute("UPDATE users SET disabled_at = @disabledAt, security_stamp = @securityStamp WHERE id = @userId",
            new { userId, disabledAt, securityStamp }, tx);

    public static long AddToken(DbConnection c, DbTransaction? tx, long userId, string name, string tokenHash, string prefix, string now) =>
        c.ExecuteScalar<long>("""
            INSERT INTO api_tokens (user_id, name, token_hash, prefix, created_at) VALUES (@userId, @name, @tokenHash, @prefix, @now)
            RETURNING id
            """, new { userId, name, tokenHash, prefix, now }, tx);

    public static IReadOnlyList<ApiTokenRow> TokensOf(DbConnection c, long userId) =>
        c.Query<ApiTokenRow>("SELECT * FROM api_tokens WHERE user_id = @userId ORDER BY id", new { userId }).AsList();

    public static long CountLiveTokens(DbConnection c, long userId) =>
        c.ExecuteScalar<long>("SELECT COUNT(*) FROM api_tokens WHERE user_id = @userId AND revoked_at IS NULL", new { userId });

    /// <summary>The token with this hash and its owner, revoked or not (the caller decides), or null.</summary>
    public static TokenOwnerRow? FindToken(DbConnection c, string tokenHash) =>
        c.QuerySingleOrDefault<TokenOwnerRow>("""
            SELECT t.id AS token_id, t.last_used_at, t.revoked_at, u.id AS user_id, u.name AS user_name, u.role, u.disabled_at
            FROM api_tokens t JOIN users u ON u.id = t.user_id
            WHERE t.token_hash = @tokenHash
            """, new { tokenHash });

    /// <summary>Revokes one of a user's live tokens; false when the user has no such live token.</summary>
    public static bool RevokeToken(DbConnection c, DbTransaction? tx, long userId, long tokenId, string now) =>
        c.Execute("UPDATE api_tokens SET revoked_at = @now WHERE id = @tokenId AND user_id = @userId AND revoked_at IS NULL",
            new { userId, tokenId, now }, tx) == 1;

    /// <summary>
    /// Records a use of the token unless one was recorded after <paramref name="notBefore"/> (ISO 8601 UTC text
    /// compares in time order), so a busy pipeline costs at most one write per token per interval.
    /// </summary>
    public static void TouchToken(DbConnection c, long tokenId, string now, string notBefore) =>
        c.Execute("UPDATE api_tokens SET last_used_at = @now WHERE id = @tokenId AND (last_used_at IS NULL OR last_used_at < @notBefore)",
            new { tokenId, now, notBefore });
}
