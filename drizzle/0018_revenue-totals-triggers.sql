-- The revenue totals follow their rows in the same transaction as every write.
-- invoice_day_totals follows every write to invoices, and the plan of
-- an invoice's contract when the contract changes plan. No invoice state is named here: the
-- totals are kept per state, and readers choose the states (shared/types/billing.ts).
CREATE FUNCTION invoice_day_totals_add(inv invoices, plan uuid, sign integer) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF sign < 0 THEN
    -- Only an update: a row whose company is being deleted may already be gone.
    UPDATE invoice_day_totals t SET invoices = t.invoices - 1, subtotal_minor = t.subtotal_minor - inv.subtotal_minor,
      total_minor = t.total_minor - inv.total_minor, amount_paid_minor = t.amount_paid_minor - inv.amount_paid_minor
    WHERE t.company_id = inv.company_id AND t.currency = inv.currency AND t.status = inv.status AND t.plan_id IS NOT DISTINCT FROM plan
      AND t.issue_date IS NOT DISTINCT FROM inv.issue_date AND t.due_date IS NOT DISTINCT FROM inv.due_date;
    DELETE FROM invoice_day_totals t WHERE t.invoices = 0 AND t.company_id = inv.company_id AND t.currency = inv.currency AND t.status = inv.status
      AND t.plan_id IS NOT DISTINCT FROM plan AND t.issue_date IS NOT DISTINCT FROM inv.issue_date AND t.due_date IS NOT DISTINCT FROM inv.due_date;
    RETURN;
  END IF;
  INSERT INTO invoice_day_totals AS t (company_id, currency, status, plan_id, issue_date, due_date, invoices, subtotal_minor, total_minor, amount_paid_minor)
  VALUES (inv.company_id, inv.currency, inv.status, plan, inv.issue_date, inv.due_date, 1, inv.subtotal_minor, inv.total_minor, inv.amount_paid_minor)
  ON CONFLICT ON CONSTRAINT invoice_day_totals_key DO UPDATE SET
    invoices = t.invoices + 1,
    subtotal_minor = t.subtotal_minor + excluded.subtotal_minor,
    total_minor = t.total_minor + excluded.total_minor,
    amount_paid_minor = t.amount_paid_minor + excluded.amount_paid_minor;
END $$;
--> statement-breakpoint
CREATE FUNCTION invoice_contract_plan(contract uuid) RETURNS uuid LANGUAGE sql STABLE AS $$
  SELECT plan_id FROM contracts WHERE id = contract
$$;
--> statement-breakpoint
CREATE FUNCTION invoice_totals_follow() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN PERFORM invoice_day_totals_add(OLD, invoice_contract_plan(OLD.contract_id), -1); END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN PERFORM invoice_day_totals_add(NEW, invoice_contract_plan(NEW.contract_id), 1); END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER invoice_totals_follow AFTER INSERT OR DELETE OR UPDATE OF company_id, currency, status, contract_id, issue_date, due_date, subtotal_minor, total_minor, amount_paid_minor
  ON invoices FOR EACH ROW EXECUTE FUNCTION invoice_totals_follow();
--> statement-breakpoint
CREATE FUNCTION invoice_totals_follow_plan() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE inv invoices;
BEGIN
  FOR inv IN SELECT * FROM invoices WHERE contract_id = NEW.id LOOP
    PERFORM invoice_day_totals_add(inv, OLD.plan_id, -1);
    PERFORM invoice_day_totals_add(inv, NEW.plan_id, 1);
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER invoice_totals_follow_plan AFTER UPDATE OF plan_id ON contracts
  FOR EACH ROW WHEN (OLD.plan_id IS DISTINCT FROM NEW.plan_id) EXECUTE FUNCTION invoice_totals_follow_plan();
--> statement-breakpoint
-- Back-fill: the invoices there already are.
INSERT INTO invoice_day_totals (company_id, currency, status, plan_id, issue_date, due_date, invoices, subtotal_minor, total_minor, amount_paid_minor)
SELECT i.company_id, i.currency, i.status, c.plan_id, i.issue_date, i.due_date, count(*), sum(i.subtotal_minor), sum(i.total_minor), sum(i.amount_paid_minor)
FROM invoices i LEFT JOIN contracts c ON c.id = i.contract_id
GROUP BY i.company_id, i.currency, i.status, c.plan_id, i.issue_date, i.due_date;
--> statement-breakpoint
-- contract_planned_visits counts a contract's visits that are not cancelled.
CREATE FUNCTION contract_planned_visits_add(contract uuid, visit_status visit_status, sign integer) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF contract IS NULL OR visit_status = 'cancelled' THEN RETURN; END IF;
  IF sign < 0 THEN
    -- Only an update: the contract may be being deleted.
    UPDATE contract_planned_visits SET visits = visits - 1 WHERE contract_id = contract;
  ELSE
    INSERT INTO contract_planned_visits AS t (contract_id, visits) VALUES (contract, 1)
    ON CONFLICT (contract_id) DO UPDATE SET visits = t.visits + 1;
  END IF;
END $$;
--> statement-breakpoint
CREATE FUNCTION contract_planned_visits_follow() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN PERFORM contract_planned_visits_add(OLD.contract_id, OLD.status, -1); END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN PERFORM contract_planned_visits_add(NEW.contract_id, NEW.status, 1); END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER contract_planned_visits_follow AFTER INSERT OR DELETE OR UPDATE OF contract_id, status
  ON visits FOR EACH ROW EXECUTE FUNCTION contract_planned_visits_follow();
--> statement-breakpoint
INSERT INTO contract_planned_visits (contract_id, visits)
SELECT contract_id, count(*) FROM visits WHERE contract_id IS NOT NULL AND status <> 'cancelled' GROUP BY contract_id;
