CREATE TYPE "public"."feature_kind" AS ENUM('koi_pond', 'water_garden', 'pondless_waterfall', 'stream', 'fountain', 'wetland_filter');--> statement-breakpoint
CREATE TABLE "customer_contacts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"customer_id" uuid NOT NULL,
	"name" text NOT NULL,
	"email" text,
	"phone" text,
	"gets_reports" boolean DEFAULT true NOT NULL,
	"gets_invoices" boolean DEFAULT true NOT NULL,
	"gets_alerts" boolean DEFAULT true NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"name" text NOT NULL,
	"line1" text NOT NULL,
	"line2" text DEFAULT '' NOT NULL,
	"city" text NOT NULL,
	"region" text DEFAULT '' NOT NULL,
	"postcode" text DEFAULT '' NOT NULL,
	"country" text DEFAULT 'US' NOT NULL,
	"latitude" double precision,
	"longitude" double precision,
	"altitude_m" double precision,
	"access_notes" text DEFAULT '' NOT NULL,
	"gate_code" text DEFAULT '' NOT NULL,
	"hazards" text[] DEFAULT '{}' NOT NULL,
	"hazard_notes" text DEFAULT '' NOT NULL,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "range_profiles" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"key" text NOT NULL,
	"name" text NOT NULL,
	"ranges" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "water_features" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"site_id" uuid NOT NULL,
	"name" text NOT NULL,
	"kind" "feature_kind" NOT NULL,
	"shape" jsonb NOT NULL,
	"surface_area_m2" double precision NOT NULL,
	"computed_volume_l" double precision NOT NULL,
	"measured_volume_l" double precision,
	"equipment" jsonb NOT NULL,
	"fish" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"plants" text DEFAULT '' NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"installed_on" date,
	"range_profile_id" uuid,
	"range_overrides" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"archived_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_line1" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_line2" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_city" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_region" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_postcode" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "billing_country" text DEFAULT 'US' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "tags" text[] DEFAULT '{}' NOT NULL;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "archived_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "customer_contacts" ADD CONSTRAINT "customer_contacts_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "range_profiles" ADD CONSTRAINT "range_profiles_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_features" ADD CONSTRAINT "water_features_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_features" ADD CONSTRAINT "water_features_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_features" ADD CONSTRAINT "water_features_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_features" ADD CONSTRAINT "water_features_range_profile_id_range_profiles_id_fk" FOREIGN KEY ("range_profile_id") REFERENCES "public"."range_profiles"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "customer_contacts_customer_idx" ON "customer_contacts" USING btree ("customer_id","position");--> statement-breakpoint
CREATE INDEX "customer_contacts_email_idx" ON "customer_contacts" USING btree ("email");--> statement-breakpoint
CREATE INDEX "sites_customer_idx" ON "sites" USING btree ("customer_id");--> statement-breakpoint
CREATE INDEX "sites_company_city_idx" ON "sites" USING btree ("company_id","city");--> statement-breakpoint
CREATE UNIQUE INDEX "range_profiles_company_key" ON "range_profiles" USING btree ("company_id","key");--> statement-breakpoint
CREATE INDEX "water_features_site_idx" ON "water_features" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "water_features_customer_idx" ON "water_features" USING btree ("customer_id");--> statement-breakpoint
CREATE INDEX "water_features_company_kind_idx" ON "water_features" USING btree ("company_id","kind");