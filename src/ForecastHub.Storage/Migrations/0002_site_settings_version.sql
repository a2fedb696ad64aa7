-- Schema version 2: a settings version that every settings change bumps (the refit trigger
-- watches it), the time of the last change, and an index of flagged readings for health checks.
ALTER TABLE sites ADD COLUMN settings_version INTEGER NOT NULL DEFAULT 1;
ALTER TABLE sites ADD COLUMN updated_at_ms INTEGER;
UPDATE sites SET updated_at_ms = created_at_ms;
CREATE INDEX readings_flagged ON readings (site_key, time_ms) WHERE flags <> 0;
