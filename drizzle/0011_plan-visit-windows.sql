ALTER TABLE "plan_visit_templates" ADD COLUMN "season_from" text DEFAULT '01-01' NOT NULL;--> statement-breakpoint
ALTER TABLE "plan_visit_templates" ADD COLUMN "season_to" text DEFAULT '12-31' NOT NULL;--> statement-breakpoint
ALTER TABLE "plan_visit_templates" ADD COLUMN "tolerance_days" integer DEFAULT 0 NOT NULL;