-- The alert scan reads readings past a watermark (readings.seq). Two gaps closed here:
-- 1. A transaction that drew a lower seq can commit after the scan moved past a higher one. Every
--    statement that writes readings first takes a shared advisory lock, held until commit; the scan
--    takes the same key exclusively for a moment before it reads max(seq), so every seq at or
--    below that bound belongs to a committed transaction (a later writer draws a higher one).
-- 2. A reading saved again with other values keeps its row: it draws a new seq, so the next scan
--    looks at it again. Saved again unchanged (only updated_at moves) it keeps its seq.
CREATE FUNCTION readings_writers_hold() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_advisory_xact_lock_shared(hashtext('alerts:scan:readings'));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER readings_writers_hold BEFORE INSERT OR UPDATE ON readings FOR EACH STATEMENT EXECUTE FUNCTION readings_writers_hold();
--> statement-breakpoint
CREATE FUNCTION readings_rescan_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  NEW.seq := nextval(pg_get_serial_sequence('readings', 'seq'));
  RETURN NEW;
END $$;
--> statement-breakpoint
CREATE TRIGGER readings_rescan_changed BEFORE UPDATE ON readings FOR EACH ROW WHEN ((to_jsonb(OLD) - 'updated_at' - 'created_at') IS DISTINCT FROM (to_jsonb(NEW) - 'updated_at' - 'created_at')) EXECUTE FUNCTION readings_rescan_changed();
