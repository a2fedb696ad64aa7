-- foreign_keys: off
-- Schema version 7: internal site keys are never given twice. A plain INTEGER PRIMARY KEY hands
-- the key of a deleted last site to the next one, so work started for the deleted site could write
-- under the new site's key; AUTOINCREMENT keeps the highest key ever given in sqlite_sequence.
-- SQLite cannot add AUTOINCREMENT to a table, so the sites table is rebuilt (its children keep their
-- keys: foreign keys are off while the old table is dropped, and checked before the commit).
CREATE TABLE sites_rebuilt (
    key                 INTEGER PRIMARY KEY AUTOINCREMENT,
    id                  TEXT    NOT NULL UNIQUE,
    name                TEXT    NOT NULL,
    time_zone           TEXT    NOT NULL,
    cadence             TEXT    NOT NULL,
    daily_statistic     TEXT,
    latitude            REAL,
    longitude           REAL,
    elevation_m         REAL,
    min_c               REAL    NOT NULL,
    max_c               REAL    NOT NULL,
    max_step_c_per_hour REAL    NOT NULL,
    flatline_hours      REAL    NOT NULL,
    seasonality         TEXT    NOT NULL,
    method              TEXT    NOT NULL,
    order_policy        TEXT    NOT NULL,
    max_order           INTEGER NOT NULL,
    fit_window_days     INTEGER NOT NULL,
    interval_method     TEXT    NOT NULL,
    created_at_ms       INTEGER NOT NULL,
    settings_version    INTEGER NOT NULL DEFAULT 1,
    updated_at_ms       INTEGER,
    thresholds_json     TEXT    NOT NULL DEFAULT '[]',
    night_start         TEXT    NOT NULL DEFAULT '18:00',
    night_end           TEXT    NOT NULL DEFAULT '09:00'
);

INSERT INTO sites_rebuilt (key, id, name, time_zone, cadence, daily_statistic, latitude, longitude, elevation_m,
    min_c, max_c, max_step_c_per_hour, flatline_hours, seasonality, method, order_policy, max_order, fit_window_days,
    interval_method, created_at_ms, settings_version, updated_at_ms, thresholds_json, night_start, night_end)
SELECT key, id, name, time_zone, cadence, daily_statistic, latitude, longitude, elevation_m,
    min_c, max_c, max_step_c_per_hour, flatline_hours, seasonality, method, order_policy, max_order, fit_window_days,
    interval_method, created_at_ms, settings_version, updated_at_ms, thresholds_json, night_start, night_end
FROM sites;

DROP TABLE sites;
ALTER TABLE sites_rebuilt RENAME TO sites;

-- Dropped with the old table; the same as in version 6.
CREATE TRIGGER sites_delete_alerts AFTER DELETE ON sites
BEGIN
    UPDATE webhook_deliveries SET status = 'cancelled', next_attempt_at_ms = NULL, last_error = 'The site was deleted.'
        WHERE site_id = OLD.id AND status = 'pending';
    DELETE FROM raised_alerts WHERE site_id = OLD.id;
    DELETE FROM site_health_states WHERE site_id = OLD.id;
END;
