-- technician_day_loads follows visits once per statement instead of once per row (renewals and
-- the planner write visits by the thousand). Same rules as 0023: a visit counts for its
-- technician's day when it has a technician and is neither cancelled nor skipped; counts and
-- minutes are kept exact; the driving is cleared, with a new version, only for the days whose set
-- of stops (or a stop's site) changed. Old and new rows are compared by set difference, not by a
-- join of the two transition tables (which have no index).
DROP TRIGGER technician_day_loads_follow ON visits;
--> statement-breakpoint
DROP FUNCTION technician_day_loads_follow();
--> statement-breakpoint
DROP FUNCTION technician_day_loads_add(uuid, uuid, date, integer, integer);
--> statement-breakpoint
CREATE FUNCTION technician_day_loads_follow_visits() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    INSERT INTO technician_day_loads AS t (company_id, technician_id, day, visits, visit_minutes, driving_minutes, stops_without_place, version)
    SELECT company_id, technician_id, scheduled_on, count(*), sum(duration_minutes), NULL, NULL, nextval('technician_day_load_version')
    FROM new_rows WHERE technician_id IS NOT NULL AND status NOT IN ('cancelled', 'skipped')
    GROUP BY company_id, technician_id, scheduled_on ORDER BY company_id, technician_id, scheduled_on
    ON CONFLICT ON CONSTRAINT technician_day_loads_pkey DO UPDATE SET
      visits = t.visits + excluded.visits, visit_minutes = t.visit_minutes + excluded.visit_minutes,
      driving_minutes = NULL, stops_without_place = NULL, version = excluded.version;
    RETURN NULL;
  END IF;

  IF TG_OP = 'DELETE' THEN
    UPDATE technician_day_loads t SET visits = t.visits - d.n, visit_minutes = t.visit_minutes - d.m,
      driving_minutes = NULL, stops_without_place = NULL, version = nextval('technician_day_load_version')
    FROM (SELECT company_id, technician_id, scheduled_on AS day, count(*)::int AS n, sum(duration_minutes)::int AS m
          FROM old_rows WHERE technician_id IS NOT NULL AND status NOT IN ('cancelled', 'skipped') GROUP BY 1, 2, 3) d
    WHERE t.company_id = d.company_id AND t.technician_id = d.technician_id AND t.day = d.day;
    DELETE FROM technician_day_loads t USING (SELECT DISTINCT company_id, technician_id, scheduled_on FROM old_rows) d
    WHERE t.visits <= 0 AND t.company_id = d.company_id AND t.technician_id = d.technician_id AND t.day = d.scheduled_on;
    RETURN NULL;
  END IF;

  -- UPDATE: per technician-day, the change in visits and minutes, and whether a stop left or
  -- joined it (then its driving is out of date).
  WITH o AS (SELECT id, company_id, technician_id, scheduled_on AS day, site_id, duration_minutes AS m FROM old_rows
             WHERE technician_id IS NOT NULL AND status NOT IN ('cancelled', 'skipped')),
       n AS (SELECT id, company_id, technician_id, scheduled_on AS day, site_id, duration_minutes AS m FROM new_rows
             WHERE technician_id IS NOT NULL AND status NOT IN ('cancelled', 'skipped')),
       moved AS ((SELECT id, company_id, technician_id, day, site_id FROM o EXCEPT SELECT id, company_id, technician_id, day, site_id FROM n)
                 UNION ALL
                 (SELECT id, company_id, technician_id, day, site_id FROM n EXCEPT SELECT id, company_id, technician_id, day, site_id FROM o)),
       deltas AS (
         SELECT company_id, technician_id, day, sum(dv)::int AS dv, sum(dm)::int AS dm, bool_or(stale) AS stale FROM (
           SELECT company_id, technician_id, day, -1 AS dv, -m AS dm, false AS stale FROM o
           UNION ALL SELECT company_id, technician_id, day, 1, m, false FROM n
           UNION ALL SELECT company_id, technician_id, day, 0, 0, true FROM moved) x
         GROUP BY 1, 2, 3 HAVING sum(dv) <> 0 OR sum(dm) <> 0 OR bool_or(stale)),
       updated AS (
         UPDATE technician_day_loads t SET visits = t.visits + d.dv, visit_minutes = t.visit_minutes + d.dm,
           driving_minutes = CASE WHEN d.stale THEN NULL ELSE t.driving_minutes END,
           stops_without_place = CASE WHEN d.stale THEN NULL ELSE t.stops_without_place END,
           version = CASE WHEN d.stale THEN nextval('technician_day_load_version') ELSE t.version END
         FROM deltas d WHERE t.company_id = d.company_id AND t.technician_id = d.technician_id AND t.day = d.day
         RETURNING t.company_id, t.technician_id, t.day)
  -- A day that had no row yet gains its first stops (a stop joined it: its driving is unknown).
  INSERT INTO technician_day_loads AS t (company_id, technician_id, day, visits, visit_minutes, driving_minutes, stops_without_place, version)
  SELECT d.company_id, d.technician_id, d.day, d.dv, d.dm, NULL, NULL, nextval('technician_day_load_version') FROM deltas d
  WHERE d.dv > 0 AND NOT EXISTS (SELECT 1 FROM updated u WHERE u.company_id = d.company_id AND u.technician_id = d.technician_id AND u.day = d.day)
  ORDER BY 1, 2, 3
  ON CONFLICT ON CONSTRAINT technician_day_loads_pkey DO UPDATE SET
    visits = t.visits + excluded.visits, visit_minutes = t.visit_minutes + excluded.visit_minutes,
    driving_minutes = NULL, stops_without_place = NULL, version = excluded.version;
  DELETE FROM technician_day_loads t USING (SELECT DISTINCT company_id, technician_id, scheduled_on FROM old_rows WHERE technician_id IS NOT NULL) d
  WHERE t.visits <= 0 AND t.company_id = d.company_id AND t.technician_id = d.technician_id AND t.day = d.scheduled_on;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_visits_ins AFTER INSERT ON visits REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION technician_day_loads_follow_visits();
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_visits_upd AFTER UPDATE ON visits REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION technician_day_loads_follow_visits();
--> statement-breakpoint
CREATE TRIGGER technician_day_loads_visits_del AFTER DELETE ON visits REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION technician_day_loads_follow_visits();
