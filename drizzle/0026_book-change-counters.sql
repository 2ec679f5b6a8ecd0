-- Two more change-counter topics (server/db/schema/change-counters.ts): 'customers' follows the
-- company's customers, their contacts, sites and water features; 'schedule' its visits, staff
-- and which features each contract covers. Today, the schedule board, the customers list and the
-- invoices table are kept per process under them (server/utils/versioned-cache.ts). Statement
-- triggers, one counter update per company and statement, as in 0021.
CREATE TRIGGER change_counters_customers_ins AFTER INSERT ON customers REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_customers_upd AFTER UPDATE ON customers REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_customers_del AFTER DELETE ON customers REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_sites_ins AFTER INSERT ON sites REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_sites_upd AFTER UPDATE ON sites REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_sites_del AFTER DELETE ON sites REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_book_features_ins AFTER INSERT ON water_features REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_book_features_upd AFTER UPDATE ON water_features REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_book_features_del AFTER DELETE ON water_features REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('customers');
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_visits_ins AFTER INSERT ON visits REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('schedule');
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_visits_upd AFTER UPDATE ON visits REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('schedule');
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_visits_del AFTER DELETE ON visits REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_by_company('schedule');
--> statement-breakpoint
-- Contacts have no company of their own: their customer's. (A customer deleted with its
-- contacts raises its own counter.)
CREATE FUNCTION change_counters_customer_contacts() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump('customers', ARRAY(SELECT c.company_id FROM customers c WHERE c.id IN (SELECT customer_id FROM new_rows)));
  ELSIF TG_OP = 'UPDATE' THEN PERFORM change_counters_bump('customers', ARRAY(SELECT c.company_id FROM customers c WHERE c.id IN (SELECT customer_id FROM old_rows UNION SELECT customer_id FROM new_rows)));
  ELSE PERFORM change_counters_bump('customers', ARRAY(SELECT c.company_id FROM customers c WHERE c.id IN (SELECT customer_id FROM old_rows)));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_customer_contacts_ins AFTER INSERT ON customer_contacts REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_customer_contacts();
--> statement-breakpoint
CREATE TRIGGER change_counters_customer_contacts_upd AFTER UPDATE ON customer_contacts REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_customer_contacts();
--> statement-breakpoint
CREATE TRIGGER change_counters_customer_contacts_del AFTER DELETE ON customer_contacts REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_customer_contacts();
--> statement-breakpoint
-- Staff: a user's name, role, activity or company (not each sign-in's bookkeeping); a staff
-- profile (capacity, home base, working days) through its user's company.
CREATE FUNCTION change_counters_schedule_users() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT company_id FROM new_rows));
  ELSIF TG_OP = 'DELETE' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT company_id FROM old_rows));
  ELSE
    PERFORM change_counters_bump('schedule', ARRAY(
      SELECT company_id FROM (
        (SELECT id, company_id, name, role, active FROM old_rows EXCEPT SELECT id, company_id, name, role, active FROM new_rows)
        UNION ALL
        (SELECT id, company_id, name, role, active FROM new_rows EXCEPT SELECT id, company_id, name, role, active FROM old_rows)) d));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_users_ins AFTER INSERT ON users REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_users();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_users_upd AFTER UPDATE ON users REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_users();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_users_del AFTER DELETE ON users REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_users();
--> statement-breakpoint
CREATE FUNCTION change_counters_schedule_staff_profiles() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT u.company_id FROM users u WHERE u.id IN (SELECT user_id FROM new_rows)));
  ELSIF TG_OP = 'UPDATE' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT u.company_id FROM users u WHERE u.id IN (SELECT user_id FROM old_rows UNION SELECT user_id FROM new_rows)));
  ELSE PERFORM change_counters_bump('schedule', ARRAY(SELECT u.company_id FROM users u WHERE u.id IN (SELECT user_id FROM old_rows)));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_staff_profiles_ins AFTER INSERT ON staff_profiles REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_staff_profiles();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_staff_profiles_upd AFTER UPDATE ON staff_profiles REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_staff_profiles();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_staff_profiles_del AFTER DELETE ON staff_profiles REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_staff_profiles();
--> statement-breakpoint
-- Which features a contract covers (the feature names on Today's stops), through the contract's company.
CREATE FUNCTION change_counters_schedule_contract_features() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT c.company_id FROM contracts c WHERE c.id IN (SELECT contract_id FROM new_rows)));
  ELSIF TG_OP = 'UPDATE' THEN PERFORM change_counters_bump('schedule', ARRAY(SELECT c.company_id FROM contracts c WHERE c.id IN (SELECT contract_id FROM old_rows UNION SELECT contract_id FROM new_rows)));
  ELSE PERFORM change_counters_bump('schedule', ARRAY(SELECT c.company_id FROM contracts c WHERE c.id IN (SELECT contract_id FROM old_rows)));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_contract_features_ins AFTER INSERT ON contract_features REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_contract_features();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_contract_features_upd AFTER UPDATE ON contract_features REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_contract_features();
--> statement-breakpoint
CREATE TRIGGER change_counters_schedule_contract_features_del AFTER DELETE ON contract_features REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_schedule_contract_features();
--> statement-breakpoint
-- The company's settings (time zone, home base, units) shape all four answers.
CREATE FUNCTION change_counters_companies_book() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM change_counters_bump('customers', ARRAY(SELECT id FROM new_rows));
  PERFORM change_counters_bump('schedule', ARRAY(SELECT id FROM new_rows));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER change_counters_companies_book_upd AFTER UPDATE ON companies REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION change_counters_companies_book();
