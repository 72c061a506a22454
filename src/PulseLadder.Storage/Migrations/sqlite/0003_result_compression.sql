-- PulseLadder schema, version 3 (SQLite): nothing changes. Version 3 moves PostgreSQL's stored results to lz4
-- compression; SQLite stores text uncompressed. The version is kept in step with PostgreSQL's so that one number
-- names the schema on both databases.
SELECT 3;
