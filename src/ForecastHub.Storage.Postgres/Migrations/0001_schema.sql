-- Schema version 1 of the PostgreSQL backend: the same tables as the SQLite file at its version 4,
-- plus per-site change versions and the leases that let one node at a time do a site's background work.
-- Ids use the "C" collation so pages come in the same byte order as on SQLite.
CREATE TABLE sites (
    key                 bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    id                  text COLLATE "C" NOT NULL UNIQUE,
    name                text             NOT NULL,
    time_zone           text             NOT NULL,
    cadence             text             NOT NULL,
    daily_statistic     text,
    latitude            double precision,
    longitude           double precision,
    elevation_m         double precision,
    min_c               double precision NOT NULL,
    max_c               double precision NOT NULL,
    max_step_c_per_hour double precision NOT NULL,
    flatline_hours      double precision NOT NULL,
    seasonality         text             NOT NULL,
    method              text             NOT NULL,
    order_policy        text             NOT NULL,
    max_order           integer          NOT NULL,
    fit_window_days     integer          NOT NULL,
    interval_method     text             NOT NULL,
    created_at_ms       bigint           NOT NULL,
    updated_at_ms       bigint           NOT NULL,
    settings_version    bigint           NOT NULL DEFAULT 1
);

-- Times are UTC milliseconds since 1970; the primary key is the index for time-range reads.
CREATE TABLE readings (
    site_key       bigint           NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    time_ms        bigint           NOT NULL,
    value_c        double precision NOT NULL,
    original_value double precision NOT NULL,
    original_unit  text             NOT NULL,
    flags          integer          NOT NULL DEFAULT 0,
    received_at_ms bigint           NOT NULL,
    PRIMARY KEY (site_key, time_ms)
);
CREATE INDEX readings_flagged ON readings (site_key, time_ms) WHERE flags <> 0;

CREATE TABLE api_keys (
    id            text COLLATE "C" PRIMARY KEY,
    secret_sha256 bytea  NOT NULL UNIQUE,
    scope         text   NOT NULL CHECK (scope IN ('admin', 'ingest', 'read')),
    site_ids      text   NOT NULL DEFAULT '[]',
    label         text,
    created_at_ms bigint NOT NULL,
    revoked_at_ms bigint
);

CREATE TABLE site_models (
    site_key         bigint           PRIMARY KEY REFERENCES sites (key) ON DELETE CASCADE,
    fitted_at_ms     bigint           NOT NULL,
    fit_duration_ms  double precision NOT NULL,
    settings_version bigint           NOT NULL,
    data_end_ms      bigint           NOT NULL,
    data_points      integer          NOT NULL,
    residual_p_value double precision,
    model_json       text             NOT NULL
);

CREATE TABLE site_fit_attempts (
    site_key        bigint  PRIMARY KEY REFERENCES sites (key) ON DELETE CASCADE,
    attempted_at_ms bigint  NOT NULL,
    failed          boolean NOT NULL,
    error           text
);

CREATE TABLE archived_forecasts (
    site_key           bigint NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    target_date        date   NOT NULL,
    issued_at_ms       bigint NOT NULL,
    origin_ms          bigint NOT NULL,
    model_fitted_at_ms bigint NOT NULL,
    forecast_json      text   NOT NULL,
    PRIMARY KEY (site_key, target_date)
);

CREATE TABLE live_scores (
    site_key     bigint NOT NULL REFERENCES sites (key) ON DELETE CASCADE,
    target_date  date   NOT NULL,
    scored_at_ms bigint NOT NULL,
    scores_json  text   NOT NULL,
    PRIMARY KEY (site_key, target_date)
);

-- One row per piece of background work held by a node: (kind, subject) such as ('refit', site id).
-- A lease past expires_at may be taken over, so a node that died frees its work by waiting.
CREATE TABLE work_leases (
    kind       text COLLATE "C" NOT NULL,
    subject    text COLLATE "C" NOT NULL,
    holder     text             NOT NULL,
    expires_at timestamptz      NOT NULL,
    PRIMARY KEY (kind, subject)
);

