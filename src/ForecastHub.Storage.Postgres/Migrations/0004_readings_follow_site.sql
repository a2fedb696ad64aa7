-- Schema version 4: readings lose their foreign key to sites, whose per-row check cost more than the
-- insert itself in a batch ingest. Only the reading store inserts readings, after locking the site's
-- row in the same transaction, so no reading can name a missing site; deleting a site still deletes
-- its readings, now by this trigger in the deleting transaction.
ALTER TABLE readings DROP CONSTRAINT readings_site_key_fkey;

CREATE FUNCTION delete_site_readings() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    DELETE FROM readings WHERE site_key = OLD.key;
    RETURN OLD;
END
$$;

CREATE TRIGGER site_readings_deleted AFTER DELETE ON sites FOR EACH ROW EXECUTE FUNCTION delete_site_readings();
