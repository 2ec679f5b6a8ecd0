CREATE SEQUENCE "public"."technician_day_load_version" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1;--> statement-breakpoint
CREATE TABLE "technician_day_loads" (
	"company_id" uuid NOT NULL,
	"technician_id" uuid NOT NULL,
	"day" date NOT NULL,
	"visits" integer NOT NULL,
	"visit_minutes" integer NOT NULL,
	"driving_minutes" double precision,
	"stops_without_place" integer,
	"version" bigint NOT NULL,
	CONSTRAINT "technician_day_loads_pkey" PRIMARY KEY("company_id","day","technician_id")
);
--> statement-breakpoint
ALTER TABLE "technician_day_loads" ADD CONSTRAINT "technician_day_loads_company_id_companies_id_fk" FOREIGN KEY ("company_id") REFERENCES "public"."companies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "technician_day_loads" ADD CONSTRAINT "technician_day_loads_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "technician_day_loads_technician_day_idx" ON "technician_day_loads" USING btree ("technician_id","day");