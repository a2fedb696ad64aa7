-- API keys: only the SHA-256 digest of each secret is stored (UNIQUE gives the lookup index);
-- revoked keys stay, with their revocation time, so the list shows what existed.
CREATE TABLE api_keys (
    id            TEXT    PRIMARY KEY,
    secret_sha256 BLOB    NOT NULL UNIQUE,
    scope         TEXT    NOT NULL CHECK (scope IN ('admin', 'ingest', 'read')),
    site_ids      TEXT    NOT NULL DEFAULT '[]',
    label         TEXT,
    created_at_ms INTEGER NOT NULL,
    revoked_at_ms INTEGER
);
