-- Schema version 1: sites with their settings, and raw readings keyed by (site, time).
CREATE TABLE sites (
    key                 INTEGER PRIMARY KEY,
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
    created_at_ms       INTEGER NOT NULL
);

-- Times are UTC milliseconds since 1970; the primary key is the index for time-range reads.
CREATE TABLE readings (
    site_key       INTEGER NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    time_ms        INTEGER NOT NULL,
    value_c        REAL    NOT NULL,
    original_value REAL    NOT NULL,
    original_unit  TEXT    NOT NULL,
    flags          INTEGER NOT NULL DEFAULT 0,
    received_at_ms INTEGER NOT NULL,
    PRIMARY KEY (site_key, time_ms)
) WITHOUT ROWID;
