-- Schema version 3: webhooks, their delivery outbox, and the alert state that keeps a raise from
-- being sent twice; the same tables as SQLite's version 6, shared by every node.

-- The signing secret is kept as issued (the signer needs the key itself); it is never listed or logged.
CREATE TABLE webhooks (
    id            text COLLATE "C" PRIMARY KEY,
    url           text   NOT NULL,
    secret        text   NOT NULL,
    site_ids      text   NOT NULL DEFAULT '[]',
    events        text   NOT NULL,
    created_at_ms bigint NOT NULL
);

-- The outbox: one row per event and webhook, written in the same transaction as the alert state
-- that caused it. message_id is the webhook-id header, the same on every attempt.
CREATE TABLE webhook_deliveries (
    seq                bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
    message_id         text   NOT NULL UNIQUE,
    webhook_id         text COLLATE "C" NOT NULL REFERENCES webhooks (id) ON DELETE CASCADE,
    event_type         text   NOT NULL,
    site_id            text COLLATE "C",
    body               text   NOT NULL,
    status             text   NOT NULL CHECK (status IN ('pending', 'delivered', 'failed', 'cancelled')),
    attempts           integer NOT NULL DEFAULT 0,
    created_at_ms      bigint NOT NULL,
    next_attempt_at_ms bigint,
    last_attempt_at_ms bigint,
    last_status_code   integer,
    last_error         text
);
CREATE INDEX webhook_deliveries_due ON webhook_deliveries (next_attempt_at_ms) WHERE status = 'pending';
CREATE INDEX webhook_deliveries_by_webhook ON webhook_deliveries (webhook_id, seq);
CREATE INDEX webhook_deliveries_pending_by_site ON webhook_deliveries (site_id) WHERE status = 'pending';

-- A risk currently raised, per site, threshold and window name; removed when the risk clears.
CREATE TABLE raised_alerts (
    site_id        text COLLATE "C" NOT NULL,
    threshold_id   text COLLATE "C" NOT NULL,
    window_name    text COLLATE "C" NOT NULL,
    window_from_ms bigint NOT NULL,
    window_to_ms   bigint NOT NULL,
    raised_at_ms   bigint NOT NULL,
    updated_at_ms  bigint NOT NULL,
    detail_json    text   NOT NULL,
    PRIMARY KEY (site_id, threshold_id, window_name)
);

-- The health state last announced per site, so health.changed fires on a change only.
CREATE TABLE site_health_states (
    site_id       text COLLATE "C" PRIMARY KEY,
    state         text   NOT NULL,
    changed_at_ms bigint NOT NULL
);

-- Deleting a site cancels what is pending about it and forgets its alert state.
CREATE FUNCTION forget_site_alerts() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    UPDATE webhook_deliveries SET status = 'cancelled', next_attempt_at_ms = NULL, last_error = 'The site was deleted.'
        WHERE site_id = OLD.id AND status = 'pending';
    DELETE FROM raised_alerts WHERE site_id = OLD.id;
    DELETE FROM site_health_states WHERE site_id = OLD.id;
    RETURN OLD;
END;
$$;
CREATE TRIGGER sites_delete_alerts AFTER DELETE ON sites FOR EACH ROW EXECUTE FUNCTION forget_site_alerts();
