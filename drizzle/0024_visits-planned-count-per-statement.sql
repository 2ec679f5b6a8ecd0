-- contract_planned_visits follows visits once per statement instead of once per row: a batch of
-- renewals inserts tens of thousands of visits in one statement, and the per-row trigger (an
-- upsert per visit) was a quarter of that insert's time. Same rule as before: a contract's visits
-- that are not cancelled. The net change per contract is applied with one statement.
DROP TRIGGER contract_planned_visits_follow ON visits;
--> statement-breakpoint
DROP FUNCTION contract_planned_visits_follow();
--> statement-breakpoint
DROP FUNCTION contract_planned_visits_add(uuid, visit_status, integer);
--> statement-breakpoint
CREATE FUNCTION contract_planned_visits_apply(delta jsonb) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  -- delta: [{ "contract": uuid, "n": change }]; a contract being deleted may already be gone, so
  -- a decrease only updates, an increase inserts or adds.
  UPDATE contract_planned_visits t SET visits = t.visits + d.n
  FROM jsonb_to_recordset(delta) AS d(contract uuid, n integer)
  WHERE d.n < 0 AND t.contract_id = d.contract;
  INSERT INTO contract_planned_visits AS t (contract_id, visits)
  SELECT d.contract, d.n FROM jsonb_to_recordset(delta) AS d(contract uuid, n integer) WHERE d.n > 0
  ON CONFLICT (contract_id) DO UPDATE SET visits = t.visits + excluded.visits;
END $$;
--> statement-breakpoint
CREATE FUNCTION contract_planned_visits_follow_insert() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM contract_planned_visits_apply(coalesce((
    SELECT jsonb_agg(jsonb_build_object('contract', contract_id, 'n', n)) FROM (
      SELECT contract_id, count(*)::int AS n FROM new_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled' GROUP BY contract_id) x), '[]'));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION contract_planned_visits_follow_delete() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM contract_planned_visits_apply(coalesce((
    SELECT jsonb_agg(jsonb_build_object('contract', contract_id, 'n', -n)) FROM (
      SELECT contract_id, count(*)::int AS n FROM old_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled' GROUP BY contract_id) x), '[]'));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION contract_planned_visits_follow_update() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  -- Only rows whose contract or cancelled-ness changed count.
  PERFORM contract_planned_visits_apply(coalesce((
    SELECT jsonb_agg(jsonb_build_object('contract', contract_id, 'n', n)) FROM (
      SELECT contract_id, sum(n)::int AS n FROM (
        SELECT o.contract_id, -1 AS n FROM old_rows o JOIN new_rows v ON v.id = o.id
        WHERE o.contract_id IS NOT NULL AND o.status <> 'cancelled'
          AND (o.contract_id IS DISTINCT FROM v.contract_id OR v.status = 'cancelled')
        UNION ALL
        SELECT v.contract_id, 1 FROM old_rows o JOIN new_rows v ON v.id = o.id
        WHERE v.contract_id IS NOT NULL AND v.status <> 'cancelled'
          AND (o.contract_id IS DISTINCT FROM v.contract_id OR o.status = 'cancelled')
      ) c GROUP BY contract_id HAVING sum(n) <> 0) x), '[]'));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER contract_planned_visits_follow_insert AFTER INSERT ON visits
  REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION contract_planned_visits_follow_insert();
--> statement-breakpoint
CREATE TRIGGER contract_planned_visits_follow_delete AFTER DELETE ON visits
  REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION contract_planned_visits_follow_delete();
--> statement-breakpoint
CREATE TRIGGER contract_planned_visits_follow_update AFTER UPDATE ON visits
  REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION contract_planned_visits_follow_update();
