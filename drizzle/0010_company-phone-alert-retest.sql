ALTER TABLE "companies" ADD COLUMN "phone" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "alerts" ADD COLUMN "retest_visit_id" uuid;--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_retest_visit_id_visits_id_fk" FOREIGN KEY ("retest_visit_id") REFERENCES "public"."visits"("id") ON DELETE set null ON UPDATE no action;