-- PulseLadder schema, version 1 (SQLite). Never edit a shipped script: add a new numbered one.
CREATE TABLE fields (
    id              INTEGER PRIMARY KEY,
    name            TEXT NOT NULL UNIQUE,
    calibration_id  TEXT NULL,
    default_ebv     REAL NULL,
    created_at      TEXT NOT NULL
);

CREATE TABLE stars (
    id              INTEGER PRIMARY KEY,
    name            TEXT NOT NULL UNIQUE,
    field_id        INTEGER NOT NULL REFERENCES fields(id),
    ra_deg          REAL NOT NULL,
    dec_deg         REAL NOT NULL,
    declared_class  TEXT NULL,
    ebv             REAL NULL,
    ebv_err         REAL NULL,
    feh             REAL NULL,
    -- Bumped whenever the star's inputs or a reviewer's choice change; the analysis for (id, revision, version) is current.
    revision        INTEGER NOT NULL DEFAULT 1,
    review_state    TEXT NOT NULL DEFAULT 'awaiting',
    chosen_period_days REAL NULL,
    chosen_class    TEXT NULL,
    created_at      TEXT NOT NULL
);
CREATE INDEX ix_stars_field ON stars(field_id);

CREATE TABLE uploads (
    id              INTEGER PRIMARY KEY,
    kind            TEXT NOT NULL,            -- 'photometry' | 'stars'
    file_name       TEXT NOT NULL,
    sha256          TEXT NOT NULL,
    time_scale      TEXT NULL,
    time_offset     REAL NOT NULL DEFAULT 0,
    rows            INTEGER NOT NULL,
    uploaded_by     TEXT NOT NULL,
    uploaded_at     TEXT NOT NULL,
    batch_id        INTEGER NOT NULL,
    UNIQUE (kind, sha256)
);

CREATE TABLE observations (
    id              INTEGER PRIMARY KEY,
    upload_id       INTEGER NOT NULL REFERENCES uploads(id),
    star_id         INTEGER NOT NULL REFERENCES stars(id),
    line            INTEGER NOT NULL,
    time            REAL NOT NULL,            -- as uploaded plus the upload's offset, in time_scale
    time_scale      TEXT NOT NULL,
    band            TEXT NOT NULL,
    mag             REAL NOT NULL,
    mag_err         REAL NOT NULL,
    observer        TEXT NOT NULL,
    flag            TEXT NULL
);
CREATE INDEX ix_observations_star ON observations(star_id);

CREATE TABLE upload_stars (
    batch_id        INTEGER NOT NULL,
    star_id         INTEGER NOT NULL REFERENCES stars(id),
    PRIMARY KEY (batch_id, star_id)
);

CREATE TABLE analyses (
    id              INTEGER PRIMARY KEY,
    star_id         INTEGER NOT NULL REFERENCES stars(id),
    revision        INTEGER NOT NULL,
    pipeline_version TEXT NOT NULL,
    outcome         TEXT NOT NULL,
    class           TEXT NULL,
    period_days     REAL NULL,
    period_err_days REAL NULL,
    fap             REAL NULL,
    distance_modulus REAL NULL,
    distance_modulus_err REAL NULL,
    distance_pc     REAL NULL,
    distance_pc_err REAL NULL,
    flags           TEXT NOT NULL,
    summary_json    TEXT NOT NULL,          -- small per-band figures for tables and exports
    result_json     TEXT NOT NULL,
    input_hash      TEXT NOT NULL,
    created_at      TEXT NOT NULL,
    UNIQUE (star_id, revision, pipeline_version)
);

CREATE TABLE review_decisions (
    id              INTEGER PRIMARY KEY,
    star_id         INTEGER NOT NULL REFERENCES stars(id),
    analysis_id     INTEGER NULL REFERENCES analyses(id),
    action          TEXT NOT NULL,
    period_days     REAL NULL,
    class           TEXT NULL,
    note            TEXT NULL,
    decided_by      TEXT NOT NULL,
    decided_at      TEXT NOT NULL
);
CREATE INDEX ix_review_star ON review_decisions(star_id);

CREATE TABLE field_summaries (
    field_id        INTEGER PRIMARY KEY REFERENCES fields(id),
    pipeline_version TEXT NOT NULL,
    n_used          INTEGER NOT NULL,
    mu              REAL NULL,
    mu_err          REAL NULL,
    result_json     TEXT NOT NULL,
    computed_at     TEXT NOT NULL
);

CREATE TABLE audit_log (
    id              INTEGER PRIMARY KEY,
    at              TEXT NOT NULL,
    actor           TEXT NOT NULL,
    action          TEXT NOT NULL,
    subject         TEXT NOT NULL,
    detail          TEXT NOT NULL
);
-- The audit log is append-only.
CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log BEGIN SELECT RAISE(ABORT, 'audit_log is append-only'); END;
