-- Schema version 5: each site's thresholds (a JSON array of {id, direction, valueC, alertProbability})
-- and its night in local clock time. Existing sites get none and the default night 18:00-09:00.
ALTER TABLE sites ADD COLUMN thresholds_json TEXT NOT NULL DEFAULT '[]';
ALTER TABLE sites ADD COLUMN night_start TEXT NOT NULL DEFAULT '18:00';
ALTER TABLE sites ADD COLUMN night_end TEXT NOT NULL DEFAULT '09:00';
