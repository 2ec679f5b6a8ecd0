-- technician_day_loads follows every write to visits in the same transaction: a visit counts for
-- its technician's day when it has a technician and is not cancelled or skipped. Counts and
-- minutes are kept exact here; the driving (shared/utils/day-load.ts, computed by the app) is
-- cleared with a new version whenever the day's set of stops, a stop's site coordinates or the
-- technician's home change, and the board computes and stores it again on its next read.
CREATE FUNCTION technician_day_loads_add(company uuid, technician uuid, on_day date, minutes integer, sign integer) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF sign < 0 THEN
    -- Only an update: the company or technician may be being deleted.
    UPDATE technician_day_loads t SET visits = t.visits - 1, visit_minutes = t.visit_minutes - minutes,
      driving_minutes = NULL, stops_without_place = NULL, version = nextval('technician_day_load_version')
    WHERE t.company_id = company AND t.day = on_day AND t.technician_id = technician;
    DELETE FROM technician_day_loads t WHERE t.visits = 0 AND t.company_id = company AND t.day = on_day AND t.technician_id = technician;
    RETURN;
  END IF;
  INSERT INTO technician_day_loads AS t (company_id, technician_id, day, visits, visit_minutes, driving_minutes, stops_without_place, version)
  VALUES (company, technician, on_day, 1, minutes, NULL, NULL, nextval('technician_day_load_version'))
  ON CONFLICT ON CONSTRAINT technician_day_loads_pkey DO UPDATE SET
    visits = t.visits + 1,
    visit_minutes = t.visit_minutes + excluded.visit_minutes,
    driving_minutes = NULL,
    stops_without_place = NULL,
    version = excluded.version;
END $$;
--> statement-breakpoint
CREATE FUNCTION technician_day_loads_follow() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  old_counts boolean := false;
  new_counts boolean := false;
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN old_counts := OLD.technician_id IS NOT NULL AND OLD.status NOT IN ('cancelled', 'skipped'); END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN new_counts := NEW.technician_id IS NOT NULL AND NEW.status NOT IN ('cancelled', 'skipped'); END IF;
  -- The same stop on the same technician-day (a visit started, finished or re-timed): only its minutes can change, the driving cannot.
  IF old_counts AND new_counts AND OLD.company_id = NEW.company_id AND OLD.technician_id = NEW.technician_id
    AND OLD.scheduled_on = NEW.scheduled_on AND OLD.site_id = NEW.site_id THEN
    IF OLD.duration_minutes <> NEW.duration_minutes THEN
      UPDATE technician_day_loads t SET visit_minutes = t.visit_minutes + NEW.duration_minutes - OLD.duration_minutes
      WHERE t.company_id = NEW.company_id AND t.day = NEW.scheduled_on AND t.technician_id = NEW.technician_id;
    END IF;
    RETURN NULL;
  END IF;
  IF old_counts THEN PERFORM technician_day_loads_add(OLD.company_id, OLD.technician_id, OLD.scheduled_on, OLD.duration_minutes, -1); END IF;
  IF new_counts THEN PERFORM technician_day_loads_add(NEW.company_id, NEW.technician_id, NEW.scheduled_on, NEW.duration_minutes, 1); END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_follow AFTER INSERT OR DELETE OR UPDATE OF company_id, technician_id, scheduled_on, status, duration_minutes, site_id
  ON visits FOR EACH ROW EXECUTE FUNCTION technician_day_loads_follow();
--> statement-breakpoint
-- A site's coordinates move: the driving of every technician-day with a stop there is out of date.
CREATE FUNCTION technician_day_loads_follow_site() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  UPDATE technician_day_loads t SET driving_minutes = NULL, stops_without_place = NULL, version = nextval('technician_day_load_version')
  FROM (SELECT DISTINCT v.company_id, v.technician_id, v.scheduled_on FROM visits v
        WHERE v.site_id = NEW.id AND v.technician_id IS NOT NULL AND v.status NOT IN ('cancelled', 'skipped')) d
  WHERE t.company_id = d.company_id AND t.day = d.scheduled_on AND t.technician_id = d.technician_id;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_follow_site AFTER UPDATE OF latitude, longitude ON sites
  FOR EACH ROW WHEN (OLD.latitude IS DISTINCT FROM NEW.latitude OR OLD.longitude IS DISTINCT FROM NEW.longitude)
  EXECUTE FUNCTION technician_day_loads_follow_site();
--> statement-breakpoint
-- A technician's home base moves (or is first set): every route of theirs starts elsewhere.
CREATE FUNCTION technician_day_loads_follow_home() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'UPDATE' AND OLD.home_latitude IS NOT DISTINCT FROM NEW.home_latitude AND OLD.home_longitude IS NOT DISTINCT FROM NEW.home_longitude THEN RETURN NULL; END IF;
  UPDATE technician_day_loads t SET driving_minutes = NULL, stops_without_place = NULL, version = nextval('technician_day_load_version')
  WHERE t.technician_id = NEW.user_id;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_follow_home AFTER INSERT OR UPDATE OF home_latitude, home_longitude ON staff_profiles
  FOR EACH ROW EXECUTE FUNCTION technician_day_loads_follow_home();
--> statement-breakpoint
-- Back-fill: the visits there already are (the driving follows on the first read of each day).
INSERT INTO technician_day_loads (company_id, technician_id, day, visits, visit_minutes, driving_minutes, stops_without_place, version)
SELECT v.company_id, v.technician_id, v.scheduled_on, count(*), sum(v.duration_minutes), NULL, NULL, nextval('technician_day_load_version')
FROM visits v WHERE v.technician_id IS NOT NULL AND v.status NOT IN ('cancelled', 'skipped')
GROUP BY v.company_id, v.technician_id, v.scheduled_on;
