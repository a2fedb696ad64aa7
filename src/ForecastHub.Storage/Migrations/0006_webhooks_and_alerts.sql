-- Schema version 6: webhooks, their delivery outbox, and the alert state that keeps a raise from
-- being sent twice.

-- A webhook subscription. The signing secret is kept as issued (the signer needs the key itself,
-- unlike API keys, which are stored as digests); it is never listed or logged.
CREATE TABLE webhooks (
    id            TEXT    PRIMARY KEY,
    url           TEXT    NOT NULL,
    secret        TEXT    NOT NULL,
    site_ids      TEXT    NOT NULL DEFAULT '[]',
    events        TEXT    NOT NULL,
    created_at_ms INTEGER NOT NULL
);

-- The outbox: one row per event and webhook, written in the same transaction as the alert state
-- that caused it. message_id is the webhook-id header, the same on every attempt.
CREATE TABLE webhook_deliveries (
    seq                INTEGER PRIMARY KEY AUTOINCREMENT,
    message_id         TEXT    NOT NULL UNIQUE,
    webhook_id         TEXT    NOT NULL REFERENCES webhooks (id) ON DELETE CASCADE,
    event_type         TEXT    NOT NULL,
    site_id            TEXT,
    body               TEXT    NOT NULL,
    status             TEXT    NOT NULL CHECK (status IN ('pending', 'delivered', 'failed', 'cancelled')),
    attempts           INTEGER NOT NULL DEFAULT 0,
    created_at_ms      INTEGER NOT NULL,
    next_attempt_at_ms INTEGER,
    last_attempt_at_ms INTEGER,
    last_status_code   INTEGER,
    last_error         TEXT
);
CREATE INDEX webhook_deliveries_due ON webhook_deliveries (next_attempt_at_ms) WHERE status = 'pending';
CREATE INDEX webhook_deliveries_by_webhook ON webhook_deliveries (webhook_id, seq);
CREATE INDEX webhook_deliveries_pending_by_site ON webhook_deliveries (site_id) WHERE status = 'pending';

-- A risk currently raised, per site, threshold and window name; the row is the memory that the
-- raise was sent, and is removed when the risk clears.
CREATE TABLE raised_alerts (
    site_id        TEXT    NOT NULL,
    threshold_id   TEXT    NOT NULL,
    window_name    TEXT    NOT NULL,
    window_from_ms INTEGER NOT NULL,
    window_to_ms   INTEGER NOT NULL,
    raised_at_ms   INTEGER NOT NULL,
    updated_at_ms  INTEGER NOT NULL,
    detail_json    TEXT    NOT NULL,
    PRIMARY KEY (site_id, threshold_id, window_name)
) WITHOUT ROWID;

-- The health state last announced per site, so health.changed fires on a change only.
CREATE TABLE site_health_states (
    site_id       TEXT    PRIMARY KEY,
    state         TEXT    NOT NULL,
    changed_at_ms INTEGER NOT NULL
) WITHOUT ROWID;

-- Deleting a site cancels what is pending about it and forgets its alert state.
CREATE TRIGGER sites_delete_alerts AFTER DELETE ON sites
BEGIN
    UPDATE webhook_deliveries SET status = 'cancelled', next_attempt_at_ms = NULL, last_error = 'The site was deleted.'
        WHERE site_id = OLD.id AND status = 'pending';
    DELETE FROM raised_alerts WHERE site_id = OLD.id;
    DELETE FROM site_health_states WHERE site_id = OLD.id;
END;
