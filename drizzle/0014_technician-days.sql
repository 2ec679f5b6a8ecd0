CREATE TABLE "technician_days_off" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"company_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"from_day" date NOT NULL,
	"to_day" date NOT NULL,
	"reason" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "technician_days_off_range" CHECK ("technician_days_off"."to_day" >= "technician_days_off"."from_day")
);
--> statement-breakpoint
ALTER TABLE "staff_profiles" ADD COLUMN "working_days" smallint[];--> statement-breakpoint
ALTER TABLE "technician_days_off" ADD CONSTRAINT "technician_days_off_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "technician_days_off" ADD CONSTRAINT "technician_days_off_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "technician_days_off_user_idx" ON "technician_days_off" USING btree ("user_id","from_day");