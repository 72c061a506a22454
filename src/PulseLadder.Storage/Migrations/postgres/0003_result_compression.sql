-- PulseLadder schema, version 3 (PostgreSQL): stored results compressed with lz4 instead of pglz. Never edit a shipped
-- script. A star's result is ~90 KB of JSON; compressing it with pglz took about a third of the database server's CPU
-- while workers stored results (docs/PERFORMANCE.md, "Session 6", scaled mode). Only the method for new
-- values changes: rows already stored keep pglz until they are written again, and both read back the same.
-- A server built without lz4 keeps pglz; the migration still counts as applied (nothing else depends on it).
DO $$
BEGIN
    ALTER TABLE analyses ALTER COLUMN result_json SET COMPRESSION lz4;
    ALTER TABLE field_summaries ALTER COLUMN result_json SET COMPRESSION lz4;
EXCEPTION WHEN feature_not_supported THEN
    RAISE NOTICE 'PostgreSQL without lz4: stored results stay compressed with pglz';
END $$;
