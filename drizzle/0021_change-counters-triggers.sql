-- Change counters follow the rows each cached answer is computed from, in the same transaction
-- as every write (server/db/schema/change-counters.ts names the topics). Statement-level
-- triggers with transition tables: one counter update per subject and statement, however many
-- rows the statement touches. Subjects are locked in id order, so two statements touching the
-- same subjects cannot deadlock on the counters.
CREATE FUNCTION change_counters_bump(p_topic text, p_subjects uuid[]) RETURNS void LANGUAGE sql AS $$
  INSERT INTO change_counters AS c (topic, subject_id, version)
  SELECT p_topic, s.id, 1 FROM (SELECT DISTINCT id FROM unnest(p_subjects) AS u(id) WHERE id IS NOT NULL ORDER BY id) s
  ON CONFLICT ON CONSTRAINT change_counters_pk DO UPDATE SET version = c.version + 1
$$;
--> statement-breakpoint
-- Contracts and plans: the company's revenue figures.
CREATE FUNCTION change_counters_by_company() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump(TG_ARGV[0], ARRAY(SELECT company_id FROM new_rows));
  ELSIF TG_OP = 'UPDATE' THEN PERFORM change_counters_bump(TG_ARGV[0], ARRAY(SELECT company_id FROM old_rows UNION SELECT company_id FROM new_rows));
  ELSE PERFORM change_counters_bump(TG_ARGV[0], ARRAY(SELECT company_id FROM old_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_contracts_ins AFTER INSERT ON contracts REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
CREATE TRIGGER change_counters_contracts_upd AFTER UPDATE ON contracts REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
CREATE TRIGGER change_counters_contracts_del AFTER DELETE ON contracts REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
CREATE TRIGGER change_counters_plans_ins AFTER INSERT ON plans REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
CREATE TRIGGER change_counters_plans_upd AFTER UPDATE ON plans REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
CREATE TRIGGER change_counters_plans_del AFTER DELETE ON plans REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('revenue');
--> statement-breakpoint
-- Invoices: the revenue view's receivables and invoiced figures (read from invoice_day_totals,
-- which row triggers keep in the same statement).
CREATE TRIGGER change_counters_invoices_ins AFTER INSERT ON invoices REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('invoices');
--> statement-breakpoint
CREATE TRIGGER change_counters_invoices_upd AFTER UPDATE ON invoices REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('invoices');
--> statement-breakpoint
CREATE TRIGGER change_counters_invoices_del AFTER DELETE ON invoices REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('invoices');
--> statement-breakpoint
-- Range profiles: every series of the company reads its feature's ranges.
CREATE TRIGGER change_counters_range_profiles_ins AFTER INSERT ON range_profiles REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('ranges');
--> statement-breakpoint
CREATE TRIGGER change_counters_range_profiles_upd AFTER UPDATE ON range_profiles REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('ranges');
--> statement-breakpoint
CREATE TRIGGER change_counters_range_profiles_del AFTER DELETE ON range_profiles REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('ranges');
--> statement-breakpoint
-- The company's settings: its currency and time zone shape both the revenue figures and the
-- series' windows.
CREATE FUNCTION change_counters_companies() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM change_counters_bump('revenue', ARRAY(SELECT id FROM new_rows));
  PERFORM change_counters_bump('ranges', ARRAY(SELECT id FROM new_rows));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_companies_upd AFTER UPDATE ON companies REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_companies();
--> statement-breakpoint
-- Readings and doses (feature_id) and the feature itself (id): that feature's series.
CREATE FUNCTION change_counters_by_feature() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump('feature', ARRAY(SELECT feature_id FROM new_rows));
  ELSIF TG_OP = 'UPDATE' THEN PERFORM change_counters_bump('feature', ARRAY(SELECT feature_id FROM old_rows UNION SELECT feature_id FROM new_rows));
  ELSE PERFORM change_counters_bump('feature', ARRAY(SELECT feature_id FROM old_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_readings_ins AFTER INSERT ON readings REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE TRIGGER change_counters_readings_upd AFTER UPDATE ON readings REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE TRIGGER change_counters_readings_del AFTER DELETE ON readings REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE TRIGGER change_counters_doses_ins AFTER INSERT ON doses REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE TRIGGER change_counters_doses_upd AFTER UPDATE ON doses REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE TRIGGER change_counters_doses_del AFTER DELETE ON doses REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_feature();
--> statement-breakpoint
CREATE FUNCTION change_counters_features() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN PERFORM change_counters_bump('feature', ARRAY(SELECT id FROM old_rows));
  ELSE PERFORM change_counters_bump('feature', ARRAY(SELECT id FROM new_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_features_upd AFTER UPDATE ON water_features REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_features();
--> statement-breakpoint
CREATE TRIGGER change_counters_features_del AFTER DELETE ON water_features REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_features();
--> statement-breakpoint
-- Visits: a per-visit contract's value counts its visits that are not cancelled (revenue), and
-- every series of a feature at the site shows the finished ones (feature). Only rows whose
-- part in either answer changed raise a counter: a visit re-planned or started raises neither.
CREATE FUNCTION change_counters_bump_sites(p_sites uuid[]) RETURNS void LANGUAGE sql AS $$
  SELECT change_counters_bump('feature', ARRAY(SELECT f.id FROM water_features f WHERE f.site_id = ANY(p_sites)))
$$;
--> statement-breakpoint
CREATE FUNCTION change_counters_visits() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM change_counters_bump('revenue', ARRAY(SELECT company_id FROM new_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled'));
    PERFORM change_counters_bump_sites(ARRAY(SELECT site_id FROM new_rows WHERE status = 'done'));
  ELSIF TG_OP = 'DELETE' THEN
    PERFORM change_counters_bump('revenue', ARRAY(SELECT company_id FROM old_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled'));
    PERFORM change_counters_bump_sites(ARRAY(SELECT site_id FROM old_rows WHERE status = 'done'));
  ELSE
    -- Set differences, not a join of the two transition tables (which have no index): a row
    -- whose part did not change is in both and drops out.
    PERFORM change_counters_bump('revenue', ARRAY(
      SELECT company_id FROM (
        (SELECT id, company_id, contract_id FROM old_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled'
         EXCEPT SELECT id, company_id, contract_id FROM new_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled')
        UNION ALL
        (SELECT id, company_id, contract_id FROM new_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled'
         EXCEPT SELECT id, company_id, contract_id FROM old_rows WHERE contract_id IS NOT NULL AND status <> 'cancelled')) d));
    PERFORM change_counters_bump_sites(ARRAY(
      SELECT site_id FROM (
        (SELECT id, site_id, company_id, scheduled_on, visit_type, started_at, finished_at, starts_at FROM old_rows WHERE status = 'done'
         EXCEPT SELECT id, site_id, company_id, scheduled_on, visit_type, started_at, finished_at, starts_at FROM new_rows WHERE status = 'done')
        UNION ALL
        (SELECT id, site_id, company_id, scheduled_on, visit_type, started_at, finished_at, starts_at FROM new_rows WHERE status = 'done'
         EXCEPT SELECT id, site_id, company_id, scheduled_on, visit_type, started_at, finished_at, starts_at FROM old_rows WHERE status = 'done')) d));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_visits_ins AFTER INSERT ON visits REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_visits();
--> statement-breakpoint
CREATE TRIGGER change_counters_visits_upd AFTER UPDATE ON visits REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_visits();
--> statement-breakpoint
CREATE TRIGGER change_counters_visits_del AFTER DELETE ON visits REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_visits();
