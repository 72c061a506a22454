-- PulseLadder schema, version 2 (SQLite): accounts and personal API tokens. Never edit a shipped script.
CREATE TABLE users (
    id              INTEGER PRIMARY KEY,
    name            TEXT NOT NULL UNIQUE,
    role            TEXT NOT NULL CHECK (role IN ('observer', 'reviewer', 'admin')),
    -- ASP.NET Core Identity's PasswordHasher format (PBKDF2); NULL: a token-only account that cannot sign in.
    password_hash   TEXT NULL,
    -- Changed on password reset, role change and disabling: cookies carrying an older stamp stop working.
    security_stamp  TEXT NOT NULL,
    created_at      TEXT NOT NULL,
    -- NULL while the account may sign in; the time it was disabled otherwise.
    disabled_at     TEXT NULL
);

CREATE TABLE api_tokens (
    id              INTEGER PRIMARY KEY,
    user_id         INTEGER NOT NULL REFERENCES users(id),
    name            TEXT NOT NULL,
    -- SHA-256 (hex) of the whole token; the token itself is shown once and never stored.
    token_hash      TEXT NOT NULL UNIQUE,
    -- The first characters of the token, shown so a person can recognise it.
    prefix          TEXT NOT NULL,
    created_at      TEXT NOT NULL,
    last_used_at    TEXT NULL,
    revoked_at      TEXT NULL
);
CREATE INDEX ix_api_tokens_user ON api_tokens(user_id);
