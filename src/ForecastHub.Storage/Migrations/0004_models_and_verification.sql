-- Schema version 4: the serving model of each site, the outcome of the last fit attempt,
-- archived day-ahead forecasts and their live scores.

-- One serving model per site, as the JSON the forecaster reads back; data_end_ms and
-- data_points say which grid it was fitted on, settings_version which settings; the residual
-- Ljung-Box p-value is kept beside the JSON so fleet health need not parse every model.
CREATE TABLE site_models (
    site_key         INTEGER PRIMARY KEY REFERENCES sites (key) ON DELETE CASCADE,
    fitted_at_ms     INTEGER NOT NULL,
    fit_duration_ms  REAL    NOT NULL,
    settings_version INTEGER NOT NULL,
    data_end_ms      INTEGER NOT NULL,
    data_points      INTEGER NOT NULL,
    residual_p_value REAL,
    model_json       TEXT    NOT NULL
);

-- A failed fit is kept here (the previous model keeps serving) so health can show it after a restart.
CREATE TABLE site_fit_attempts (
    site_key          INTEGER PRIMARY KEY REFERENCES sites (key) ON DELETE CASCADE,
    attempted_at_ms   INTEGER NOT NULL,
    failed            INTEGER NOT NULL,
    error             TEXT
);

-- The day-ahead forecast as first issued for each local target day; never overwritten.
CREATE TABLE archived_forecasts (
    site_key           INTEGER NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    target_date        TEXT    NOT NULL,
    issued_at_ms       INTEGER NOT NULL,
    origin_ms          INTEGER NOT NULL,
    model_fitted_at_ms INTEGER NOT NULL,
    forecast_json      TEXT    NOT NULL,
    PRIMARY KEY (site_key, target_date)
) WITHOUT ROWID;

-- Scores of an archived forecast once its day has been observed.
CREATE TABLE live_scores (
    site_key     INTEGER NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    target_date  TEXT    NOT NULL,
    scored_at_ms INTEGER NOT NULL,
    scores_json  TEXT    NOT NULL,
    PRIMARY KEY (site_key, target_date)
) WITHOUT ROWID;
