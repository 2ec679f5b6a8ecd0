CREATE TABLE "contract_planned_visits" (
	"contract_id" uuid PRIMARY KEY NOT NULL,
	"visits" integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE "invoice_day_totals" (
	"company_id" uuid NOT NULL,
	"currency" text NOT NULL,
	"status" "invoice_status" NOT NULL,
	"plan_id" uuid,
	"issue_date" date,
	"due_date" date,
	"invoices" integer NOT NULL,
	"subtotal_minor" bigint NOT NULL,
	"total_minor" bigint NOT NULL,
	"amount_paid_minor" bigint NOT NULL,
	CONSTRAINT "invoice_day_totals_key" UNIQUE NULLS NOT DISTINCT("company_id","currency","status","plan_id","issue_date","due_date")
);
--> statement-breakpoint
DROP INDEX "invoices_company_issue_idx";--> statement-breakpoint
ALTER TABLE "contract_planned_visits" ADD CONSTRAINT "contract_planned_visits_contract_id_contracts_id_fk" FOREIGN KEY ("contract_id") REFERENCES "public"."contracts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invoice_day_totals" ADD CONSTRAINT "invoice_day_totals_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "invoice_day_totals_company_status_due_idx" ON "invoice_day_totals" USING btree ("company_id","status","due_date");--> statement-breakpoint
CREATE INDEX "invoices_company_due_idx" ON "invoices" USING btree ("company_id","due_date","number_year","number_seq","id");--> statement-breakpoint
CREATE INDEX "invoices_company_total_idx" ON "invoices" USING btree ("company_id","total_minor","number_year","number_seq","id");--> statement-breakpoint
CREATE INDEX "invoices_company_issue_idx" ON "invoices" USING btree ("company_id","issue_date","number_year","number_seq","id");