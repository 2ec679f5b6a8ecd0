CREATE TYPE "public"."billing_cadence" AS ENUM('yearly', 'monthly', 'per_visit');--> statement-breakpoint
CREATE TYPE "public"."visit_type" AS ENUM('spring_cleanout', 'routine', 'net_install', 'net_cleanout', 'fall_shutdown', 'water_test', 'repair');--> statement-breakpoint
CREATE TYPE "public"."contract_status" AS ENUM('draft', 'active', 'paused', 'ended', 'cancelled');--> statement-breakpoint
CREATE TYPE "public"."visit_status" AS ENUM('scheduled', 'in_progress', 'done', 'skipped', 'cancelled');--> statement-breakpoint
CREATE TABLE "plan_visit_templates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"plan_id" uuid NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"visit_type" "visit_type" NOT NULL,
	"rrule" text NOT NULL,
	"duration_minutes" integer NOT NULL,
	"checklist" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "plans" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"price_minor" integer NOT NULL,
	"currency" char(3) NOT NULL,
	"billing_cadence" "billing_cadence" NOT NULL,
	"term_months" integer DEFAULT 12 NOT NULL,
	"auto_renew_default" boolean DEFAULT true NOT NULL,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "contract_features" (
	"contract_id" uuid NOT NULL,
	"feature_id" uuid NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "contract_features_contract_id_feature_id_pk" PRIMARY KEY("contract_id","feature_id")
);
--> statement-breakpoint
CREATE TABLE "contracts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"plan_id" uuid NOT NULL,
	"status" "contract_status" DEFAULT 'draft' NOT NULL,
	"term_start" date NOT NULL,
	"term_end" date NOT NULL,
	"price_override_minor" integer,
	"currency" char(3) NOT NULL,
	"auto_renew" boolean NOT NULL,
	"previous_contract_id" uuid,
	"notes" text DEFAULT '' NOT NULL,
	"activated_at" timestamp with time zone,
	"ended_at" timestamp with time zone,
	"status_reason" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "calendar_feeds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"user_id" uuid,
	"customer_id" uuid,
	"token_hash" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "visits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"contract_id" uuid,
	"template_id" uuid,
	"customer_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"visit_type" "visit_type" NOT NULL,
	"status" "visit_status" DEFAULT 'scheduled' NOT NULL,
	"scheduled_on" date NOT NULL,
	"starts_at" timestamp with time zone NOT NULL,
	"duration_minutes" integer NOT NULL,
	"technician_id" uuid,
	"moved_manually" boolean DEFAULT false NOT NULL,
	"move_reason" text DEFAULT '' NOT NULL,
	"route_position" integer,
	"generation_key" text,
	"checklist" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"status_reason" text DEFAULT '' NOT NULL,
	"sequence" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "closed_days" (
	"company_id" uuid NOT NULL,
	"day" date NOT NULL,
	"reason" text DEFAULT '' NOT NULL,
	CONSTRAINT "closed_days_company_id_day_pk" PRIMARY KEY("company_id","day")
);
--> statement-breakpoint
CREATE TABLE "staff_profiles" (
	"user_id" uuid PRIMARY KEY NOT NULL,
	"capacity_minutes" integer DEFAULT 420 NOT NULL,
	"home_latitude" double precision,
	"home_longitude" double precision,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "companies" ADD COLUMN "working_days" smallint[] DEFAULT '{1,2,3,4,5}' NOT NULL;--> statement-breakpoint
ALTER TABLE "companies" ADD COLUMN "day_start_time" text DEFAULT '08:00' NOT NULL;--> statement-breakpoint
ALTER TABLE "companies" ADD COLUMN "base_latitude" double precision;--> statement-breakpoint
ALTER TABLE "companies" ADD COLUMN "base_longitude" double precision;--> statement-breakpoint
ALTER TABLE "plan_visit_templates" ADD CONSTRAINT "plan_visit_templates_plan_id_plans_id_fk" FOREIGN KEY ("plan_id") REFERENCES "public"."plans"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plans" ADD CONSTRAINT "plans_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contract_features" ADD CONSTRAINT "contract_features_contract_id_contracts_id_fk" FOREIGN KEY ("contract_id") REFERENCES "public"."contracts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contract_features" ADD CONSTRAINT "contract_features_feature_id_water_features_id_fk" FOREIGN KEY ("feature_id") REFERENCES "public"."water_features"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_plan_id_plans_id_fk" FOREIGN KEY ("plan_id") REFERENCES "public"."plans"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contracts" ADD CONSTRAINT "contracts_previous_contract_id_contracts_id_fk" FOREIGN KEY ("previous_contract_id") REFERENCES "public"."contracts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calendar_feeds" ADD CONSTRAINT "calendar_feeds_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calendar_feeds" ADD CONSTRAINT "calendar_feeds_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calendar_feeds" ADD CONSTRAINT "calendar_feeds_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_contract_id_contracts_id_fk" FOREIGN KEY ("contract_id") REFERENCES "public"."contracts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_template_id_plan_visit_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."plan_visit_templates"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "closed_days" ADD CONSTRAINT "closed_days_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "staff_profiles" ADD CONSTRAINT "staff_profiles_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "plan_visit_templates_plan_idx" ON "plan_visit_templates" USING btree ("plan_id","position");--> statement-breakpoint
CREATE INDEX "plans_company_idx" ON "plans" USING btree ("company_id");--> statement-breakpoint
CREATE INDEX "contracts_company_status_idx" ON "contracts" USING btree ("company_id","status");--> statement-breakpoint
CREATE INDEX "contracts_customer_idx" ON "contracts" USING btree ("customer_id");--> statement-breakpoint
CREATE INDEX "contracts_term_end_idx" ON "contracts" USING btree ("company_id","term_end");--> statement-breakpoint
CREATE UNIQUE INDEX "contracts_previous_key" ON "contracts" USING btree ("previous_contract_id");--> statement-breakpoint
CREATE UNIQUE INDEX "calendar_feeds_token_key" ON "calendar_feeds" USING btree ("token_hash");--> statement-breakpoint
CREATE UNIQUE INDEX "visits_contract_generation_key" ON "visits" USING btree ("contract_id","generation_key");--> statement-breakpoint
CREATE INDEX "visits_company_date_idx" ON "visits" USING btree ("company_id","scheduled_on");--> statement-breakpoint
CREATE INDEX "visits_technician_date_idx" ON "visits" USING btree ("technician_id","scheduled_on");--> statement-breakpoint
CREATE INDEX "visits_customer_date_idx" ON "visits" USING btree ("customer_id","scheduled_on");